/** Lacuna's version, read once from package.json (recorded in every report and cache key). */
import { readFileSync } from 'node:fs';

export const TOOL_VERSION: string = (JSON.parse(readFileSync(new URL('../package.json', import.meta.url), 'utf8')) as { version: string }).version;
