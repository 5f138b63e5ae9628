// Types for entry.mjs (plain JavaScript so that it runs before tsx is registered).
export const REPO: string;
export const SRC: string;
export const DIST: string;
export const STAMP: string;
export function sourceFingerprint(root?: string): string;
export function compiledIsCurrent(): boolean;
export function importLacuna(path: string): Promise<{ module: Record<string, unknown>; compiled: boolean }>;
