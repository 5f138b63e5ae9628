// Compile src/ to dist/ (plain JavaScript, same folder layout) so `lacuna` starts without
// transpiling. Run by `npm ci` / `npm install` (the `prepare` script) and by `npm run compile`.
//
//   node scripts/compile.mjs [--if-stale] [--quiet]
//
// - dist/ is written beside, as dist.next/, and swapped in by rename: a half-written dist/ is
//   never what runs.
// - dist/.compiled-from holds the fingerprint of the sources compiled (bin/entry.mjs); it is
//   written only when src/ did not change while compiling.
// - Type errors do not stop the emit (tsc still writes the same JavaScript tsx would run); they
//   are printed, and `npm run typecheck` shows them in full.
// - Without TypeScript installed (a production install), nothing is compiled and lacuna runs its
//   sources through tsx.
import { spawnSync } from 'node:child_process';
import { cpSync, existsSync, readdirSync, renameSync, rmSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join, relative } from 'node:path';
import { DIST, REPO, SRC, STAMP, compiledIsCurrent, sourceFingerprint } from '../bin/entry.mjs';

const quiet = process.argv.includes('--quiet');
const say = (s) => quiet || process.stdout.write(`${s}\n`);
if (process.argv.includes('--if-stale') && compiledIsCurrent()) {
  say('lacuna compile: dist/ is current');
  process.exit(0);
}

let tsc;
try {
  tsc = join(createRequire(import.meta.url).resolve('typescript/package.json'), '..', 'bin', 'tsc');
} catch {
  say('lacuna compile: TypeScript is not installed (production install?); lacuna will run its sources through tsx.');
  process.exit(0);
}

const before = sourceFingerprint();
const next = `${DIST}.next`;
rmSync(next, { recursive: true, force: true });
const t0 = performance.now();
const run = spawnSync(process.execPath, [tsc, '-p', join(REPO, 'tsconfig.build.json'), '--outDir', next], { cwd: REPO, encoding: 'utf8' });
if (run.error) throw run.error;
const out = `${run.stdout}${run.stderr}`.trim();
if (!existsSync(join(next, 'cli', 'main.js'))) {
  process.stderr.write(`${out}\nlacuna compile: tsc wrote no output (exit ${run.status}); lacuna will run its sources through tsx.\n`);
  rmSync(next, { recursive: true, force: true });
  process.exit(1);
}
if (run.status !== 0) {
  const errors = out.split('\n').filter((l) => / error TS\d+/.test(l));
  process.stderr.write(`${errors.slice(0, 10).join('\n')}\nlacuna compile: ${errors.length} type error(s); JavaScript written anyway (run npm run typecheck).\n`);
}

// Files that are not TypeScript (templates, style sheet, browser script) go beside the code
// that reads them relative to its own URL.
let copied = 0;
const copyAssets = (dir) => {
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const path = join(dir, e.name);
    if (e.isDirectory()) copyAssets(path);
    // (src/audit/worker.mjs is the tsx bootstrap for running the sources; compiled, the pool
    // loads worker-body.js directly.)
    else if (!e.name.endsWith('.ts') && e.name !== 'worker.mjs') {
      cpSync(path, join(next, relative(SRC, path)));
      copied++;
    }
  }
};
copyAssets(SRC);

if (sourceFingerprint() === before) writeFileSync(join(next, '.compiled-from'), `${before}\n`);
else process.stderr.write('lacuna compile: src/ changed while compiling; dist/ left unstamped (run npm run compile again).\n');
const old = `${DIST}.old`;
rmSync(old, { recursive: true, force: true });
if (existsSync(DIST)) renameSync(DIST, old);
renameSync(next, DIST);
rmSync(old, { recursive: true, force: true });
say(`lacuna compile: src/ → dist/ in ${((performance.now() - t0) / 1000).toFixed(1)} s (${copied} other files copied)${existsSync(STAMP) ? '' : ', unstamped'}`);
