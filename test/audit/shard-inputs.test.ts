/**
 * A shard reads only its own datasets' files: `lacuna build --shard I/N` hashes (and computes) the
 * datasets whose number modulo N is I − 1, and no other input, so N shards on a cluster read each
 * input once between them instead of each hashing the whole workspace. What a build hashed is what
 * it recorded in the hash index (src/audit/cache.ts): a shard writes a fragment of its own under
 * `.lacuna-cache/hashes.d/` (shards run at once, without the lock), so the fragments after one shard
 * name exactly that shard's files; a plain build folds them into `.lacuna-cache/hashes.json`. The datasets' numbers themselves are checked in
 * test/audit/shard.test.ts (sharded against one-process builds).
 */
import { describe, it, expect, afterAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readFileSync, readdirSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { writeNpy } from '../../src/readers/npy-write.ts';

const REPO = resolve(import.meta.dirname, '../..');
const CLI = join(REPO, 'bin', 'lacuna.mjs');
const made: string[] = [];
afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});

/** Five small datasets d1…d5 (one file each), numbered 0…4 in manifest order. */
function workspace(): string {
  const ws = mkdtempSync(join(tmpdir(), 'lacuna-shard-inputs-'));
  made.push(ws);
  mkdirSync(join(ws, 'audits'));
  mkdirSync(join(ws, 'data'));
  for (let i = 1; i <= 5; i++) {
    const a = new Float32Array(4 * 120).map((_, k) => ((k * 7 + i) % 5 === 0 ? 1 : 0));
    writeNpy(join(ws, 'data', `d${i}.npy`), a, [4, 120]);
  }
  const rows = [1, 2, 3, 4, 5].map((i) => `  - { id: d${i}, path: ../data/d${i}.npy, month: 2026-0${i} }`).join('\n');
  writeFileSync(
    join(ws, 'audits', 'inputs.md'),
    `---\naudit: inputs\ntitle: Shard inputs\nbin_ms: 10\nmin_bins: 50\nbootstrap: { resamples: 100, level: 0.9, method: percentile, seed: 3 }\ndatasets:\n${rows}\n---\n`,
  );
  return ws;
}

const build = (ws: string, extra: string[]) =>
  spawnSync(process.execPath, [CLI, 'build', '--workspace', ws, '--out', join(ws, '_site'), '--quiet', '--workers', '1', ...extra], { encoding: 'utf8', timeout: 120_000 });
const keysOf = (file: string) => (existsSync(file) ? Object.keys(JSON.parse(readFileSync(file, 'utf8')) as object) : []);
const fragments = (ws: string) => {
  const dir = join(ws, '.lacuna-cache', 'hashes.d');
  return existsSync(dir) ? readdirSync(dir).map((f) => join(dir, f)) : [];
};
/** Every path in the hash index: `hashes.json` and the shards' fragments. */
const hashed = (ws: string) => [...new Set([...keysOf(join(ws, '.lacuna-cache', 'hashes.json')), ...fragments(ws).flatMap(keysOf)])].sort();
const entries = (ws: string) => readdirSync(join(ws, '.lacuna-cache', 'datasets')).filter((f) => f.endsWith('.json')).length;

describe('a shard reads only its own inputs', () => {
  it('--shard 2/3 hashes and computes datasets 1 and 4 (d2, d5) and nothing else', { timeout: 180_000 }, () => {
    const ws = workspace();
    const r = build(ws, ['--shard', '2/3']);
    expect(r.status, r.stderr).toBe(0);
    expect(hashed(ws)).toEqual(['data/d2.npy', 'data/d5.npy']);
    expect(fragments(ws)).toHaveLength(1);
    expect(existsSync(join(ws, '.lacuna-cache', 'hashes.json'))).toBe(false);
    expect(entries(ws)).toBe(2);
  });

  it('a plain build afterwards hashes the other three, computes their datasets and takes the shard’s two from the cache', { timeout: 180_000 }, () => {
    const ws = workspace();
    expect(build(ws, ['--shard', '2/3']).status).toBe(0);
    const dir = join(ws, '.lacuna-cache', 'datasets');
    const before = new Map(readdirSync(dir).map((f) => [f, statSync(join(dir, f)).mtimeMs]));
    const r = build(ws, []);
    expect(r.status, r.stderr).toBe(0);
    for (const [f, t] of before) expect(statSync(join(dir, f)).mtimeMs, f).toBe(t);
    expect(hashed(ws)).toEqual(['data/d1.npy', 'data/d2.npy', 'data/d3.npy', 'data/d4.npy', 'data/d5.npy']);
    expect(keysOf(join(ws, '.lacuna-cache', 'hashes.json')).sort()).toEqual(hashed(ws)); // the fragment folded in
    expect(fragments(ws)).toEqual([]);
    expect(entries(ws)).toBe(5);
    const record = JSON.parse(readFileSync(join(ws, 'records', 'inputs', 'v001.json'), 'utf8')) as { result: { datasets: { id: string }[] } };
    expect(record.result.datasets.map((d) => d.id)).toEqual(['d1', 'd2', 'd3', 'd4', 'd5']);
  });
});
