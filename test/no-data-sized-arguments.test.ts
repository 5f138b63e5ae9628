/**
 * No argument list built from an array anywhere in src/: V8 throws "Maximum call stack size
 * exceeded" once a spread or apply passes roughly 10⁵ arguments, and units, bins and files come
 * in any number. Use minOf / maxOf / pushAll (src/util/arrays.ts) or a loop instead. Only the
 * spread of a fixed 6-byte magic string in the .npy header reader is allowed (listed below).
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';

function* sources(dir: string): Generator<string> {
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) yield* sources(p);
    else if (/\.(ts|js|mjs)$/.test(name)) yield p;
  }
}

const FORBIDDEN = [/Math\.(min|max)\(\s*\.\.\./, /\.push\(\s*\.\.\./, /\.apply\(/, /Reflect\.apply\(/, /\.(unshift|splice)\([^)]*\.\.\./];
const ALLOWED = ['String.fromCharCode(...pre.subarray(0, 6))'];

describe('argument lists over arrays in src/', () => {
  it('none of Math.min(...), Math.max(...), push(...), apply( appear', () => {
    const found: string[] = [];
    for (const file of sources('src')) {
      readFileSync(file, 'utf8')
        .split('\n')
        .forEach((line, i) => {
          if (/^\s*(\*|\/\*|\/\/)/.test(line) || ALLOWED.some((a) => line.includes(a))) return; // comments, the allowed spread
          if (FORBIDDEN.some((re) => re.test(line))) found.push(`${file}:${i + 1}: ${line.trim()}`);
        });
    }
    expect(found).toEqual([]);
  });
});
