/**
 * The benchmark: one whole `lacuna build` of a large activity matrix against what a careful
 * lab member would write in numpy (scripts/bench-reference.py), on the same file.
 *
 *   npm run bench -- [--units 2000] [--bins 50000] [--repeat 1] [--seed 1] [--profile DIR] [--node-flags "…"]
 *
 *   1. data: a seeded units × bins float32 matrix of Poisson counts, each unit's rate drawn from
 *      a gamma distribution (shape 0.7, scale 0.3 spikes a bin: mean 0.21, a long tail of busy
 *      units and some nearly silent ones), written block by block (never the whole matrix in
 *      memory) as `.npy` into a workspace under the system temporary folder. The folder is named
 *      after seed and shape and KEPT between runs (generation takes a while); delete it to redo.
 *      One manifest: axis time, 1,000 percentile resamples, a fixed moving-block length
 *      ℓ = ⌈bins^(1/3)⌉ (the order of the optimal length, Hall, Horowitz & Jing 1995), which the
 *      numpy reference uses too.
 *   2. the file is read once (untimed) so both contenders start from a warm page cache;
 *   3. per repeat: (a) a first build from nothing (cache, records and output removed) in a child
 *      process — scripts/bench-child.mjs, which loads Lacuna as `lacuna` does (compiled dist/ when
 *      current, else the sources through tsx), calls `buildWorkspace` and prints its stage
 *      timings; the input is new, so it is hashed in the pass that measures it ("read + hash +
 *      measures"); (b) the numpy reference; (c) the same build again with the input's hash
 *      already known (only the dataset cache, records and output removed): its compute stage is
 *      the measures alone, comparable with the figures from before read-through hashing. Each
 *      child runs under `/usr/bin/time -v` for its peak RSS when that exists, else
 *      /proc/<pid>/status VmHWM is polled every 20 ms.
 *   4. figures (median over repeats): input size, compute stage, whole build, numpy, the ratios,
 *      peak RSS; and the estimates of both side by side (they must agree: same work).
 * No pass/fail: it prints figures. `--profile DIR` adds `--cpu-prof --cpu-prof-dir DIR` to the build.
 */
import { spawnSync } from 'node:child_process';
import { closeSync, existsSync, mkdirSync, openSync, readFileSync, readSync, renameSync, rmSync, statSync, writeFileSync, writeSync } from 'node:fs';
import { cpus, loadavg, tmpdir, totalmem } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { createRandom, type Random } from '../src/stats/random.ts';
import { npyHeader } from '../src/readers/npy-write.ts';
import { lacunaNodeFlags, lastJson, med, median, secs, timedChild, type Run } from './bench-timed.ts';

const SCRIPT = fileURLToPath(import.meta.url);
const REPO = resolve(dirname(SCRIPT), '..');
const GAMMA_SHAPE = 0.7;
const GAMMA_SCALE = 0.3;

function option(name: string, fallback: string): string {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 && process.argv[i + 1] !== undefined ? process.argv[i + 1] : fallback;
}

// ---------------------------------------------------------------------------- 1. data
/** Gamma(shape, 1) by Marsaglia & Tsang (2000, ACM TOMS 26:363–372); shape < 1 via Gamma(shape + 1)·U^(1/shape). */
function gamma(rng: Random, shape: number): number {
  if (shape < 1) return gamma(rng, shape + 1) * Math.pow(rng.next() || Number.MIN_VALUE, 1 / shape);
  const d = shape - 1 / 3;
  const c = 1 / Math.sqrt(9 * d);
  for (;;) {
    const z = rng.normal();
    const v = (1 + c * z) ** 3;
    if (v <= 0) continue;
    const u = rng.next();
    if (Math.log(u) < 0.5 * z * z + d - d * v + d * Math.log(v)) return d * v;
  }
}

/** Fill `row` with Poisson(λ) counts by inversion (sequential search from 0; one uniform each). */
function poissonRow(rng: Random, lambda: number, row: Float32Array): void {
  const p0 = Math.exp(-lambda);
  for (let j = 0; j < row.length; j++) {
    const u = rng.nextUint32() * 2.3283064365386963e-10;
    let k = 0;
    let p = p0;
    let F = p0;
    while (u > F && k < 1000) {
      k++;
      p *= lambda / k;
      F += p;
    }
    row[j] = k;
  }
}

function ensureData(file: string, units: number, bins: number, seed: number): { generated: boolean; ms: number } {
  const header = npyHeader('<f4', [units, bins]);
  const bytes = header.length + units * bins * 4;
  if (existsSync(file) && statSync(file).size === bytes) return { generated: false, ms: 0 };
  const t0 = performance.now();
  const rng = createRandom(seed);
  const rates = Float64Array.from({ length: units }, () => gamma(rng, GAMMA_SHAPE) * GAMMA_SCALE);
  const blockUnits = Math.max(1, Math.floor((16 << 20) / (bins * 4)));
  const block = new Float32Array(blockUnits * bins);
  const tmp = `${file}.tmp-${process.pid}`;
  const fd = openSync(tmp, 'w');
  try {
    writeSync(fd, header);
    for (let u0 = 0; u0 < units; u0 += blockUnits) {
      const n = Math.min(blockUnits, units - u0);
      for (let r = 0; r < n; r++) poissonRow(rng, rates[u0 + r], block.subarray(r * bins, (r + 1) * bins));
      writeSync(fd, new Uint8Array(block.buffer, 0, n * bins * 4));
    }
  } finally {
    closeSync(fd);
  }
  renameSync(tmp, file);
  return { generated: true, ms: performance.now() - t0 };
}

function manifest(blockLength: number): string {
  return `---
audit: bench
title: Benchmark (seeded synthetic Poisson counts)
kind: activity
axis: time
bin_ms: 10
zero_tolerance: 0
min_nonzero: 10
bootstrap: { resamples: 1000, level: 0.95, method: percentile, seed: 1, block_length: ${blockLength} }
datasets:
  - { id: synthetic, path: ../data/activity.npy }
---
Seeded synthetic data written by scripts/bench.ts.
`;
}

// ---------------------------------------------------------------------------- 3. timed children (scripts/bench-timed.ts)
const mib = (b: number) => `${(b / 2 ** 20).toFixed(0)} MiB`;

function machine(): string {
  const cpuinfo = existsSync('/proc/cpuinfo') ? readFileSync('/proc/cpuinfo', 'utf8') : '';
  const model = /model name\s*:\s*(.+)/.exec(cpuinfo)?.[1] ?? cpus()[0]?.model ?? 'unknown';
  return `${model}, ${cpus().length} cores, ${(totalmem() / 2 ** 30).toFixed(1)} GiB RAM; node ${process.version}`;
}

// ---------------------------------------------------------------------------- main
const units = Number(option('units', '2000'));
const bins = Number(option('bins', '50000'));
const repeat = Number(option('repeat', '1'));
const seed = Number(option('seed', '1'));
const profile = option('profile', '');
for (const [k, v] of Object.entries({ units, bins, repeat, seed })) {
  if (!Number.isInteger(v) || v < (k === 'seed' ? 0 : 1)) throw new Error(`--${k} must be a whole number, got ${v}`);
}
const blockLength = Math.ceil(Math.cbrt(bins));
const ws = join(tmpdir(), `lacuna-bench-s${seed}-${units}x${bins}`);
const out = join(ws, '_site');
const file = join(ws, 'data', 'activity.npy');
mkdirSync(join(ws, 'data'), { recursive: true });
mkdirSync(join(ws, 'audits'), { recursive: true });
writeFileSync(join(ws, 'audits', 'bench.md'), manifest(blockLength));

console.log(`machine: ${machine()}`);
console.log(`load average before: ${loadavg().map((x) => x.toFixed(2)).join(' ')} (other work on the machine slows both contenders)`);
const gen = ensureData(file, units, bins, seed);
const inputBytes = statSync(file).size;
console.log(
  gen.generated
    ? `data: generated ${file} in ${secs(gen.ms)} (kept for later runs with the same seed and shape)`
    : `data: reusing ${file} (same seed and shape; delete ${ws} to regenerate)`,
);

// 2. Compile src/ if dist/ is stale (the command would otherwise run the sources through tsx,
//    slower to start than what `npm ci` installs), then warm the page cache for both (untimed).
{
  const c = spawnSync(process.execPath, [join(REPO, 'scripts', 'compile.mjs'), '--if-stale'], { cwd: REPO, encoding: 'utf8' });
  if (c.status !== 0) console.log(`compile failed (exit ${c.status}); the build runs the sources through tsx\n${c.stderr}`);
  else if (!c.stdout.includes('is current')) console.log(c.stdout.trim());
}
{
  const fd = openSync(file, 'r');
  const buf = Buffer.allocUnsafe(8 << 20);
  while (readSync(fd, buf, 0, buf.length, null) > 0);
  closeSync(fd);
}

type BuildOut = {
  timings: Record<'manifests' | 'hash' | 'compute' | 'assemble' | 'render', number>;
  computed: number;
  hashed: { first: number; inPass: number; reread: number };
  startupMs: number;
  computeRssKiB: number | null;
  compiled: boolean;
};
type RefOut = {
  seconds: { pass: number; bootstrap: number; total: number };
  estimates: Record<string, number>;
  interval: { lower: number; upper: number };
  versions: { numpy: string };
};
// The V8 flags `lacuna` runs with: those on bin/lacuna.mjs's `#!/usr/bin/env -S node …` line
// (the npm scripts pass the same), unless `--node-flags "…"` says otherwise (to compare).
const nodeFlags = process.argv.includes('--node-flags') ? option('node-flags', '').split(/\s+/).filter(Boolean) : lacunaNodeFlags();
const builds: { run: Run; out: BuildOut }[] = [];
const alone: { run: Run; out: BuildOut }[] = [];
const refs: { run: Run; out: RefOut }[] = [];
for (let r = 0; r < repeat; r++) {
  for (const d of ['.lacuna-cache', 'records', '_site']) rmSync(join(ws, d), { recursive: true, force: true });
  const nodeArgs = [...nodeFlags, ...(profile ? ['--cpu-prof', '--cpu-prof-dir', resolve(profile)] : []), join(REPO, 'scripts', 'bench-child.mjs'), ws, out];
  const b = await timedChild(process.execPath, nodeArgs);
  builds.push({ run: b, out: lastJson<BuildOut>(b.stdout) });
  const refArgs = [join(REPO, 'scripts', 'bench-reference.py'), file, '--block-length', String(blockLength), '--resamples', '1000', '--seed', String(seed), '--min-nonzero', '10'];
  const p = await timedChild('python3', refArgs);
  refs.push({ run: p, out: lastJson<RefOut>(p.stdout) });
  // (c) The measures alone: the hash index kept, so the input is known and not read to hash it.
  for (const d of ['.lacuna-cache/datasets', 'records', '_site']) rmSync(join(ws, d), { recursive: true, force: true });
  const a = await timedChild(process.execPath, [...nodeFlags, join(REPO, 'scripts', 'bench-child.mjs'), ws, out]);
  alone.push({ run: a, out: lastJson<BuildOut>(a.stdout) });
  const t = builds[r].out.timings;
  const h = builds[r].out.hashed;
  console.log(
    `run ${r + 1}/${repeat}: lacuna ${secs(b.wallMs)} (cpu ${b.cpuMs === null ? '?' : secs(b.cpuMs)}; hash stage ${secs(t.hash)}, compute ${secs(t.compute)} ` +
      `[${mib(h.inPass)} hashed in the pass, ${mib(h.reread)} of it read again by the hashing lane, ${mib(h.first)} hashed first], render ${secs(t.render)}); ` +
      `numpy ${secs(p.wallMs)} (cpu ${p.cpuMs === null ? '?' : secs(p.cpuMs)}; in-script ${refs[r].out.seconds.total.toFixed(2)} s); ` +
      `measures alone ${secs(alone[r].out.timings.compute)} (hash stage ${secs(alone[r].out.timings.hash)})`,
  );
}

// 4. Figures.
/** Read + hash + measures: the first build's hash stage (files hashed on their own) and compute stage. */
const compute = med(builds.map((b) => b.out.timings.hash + b.out.timings.compute));
const measuresAlone = med(alone.map((b) => b.out.timings.compute));
const stages = med(builds.map((b) => Object.values(b.out.timings).reduce((s, x) => s + x, 0)));
const build = med(builds.map((b) => b.run.wallMs));
const buildCpu = med(builds.map((b) => b.run.cpuMs));
const numpy = med(refs.map((p) => p.run.wallMs));
const numpyCpu = med(refs.map((p) => p.run.cpuMs));
const numpyInScript = med(refs.map((p) => p.out.seconds.total * 1000));
const lacunaRss = med(builds.map((b) => b.run.peakRssKiB)) * 1024;
const computeRss = med(builds.map((b) => b.out.computeRssKiB)) * 1024;
const startup = med(builds.map((b) => b.out.startupMs));
const numpyRss = med(refs.map((p) => p.run.peakRssKiB)) * 1024;
const stageMedians = Object.fromEntries(
  (['manifests', 'hash', 'compute', 'assemble', 'render'] as const).map((k) => [k, med(builds.map((b) => b.out.timings[k]))]),
);
const ref = refs[refs.length - 1].out;
/**
 * The ratio run by run (each build and its numpy run are back to back, so a slow spell of the
 * machine affects both): median and range. The ratio of medians above is the headline figure.
 */
function paired(ratio: (b: (typeof builds)[number], p: (typeof refs)[number], i: number) => number): string {
  const rs = builds.map((b, i) => ratio(b, refs[i], i)).sort((x, y) => x - y);
  return `run by run: median ${median(rs).toFixed(2)}, ${rs[0].toFixed(2)}–${rs[rs.length - 1].toFixed(2)}`;
}
console.log(`
input              ${units} units × ${bins} bins float32 = ${mib(inputBytes)} (${inputBytes} bytes); ${repeat} run(s), medians
reference          numpy ${ref.versions.numpy}, python3; block length ${blockLength}, 1000 percentile resamples
read+hash+measures ${secs(compute)}   (stages 2–3 of a first build: read, SHA-256 of the input, one-pass measures, 7 bootstrap intervals)
measures alone     ${secs(measuresAlone)}   (stage 3 of a build whose input's hash is known: read, one-pass measures, 7 bootstrap intervals)
lacuna build       ${secs(build)}   (child process wall time, cpu ${secs(buildCpu)}; node ${nodeFlags.join(' ') || '(no flags)'}; ran ${builds.every((b) => b.out.compiled) ? 'compiled dist/' : builds.some((b) => b.out.compiled) ? 'mixed (dist/ changed between runs)' : 'src/ through tsx (dist/ absent or stale: npm run compile)'}; start-up ${secs(startup)} then stages ${secs(stages)}: ${Object.entries(stageMedians).map(([k, v]) => `${k} ${secs(v)}`).join(', ')})
numpy reference    ${secs(numpy)}   (process wall time, cpu ${secs(numpyCpu)}; in-script ${secs(numpyInScript)}: pass ${secs(med(refs.map((p) => p.out.seconds.pass * 1000)))}, bootstrap ${secs(med(refs.map((p) => p.out.seconds.bootstrap * 1000)))}; the rest is interpreter start and numpy import)
compute / numpy    ${(measuresAlone / numpy).toFixed(2)}   (measures alone; target ≤ 0.5; against numpy's in-script time: ${(measuresAlone / numpyInScript).toFixed(2)}; ${paired((_b, p, i) => alone[i].out.timings.compute / p.run.wallMs)})
  with the hash    ${(compute / numpy).toFixed(2)}   (read + hash + measures; numpy hashes nothing; ${paired((b, p) => (b.out.timings.hash + b.out.timings.compute) / p.run.wallMs)})
build / numpy      ${(build / numpy).toFixed(2)}   (target ≤ 1.2 at this size, ≤ 0.8 at 4 GiB; cpu time ratio ${(buildCpu / numpyCpu).toFixed(2)}; ${paired((b, p) => b.run.wallMs / p.run.wallMs)})
lacuna peak RSS    ${mib(lacunaRss)} = ${(lacunaRss / inputBytes).toFixed(2)} × input   (target ≤ 0.5, and ≤ 250 MiB at 4 GiB); up to the end of compute ${mib(computeRss)} = ${(computeRss / inputBytes).toFixed(2)} × input
numpy peak RSS     ${mib(numpyRss)} = ${(numpyRss / inputBytes).toFixed(2)} × input   (memory-mapped pages that were touched count as resident)
peak RSS from      ${existsSync('/usr/bin/time') ? '/usr/bin/time -v (maximum resident set size)' : 'polling /proc/<pid>/status VmHWM every 20 ms'}
load average after ${loadavg().map((x) => x.toFixed(2)).join(' ')}`);

// Same work: the estimates side by side.
const record = JSON.parse(readFileSync(join(ws, 'records', 'bench', 'v001.json'), 'utf8'));
const measures = record.result.datasets[0].measures;
console.log('\nestimate                lacuna                 numpy');
for (const k of ['density', 'population_sparseness', 'lifetime_sparseness', 'kurtosis']) {
  console.log(`${k.padEnd(24)}${String(measures[k].estimate.toPrecision(10)).padEnd(23)}${ref.estimates[k].toPrecision(10)}`);
}
const iv = measures.population_sparseness.interval as [number, number];
console.log(`population interval     [${iv[0].toFixed(5)}, ${iv[1].toFixed(5)}]     [${ref.interval.lower.toFixed(5)}, ${ref.interval.upper.toFixed(5)}] (different random streams)`);

// The demo's first build and no-op rebuild, with the same flags and repeats (scripts/bench-demo.ts; `--no-demo` skips).
if (!process.argv.includes('--no-demo')) await (await import('./bench-demo.ts')).benchDemo({ repeat, nodeFlags });
