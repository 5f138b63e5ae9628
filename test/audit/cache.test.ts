/**
 * Input hashing for the content-hash cache: files are hashed on the pool's lanes (worker threads
 * and this thread); the SHA-256 recorded in a version equals what coreutils' `sha256sum` prints
 * (FIPS 180-4; the check skips, saying so, where sha256sum is missing) and is checked against
 * NIST's published digest of "abc" regardless. A file whose size, mtime and inode are unchanged
 * is not read again; touching one (same bytes) makes it be hashed again, and the version is reused.
 */
import { describe, it, expect, afterAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, mkdirSync, rmSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { planHashes, recordHashes, sha256File } from '../../src/audit/cache.ts';
import { createPool } from '../../src/audit/pool.ts';
import { buildWorkspace } from '../../src/audit/build.ts';
import { readRecord, listVersions } from '../../src/audit/versions.ts';
import { createProgress } from '../../src/cli/progress.ts';
import { writeNpy } from '../../src/readers/npy-write.ts';
import { createRandom } from '../../src/stats/random.ts';

const made: string[] = [];
afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});
const hasSha256sum = spawnSync('sha256sum', ['--version']).status === 0;

function workspace(): string {
  const ws = mkdtempSync(join(tmpdir(), 'lacuna-cache-'));
  made.push(ws);
  mkdirSync(join(ws, 'audits'));
  mkdirSync(join(ws, 'data'));
  for (let i = 1; i <= 3; i++) {
    const rng = createRandom(40 + i);
    const a = new Float32Array(8 * 300).map(() => (rng.next() < 0.2 ? 1 + rng.int(3) : 0));
    writeNpy(join(ws, 'data', `m${i}.npy`), a, [8, 300]);
  }
  const rows = [1, 2, 3].map((i) => `  - { id: d${i}, path: ../data/m${i}.npy, month: 2026-0${i} }`).join('\n');
  writeFileSync(join(ws, 'audits', 'a.md'), `---\naudit: a\ntitle: Hash fixture\nbin_ms: 10\nmin_bins: 50\nbootstrap: { resamples: 100, level: 0.9, method: percentile, seed: 1 }\ndatasets:\n${rows}\n---\n`);
  return ws;
}

describe('input hashing', () => {
  it('sha256File gives NIST\'s digest of "abc" (FIPS 180-2, appendix B.1)', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'lacuna-sha-'));
    made.push(dir);
    writeFileSync(join(dir, 'abc'), 'abc');
    expect(await sha256File(join(dir, 'abc'))).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
  });

  it('hash tasks on a pool of two lanes give each file its own digest, in task order', async () => {
    const ws = workspace();
    const files = [1, 2, 3].map((i) => join(ws, 'data', `m${i}.npy`));
    const pool = createPool(1, { mainLane: true });
    try {
      const got = await pool.run(files.map((path) => ({ kind: 'hash' as const, path })), () => {});
      const direct = await Promise.all(files.map((f) => sha256File(f)));
      expect(got).toEqual(direct);
      expect(new Set(got).size).toBe(3);
    } finally {
      await pool.close();
    }
  });

  it.skipIf(!hasSha256sum)('a two-lane build records what sha256sum prints for every input', async () => {
    const ws = workspace();
    await buildWorkspace({ workspace: ws, out: join(ws, '_site'), progress: createProgress({ quiet: true }), workers: '2' });
    const inputs = readRecord(ws, 'a', 'v001').result.inputs;
    expect(inputs.length).toBe(3);
    for (const f of inputs) {
      const sum = spawnSync('sha256sum', [join(ws, f.path)], { encoding: 'utf8' });
      expect(f.sha256, f.path).toBe(sum.stdout.split(' ')[0]);
    }
  });

  it('re-reads only files whose stat changed; same bytes reuse the version', async () => {
    const ws = workspace();
    const files = [1, 2, 3].map((i) => ({ abs: join(ws, 'data', `m${i}.npy`), rel: `data/m${i}.npy` }));
    expect(planHashes(ws, files).toHash.length).toBe(3);
    const progress = createProgress({ quiet: true });
    await buildWorkspace({ workspace: ws, out: join(ws, '_site'), progress, workers: '2' });
    const after = planHashes(ws, files);
    expect(after.toHash).toEqual([]);
    expect([...after.known.keys()].sort()).toEqual(files.map((f) => f.rel));
    const later = new Date(Date.now() + 5000);
    utimesSync(files[1].abs, later, later);
    const touched = planHashes(ws, files);
    expect(touched.toHash.map((f) => f.rel)).toEqual(['data/m2.npy']);
    await buildWorkspace({ workspace: ws, out: join(ws, '_site'), progress, workers: '2' });
    expect(listVersions(ws, 'a').map((v) => v.version)).toEqual(['v001']);
    expect(planHashes(ws, files).toHash).toEqual([]);
    // recordHashes merges: recording one file keeps the others.
    recordHashes(ws, [{ file: { ...touched.toHash[0], mtimeMs: 1 }, sha256: 'x'.repeat(64) }]);
    expect(planHashes(ws, files).toHash.map((f) => f.rel)).toEqual(['data/m2.npy']);
  });

  it('a plain build removes temporary cache files a killed writer left a day ago, and keeps younger ones (a shard may be writing them)', async () => {
    const ws = workspace();
    const progress = createProgress({ quiet: true });
    await buildWorkspace({ workspace: ws, out: join(ws, '_site'), progress, workers: '1' });
    const cache = join(ws, '.lacuna-cache');
    mkdirSync(join(cache, 'hashes.d'), { recursive: true });
    const old = [join(cache, 'hashes.json.tmp-123-abc'), join(cache, 'datasets', 'f00.json.tmp-45-z9'), join(cache, 'hashes.d', '1-2-x.json.tmp-6-q')];
    const young = join(cache, 'datasets', 'f01.json.tmp-46-y8');
    const unrelated = join(cache, 'datasets', 'notes.txt');
    const twoDaysAgo = new Date(Date.now() - 2 * 24 * 3600 * 1000);
    for (const f of [...old, young, unrelated]) writeFileSync(f, '{');
    for (const f of [...old, unrelated]) utimesSync(f, twoDaysAgo, twoDaysAgo);
    // A shard takes no lock and cleans nothing.
    await buildWorkspace({ workspace: ws, out: join(ws, '_site'), progress, workers: '1', shard: '1/1' });
    for (const f of old) expect(existsSync(f), f).toBe(true);
    await buildWorkspace({ workspace: ws, out: join(ws, '_site'), progress, workers: '1' });
    for (const f of old) expect(existsSync(f), f).toBe(false);
    expect(existsSync(young)).toBe(true);
    expect(existsSync(unrelated)).toBe(true);
  });
});
