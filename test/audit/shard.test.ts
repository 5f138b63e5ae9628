/**
 * Sharded builds, through the real command line: three `lacuna build --shard i/3` processes run
 * at the same time into one workspace cache, then one plain build renders. The version record
 * must hold the same results as a one-process build of a copy of the same workspace (that build
 * is itself checked against the reference measures in build.test.ts), and the shards must have
 * done the computing (the plain build only reads their cache entries).
 * Bad --shard values are usage errors that name the flag.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { cpSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { writeNpy } from '../../src/readers/npy-write.ts';
import { createRandom } from '../../src/stats/random.ts';

const REPO = resolve(import.meta.dirname, '../..');
const CLI = join(REPO, 'bin', 'lacuna.mjs');
/** Five datasets of different shapes, so three shards get 2, 2 and 1 of them. */
const SHAPES: [number, number][] = [
  [6, 300],
  [9, 250],
  [5, 400],
  [12, 200],
  [7, 350],
];

function matrix(seed: number, units: number, bins: number): Float32Array {
  const rng = createRandom(seed);
  const a = new Float32Array(units * bins);
  for (let i = 0; i < a.length; i++) a[i] = rng.next() < 0.2 ? 1 + rng.int(3) : 0;
  return a;
}

function makeWorkspace(): { ws: string; arrays: Float32Array[] } {
  const ws = mkdtempSync(join(tmpdir(), 'lacuna-shard-'));
  mkdirSync(join(ws, 'audits'));
  mkdirSync(join(ws, 'data'));
  const arrays = SHAPES.map(([u, b], i) => matrix(500 + i, u, b));
  SHAPES.forEach(([u, b], i) => writeNpy(join(ws, 'data', `d${i + 1}.npy`), arrays[i], [u, b]));
  const rows = SHAPES.map((_, i) => `  - { id: d${i + 1}, path: ../data/d${i + 1}.npy, month: 2026-0${i + 1} }`).join('\n');
  writeFileSync(
    join(ws, 'audits', 'shards.md'),
    `---\naudit: shards\ntitle: Shard fixture\nbin_ms: 10\nmin_bins: 50\nbootstrap: { resamples: 200, level: 0.9, method: percentile, seed: 7 }\ndatasets:\n${rows}\n---\nFixture.\n`,
  );
  return { ws, arrays };
}

function cli(args: string[]): Promise<{ status: number | null; stderr: string }> {
  return new Promise((done, fail) => {
    const child = spawn(process.execPath, [CLI, ...args], { cwd: REPO, stdio: ['ignore', 'ignore', 'pipe'] });
    let stderr = '';
    child.stderr.on('data', (d) => (stderr += d));
    child.on('error', fail);
    child.on('close', (status) => done({ status, stderr }));
  });
}

const cacheEntries = (ws: string) => {
  const dir = join(ws, '.lacuna-cache', 'datasets');
  return existsSync(dir) ? readdirSync(dir).filter((f) => f.endsWith('.json')).sort() : [];
};
const record = (ws: string) => JSON.parse(readFileSync(join(ws, 'records', 'shards', 'v001.json'), 'utf8'));

describe('sharded build (3 concurrent shard processes, then a plain build)', () => {
  let sharded: string;
  let single: string;
  let arrays: Float32Array[];
  let afterShards: { entries: string[]; mtimes: number[]; records: boolean };

  beforeAll(async () => {
    ({ ws: sharded, arrays } = makeWorkspace());
    single = mkdtempSync(join(tmpdir(), 'lacuna-single-'));
    cpSync(sharded, single, { recursive: true });
    const shards = await Promise.all([1, 2, 3].map((i) => cli(['build', '--shard', `${i}/3`, '--workspace', sharded, '--out', join(sharded, '_site'), '--quiet'])));
    for (const s of shards) expect(s.status, s.stderr).toBe(0);
    const entries = cacheEntries(sharded);
    afterShards = {
      entries,
      mtimes: entries.map((f) => statSync(join(sharded, '.lacuna-cache', 'datasets', f)).mtimeMs),
      records: existsSync(join(sharded, 'records')),
    };
    const plain = await cli(['build', '--workspace', sharded, '--out', join(sharded, '_site'), '--quiet']);
    expect(plain.status, plain.stderr).toBe(0);
    const one = await cli(['build', '--workspace', single, '--out', join(single, '_site'), '--quiet', '--workers', '1']);
    expect(one.status, one.stderr).toBe(0);
  }, 120_000);

  afterAll(() => {
    for (const d of [sharded, single]) if (d) rmSync(d, { recursive: true, force: true });
  });

  it('the shards computed every dataset between them and rendered nothing', () => {
    expect(afterShards.entries).toHaveLength(SHAPES.length);
    expect(afterShards.records).toBe(false);
    expect(existsSync(join(sharded, '_site', 'shards'))).toBe(true); // rendered by the plain build only
  });

  it('the plain build took every dataset from the shards’ cache (entries not rewritten)', () => {
    expect(cacheEntries(sharded)).toEqual(afterShards.entries);
    const now = afterShards.entries.map((f) => statSync(join(sharded, '.lacuna-cache', 'datasets', f)).mtimeMs);
    expect(now).toEqual(afterShards.mtimes);
  });

  it('gives the same results as a one-process build of a copy of the workspace', () => {
    const a = record(sharded).result;
    const b = record(single).result;
    expect(a.datasets.length).toBe(SHAPES.length);
    expect(a.datasets).toEqual(b.datasets);
    const { created: _ca, ...restA } = a;
    const { created: _cb, ...restB } = b;
    expect(restA).toEqual(restB);
  });

  it('each dataset’s density equals the nonzero fraction counted directly from the fixture array', () => {
    // Independent count (definition of density: fraction of elements with |x| > zero_tolerance = 0).
    const byId = new Map(record(sharded).result.datasets.map((d: { id: string }) => [d.id, d]));
    arrays.forEach((a, i) => {
      const nonzero = a.reduce((s, v) => s + (v !== 0 ? 1 : 0), 0);
      const d = byId.get(`d${i + 1}`) as { measures: { density: { estimate: number } }; shape: number[] };
      expect(d.shape).toEqual(SHAPES[i]);
      expect(d.measures.density.estimate).toBeCloseTo(nonzero / a.length, 12);
    });
  });
});

describe('--shard values outside I/N with 1 ≤ I ≤ N', () => {
  let ws: string;
  beforeAll(() => {
    ws = makeWorkspace().ws;
  });
  afterAll(() => rmSync(ws, { recursive: true, force: true }));

  it.each(['0/3', '4/3', 'x'])('--shard %s is a usage error naming the flag, and nothing is computed', (value) => {
    const r = spawnSync(process.execPath, [CLI, 'build', '--shard', value, '--workspace', ws, '--out', join(ws, '_site'), '--quiet'], {
      cwd: REPO,
      encoding: 'utf8',
      timeout: 60_000,
    });
    // Exit codes documented in src/cli/main.ts: 2 = usage error.
    expect(r.status).toBe(2);
    expect(r.stderr).toContain('--shard');
    expect(r.stderr).toContain(`"${value}"`);
    expect(cacheEntries(ws)).toEqual([]);
    expect(existsSync(join(ws, 'records'))).toBe(false);
  });
});
