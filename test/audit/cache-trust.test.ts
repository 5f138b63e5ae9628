/**
 * The hash index and the dataset cache are shortcuts, never the truth:
 * - an in-place edit of the same size followed by `touch -r` (coreutils: copies a reference
 *   file's times exactly) keeps size, mtime and inode but not ctime, which POSIX updates on every
 *   write and a user cannot set; the new version must record the file's real SHA-256 (checked
 *   against sha256File, itself checked against FIPS 180-2's digest of "abc" in cache.test.ts);
 * - `rehash` ignores the index;
 * - a hand-edited cache entry (valid JSON, digest not updated) is a miss with a printed notice:
 *   the dataset is computed again and equals what the unchanged data gave before.
 */
import { describe, it, expect, afterAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { closeSync, symlinkSync, mkdirSync, mkdtempSync, openSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync, writeSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { planHashes, sha256File, cacheDir } from '../../src/audit/cache.ts';
import { buildWorkspace } from '../../src/audit/build.ts';
import { listVersions, readRecord } from '../../src/audit/versions.ts';
import { createProgress } from '../../src/cli/progress.ts';
import { writeNpy } from '../../src/readers/npy-write.ts';
import { createRandom } from '../../src/stats/random.ts';

const made: string[] = [];
afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});
const quiet = createProgress({ quiet: true });
const hasTouch = spawnSync('touch', ['--version']).status === 0;

function workspace(): string {
  const ws = mkdtempSync(join(tmpdir(), 'lacuna-trust-'));
  made.push(ws);
  mkdirSync(join(ws, 'audits'));
  mkdirSync(join(ws, 'data'));
  for (const i of [1, 2]) {
    const rng = createRandom(90 + i);
    writeNpy(join(ws, 'data', `m${i}.npy`), new Float32Array(8 * 200).map(() => (rng.next() < 0.2 ? 1 + rng.int(3) : 0)), [8, 200]);
  }
  const rows = [1, 2].map((i) => `  - { id: d${i}, path: ../data/m${i}.npy, month: 2026-0${i} }`).join('\n');
  writeFileSync(join(ws, 'audits', 'a.md'), `---\naudit: a\ntitle: Trust fixture\nbin_ms: 10\nmin_bins: 50\nbootstrap: { resamples: 100, level: 0.9, method: percentile, seed: 2 }\ndatasets:\n${rows}\n---\n`);
  return ws;
}

/** Flip the last byte of `file` in place: same size, same inode. */
function flipLastByteInPlace(file: string): void {
  const size = statSync(file).size;
  const b = readFileSync(file);
  const fd = openSync(file, 'r+');
  try {
    writeSync(fd, Buffer.from([b[size - 1] ^ 0x01]), 0, 1, size - 1);
  } finally {
    closeSync(fd);
  }
}

describe('the hash index', () => {
  it.skipIf(!hasTouch)('a same-size in-place edit with its times restored by `touch -r` makes a version with the new SHA-256', async () => {
    const ws = workspace();
    const out = join(ws, '_site');
    await buildWorkspace({ workspace: ws, out, progress: quiet, workers: '1' });
    const file = join(ws, 'data', 'm2.npy');
    const ref = join(ws, 'times-ref');
    writeFileSync(ref, '');
    expect(spawnSync('touch', ['-r', file, ref]).status).toBe(0);
    const before = statSync(file);
    flipLastByteInPlace(file);
    expect(spawnSync('touch', ['-r', ref, file]).status).toBe(0);
    const after = statSync(file);
    // The careless edit is as described: size, mtime and inode as before.
    expect([after.size, after.mtimeMs, after.ino]).toEqual([before.size, before.mtimeMs, before.ino]);
    const s = await buildWorkspace({ workspace: ws, out, progress: quiet, workers: '1' });
    expect(s.audits[0]).toMatchObject({ version: 'v002', reused: false });
    const rec = readRecord(ws, 'a', 'v002').result;
    expect(rec.inputs.find((f) => f.path === 'data/m2.npy')!.sha256).toBe(await sha256File(file));
    expect(listVersions(ws, 'a')[1].changes).toContain('data/m2.npy');
  });

  it('rehash plans every file for hashing even when the index is current', async () => {
    const ws = workspace();
    await buildWorkspace({ workspace: ws, out: join(ws, '_site'), progress: quiet, workers: '1' });
    const files = [1, 2].map((i) => ({ abs: join(ws, 'data', `m${i}.npy`), rel: `data/m${i}.npy` }));
    expect(planHashes(ws, files).toHash).toEqual([]);
    expect(planHashes(ws, files, { rehash: true }).toHash.map((f) => f.rel)).toEqual(['data/m1.npy', 'data/m2.npy']);
  });
});

describe('cache entries are checked on read', () => {
  it('a hand-edited dataset entry is refused with a notice, and the version gets the real result', async () => {
    const ws = workspace();
    const out = join(ws, '_site');
    await buildWorkspace({ workspace: ws, out, progress: quiet, workers: '1' });
    const v1 = readRecord(ws, 'a', 'v001').result;
    const d1 = v1.datasets.find((d) => d.id === 'd1')!;
    // Edit d1's entry: lifetime sparseness set to 0.123456789, findings removed (valid JSON).
    const file = join(cacheDir(ws), 'datasets', `${d1.cacheKey}.json`);
    // The entry's layout is the cache's business: its last line is JSON holding the result.
    const lines = readFileSync(file, 'utf8').split('\n');
    const entry = JSON.parse(lines[lines.length - 1]);
    const result = entry.result ?? entry;
    expect(result.measures.lifetime_sparseness.estimate).not.toBe(0.123456789);
    result.measures.lifetime_sparseness.estimate = 0.123456789;
    result.findings = [];
    lines[lines.length - 1] = JSON.stringify(entry);
    writeFileSync(file, lines.join('\n'));
    // Another dataset changes, so the build makes v002 and takes d1 from the cache.
    const m2 = join(ws, 'data', 'm2.npy');
    const b = readFileSync(m2);
    b[b.length - 1] ^= 0x01;
    writeFileSync(m2, b);
    const printed: string[] = [];
    const progress = createProgress({ stream: { write: (s: string) => printed.push(s) } });
    const s = await buildWorkspace({ workspace: ws, out, progress, workers: '1' });
    expect(s.audits[0].version).toBe('v002');
    const d1again = readRecord(ws, 'a', 'v002').result.datasets.find((d) => d.id === 'd1')!;
    expect(d1again.measures).toEqual(d1.measures); // unchanged data, same seed: the v001 numbers
    expect(d1again.findings).toEqual(d1.findings);
    expect(JSON.stringify(d1again)).not.toContain('0.123456789');
    expect(printed.join('')).toMatch(new RegExp(`notice: cache entry .*${d1.cacheKey}\\.json refused`));
  });

  it('a hand-edited hash in hashes.json is refused with a notice, and the record has the real SHA-256', async () => {
    const ws = workspace();
    const out = join(ws, '_site');
    await buildWorkspace({ workspace: ws, out, progress: quiet, workers: '1' });
    const store = join(cacheDir(ws), 'hashes.json');
    const index = JSON.parse(readFileSync(store, 'utf8'));
    index['data/m1.npy'].sha256 = 'f'.repeat(64);
    writeFileSync(store, JSON.stringify(index));
    writeFileSync(join(ws, 'audits', 'a.md'), readFileSync(join(ws, 'audits', 'a.md'), 'utf8') + '\nEdited notes.\n');
    const lines: string[] = [];
    await buildWorkspace({ workspace: ws, out, progress: createProgress({ stream: { write: (s: string) => lines.push(s) } }), workers: '1' });
    const rec = readRecord(ws, 'a', 'v002').result;
    expect(rec.inputs.find((f) => f.path === 'data/m1.npy')!.sha256).toBe(await sha256File(join(ws, 'data', 'm1.npy')));
    expect(lines.join('')).toMatch(/notice: cache entry .*hashes\.json refused, the entry of data\/m1\.npy/);
    expect(readdirSync(join(ws, 'records', 'a'))).toEqual(['v001.json', 'v002.json']);
  });

  // A FIFO as the link's target: a reader that followed the link would block on it for ever, so
  // the child build's 60 s limit would end it and the test fail (mkfifo: coreutils).
  it.skipIf(spawnSync('mkfifo', ['--version']).status !== 0)('a cache entry or hash fragment that is a symbolic link is never read through: computed again, with a notice', async () => {
    const ws = workspace();
    await buildWorkspace({ workspace: ws, out: join(ws, '_site'), progress: quiet, workers: '1' });
    const outside = mkdtempSync(join(tmpdir(), 'lacuna-outside-'));
    made.push(outside);
    const fifo = join(outside, 'fifo');
    expect(spawnSync('mkfifo', [fifo]).status).toBe(0);
    const entries = readdirSync(join(cacheDir(ws), 'datasets'));
    const entry = join(cacheDir(ws), 'datasets', entries[0]);
    rmSync(entry);
    symlinkSync(fifo, entry);
    mkdirSync(join(cacheDir(ws), 'hashes.d'));
    symlinkSync(fifo, join(cacheDir(ws), 'hashes.d', '1-2-x.json'));
    const cli = join(import.meta.dirname, '../../bin/lacuna.mjs');
    const r = spawnSync(process.execPath, [cli, 'build', '--workspace', ws, '--out', join(ws, '_site')], { encoding: 'utf8', timeout: 60_000 });
    expect(r.signal, 'the build blocked reading through a link').toBeNull();
    expect(r.status, r.stderr).toBe(0);
    expect(r.stderr).toMatch(new RegExp(`notice: cache entry .*${entries[0]} refused`));
    expect(r.stderr).toMatch(/computing 1 dataset/);
  });
});
