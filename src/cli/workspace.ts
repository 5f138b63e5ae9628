/**
 * Which workspace and output folder a command uses when the user names none.
 *
 * The workspace is the current folder, or the nearest folder above it holding `audits/` (as
 * git finds its repository), never the demo inside the installed package: run from the wrong
 * folder, a command says that no workspace was found instead of silently working on the demo.
 * The output folder defaults to `_site/` inside the workspace.
 */
import { statSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { UsageError } from './args.ts';
import { safeTerminalLine } from '../text/safe-terminal.ts';

export interface Chosen {
  workspace: string;
  /** True when the workspace was found from the current folder rather than given. */
  found: boolean;
}

/** A folder (following links); false for anything else or nothing. */
export function isFolder(path: string): boolean {
  try {
    return statSync(path).isDirectory();
  } catch {
    return false;
  }
}

/** The nearest folder from `start` upward that holds an `audits/` folder, or null. */
export function findWorkspace(start: string): string | null {
  let dir = resolve(start);
  for (;;) {
    if (isFolder(join(dir, 'audits'))) return dir;
    const up = dirname(dir);
    if (up === dir) return null;
    dir = up;
  }
}

/** The workspace given by `--workspace`, else the one found from `cwd`; a usage error when none. */
export function chooseWorkspace(flag: string | undefined, command: string, cwd = process.cwd()): Chosen {
  if (flag !== undefined) return { workspace: resolve(cwd, flag), found: false };
  const found = findWorkspace(cwd);
  if (found) return { workspace: found, found: true };
  throw new UsageError(`lacuna ${command}: no workspace found: neither ${safeTerminalLine(cwd)} nor any folder above it holds an audits/ folder`, {
    hint: `run it inside a workspace, pass ${command === 'serve' ? '--out SITE-DIR or ' : ''}--workspace DIR, or make a new one with \`lacuna init DIR\``,
  });
}

/** `--out` as given, else `_site/` inside the workspace. */
export function chooseOut(flag: string | undefined, workspace: string, cwd = process.cwd()): string {
  return flag !== undefined ? resolve(cwd, flag) : join(workspace, '_site');
}

/** The one line saying what a command found by itself (nothing when everything was given). */
export function describeChoice(chosen: Chosen, out?: { path: string; given: boolean }): string | null {
  const parts: string[] = [];
  if (chosen.found) parts.push(`workspace ${safeTerminalLine(chosen.workspace)} (found from the current folder)`);
  if (out && !out.given) parts.push(`output ${safeTerminalLine(out.path)}`);
  return parts.length ? `using ${parts.join(', ')}` : null;
}
