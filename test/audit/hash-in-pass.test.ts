/**
 * Read-through hashing (src/readers/read-tap.ts, src/audit/build.ts `filesHashedInPass`): a new
 * input is hashed from the reads that measure it, and the SHA-256 a version records is still the
 * SHA-256 of the file. Every digest here is checked against coreutils' `sha256sum` (FIPS 180-4,
 * an implementation outside Node; these checks skip, saying so, where it is missing). "Exactly
 * as before" is checked by the other path: a `--rehash` build hashes every file on its own first
 * (the path every build took before), so it must find the first build's cache keys and versions.
 */
import { describe, it, expect, afterAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { appendFileSync, copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, rmSync, statSync, utimesSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { tapFiles, GAP_FILL } from '../../src/readers/read-tap.ts';
import { buildWorkspace, type BuildSummary } from '../../src/audit/build.ts';
import { listVersions, readRecord } from '../../src/audit/versions.ts';
import { createProgress } from '../../src/cli/progress.ts';
import { makeDemo } from '../../src/demo/scenario.ts';
import { writeNpy } from '../../src/readers/npy-write.ts';
import { createRandom } from '../../src/stats/random.ts';
import { causeChain } from '../../src/errors.ts';
import { hasScipy, pythonStatus, runPython } from '../helpers/python.ts';

const made: string[] = [];
afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});
const hasSha256sum = spawnSync('sha256sum', ['--version']).status === 0;
if (!hasSha256sum) console.warn('[lacuna tests] skipping read-through hashing checks: coreutils sha256sum is not runnable');
const quiet = createProgress({ quiet: true });
const sha256sum = (file: string) => spawnSync('sha256sum', [file], { encoding: 'utf8' }).stdout.split(' ')[0];

function tempDir(prefix: string): string {
  const d = mkdtempSync(join(tmpdir(), prefix));
  made.push(d);
  return d;
}

/** An empty workspace (audits/, data/) in a new temporary folder. */
function emptyWorkspace(prefix: string): string {
  const ws = tempDir(prefix);
  mkdirSync(join(ws, 'audits'));
  mkdirSync(join(ws, 'data'));
  return ws;
}

/** Write audits/<audit>.md listing `rows` (YAML flow maps, one a dataset), 10 ms bins. */
function writeManifest(ws: string, audit: string, rows: string[], head = 'bin_ms: 10\nmin_bins: 50'): void {
  writeFileSync(
    join(ws, 'audits', `${audit}.md`),
    `---\naudit: ${audit}\ntitle: Audit ${audit}\n${head}\nbootstrap: { resamples: 100, level: 0.9, method: percentile, seed: 1 }\ndatasets:\n${rows.map((r) => `  - ${r}`).join('\n')}\n---\n`,
  );
}

const build = (ws: string, extra: { rehash?: boolean; workers?: string; splitMinBytes?: number; audit?: string } = {}): Promise<BuildSummary> =>
  buildWorkspace({ workspace: ws, out: join(ws, '_site'), progress: quiet, workers: extra.workers ?? '2', rehash: extra.rehash, splitMinBytes: extra.splitMinBytes, audit: extra.audit });

/** Every input of the latest version of every audit, as recorded. */
function recordedInputs(ws: string, audits: string[]) {
  return audits.flatMap((a) => {
    const v = listVersions(ws, a);
    return readRecord(ws, a, v[v.length - 1].version).result.inputs;
  });
}

describe.skipIf(!hasSha256sum)('a tap hashes the bytes it is offered in file order', () => {
  const dir = tempDir('lacuna-tap-');
  const file = join(dir, 'bytes.bin');
  const rng = createRandom(7);
  const data = new Uint8Array(300_001).map(() => rng.int(256));
  writeFileSync(file, data);
  const expected = sha256sum(file);

  it('pieces in order, overlapping, or repeated: one read, sha256sum’s digest', async () => {
    const t = tapFiles([{ path: file, relPath: 'bytes.bin', size: data.length }]);
    const { offerRead } = await import('../../src/readers/read-tap.ts');
    offerRead(file, 0, data.subarray(0, 1000));
    offerRead(file, 500, data.subarray(500, 90_000)); // overlaps the prefix
    offerRead(file, 0, data.subarray(0, 10)); // a second reader of the head: ignored
    offerRead(file, 90_000, data.subarray(90_000));
    const [h] = await t.finish();
    expect(h).toEqual({ sha256: expected, bytes: data.length, reread: 0 });
  });

  it('pieces out of order: the tap reads the rest itself, and says how much', async () => {
    const t = tapFiles([{ path: file, relPath: 'bytes.bin', size: data.length }]);
    const { offerRead } = await import('../../src/readers/read-tap.ts');
    offerRead(file, 200_000, data.subarray(200_000)); // far ahead: ignored
    offerRead(file, 0, data.subarray(0, 100_000));
    const [h] = await t.finish();
    expect(h).toEqual({ sha256: expected, bytes: data.length, reread: data.length - 100_000 });
  });

  it('a small gap before a piece is read by the tap; a large one is left for finish()', async () => {
    const t = tapFiles([{ path: file, relPath: 'bytes.bin', size: data.length }]);
    const { offerRead } = await import('../../src/readers/read-tap.ts');
    offerRead(file, 30, data.subarray(30, 1000)); // gap of 30 bytes: filled
    offerRead(file, 1000 + GAP_FILL + 1, data.subarray(1000 + GAP_FILL + 1)); // too far: ignored
    const [h] = await t.finish();
    expect(h).toEqual({ sha256: expected, bytes: data.length, reread: 30 + (data.length - 1000) });
  });

  it('a file whose length is not the planned one is an InputError naming it', async () => {
    const t = tapFiles([{ path: file, relPath: 'data/bytes.bin', size: data.length - 1 }]);
    const err = await t.finish().then(() => null, (e: Error) => e);
    expect(err?.name).toBe('InputError');
    expect(String(err?.message)).toMatch(/changed while it was being read/);
    expect((err as { file?: string }).file).toBe('data/bytes.bin');
  });

  it('a file modified or replaced since it was planned is refused, naming it', async () => {
    const f = join(dir, 'stamped.bin');
    writeFileSync(f, data.subarray(0, 1000));
    const st = statSync(f);
    const stamp = { mtimeMs: st.mtimeMs, ctimeMs: st.ctimeMs, ino: st.ino };
    const same = tapFiles([{ path: f, relPath: 'data/stamped.bin', size: 1000, stamp }]);
    expect((await same.finish())[0].sha256).toBe(sha256sum(f));
    const later = new Date(Date.now() + 5000);
    utimesSync(f, later, later); // same bytes, same size: only the times say it was written
    const touched = tapFiles([{ path: f, relPath: 'data/stamped.bin', size: 1000, stamp }]);
    const err = await touched.finish().then(() => null, (e: Error) => e);
    expect(err?.name).toBe('InputError');
    expect(String(err?.message)).toMatch(/changed while it was being read \(modified since the build planned to read it\)/);
    expect((err as { file?: string }).file).toBe('data/stamped.bin');
  });

  it('offers for a file nobody tapped, or after the task, change nothing', async () => {
    const { offerRead } = await import('../../src/readers/read-tap.ts');
    const t = tapFiles([{ path: resolve(file), relPath: 'bytes.bin', size: data.length }]);
    offerRead(join(dir, 'other.bin'), 0, data.subarray(0, 50)); // another file: not this tap's
    const [h] = await t.finish();
    expect(h.sha256).toBe(expected);
    expect(h.reread).toBe(data.length);
    offerRead(file, 0, data); // unregistered now: no effect, no error
  });
});

describe.skipIf(!hasSha256sum)('a first build hashes new inputs in the pass that measures them', () => {
  it('demo workspace (npy both layouts, spike CSV, sorter folder, imaging folder, safetensors): sha256sum’s digests, and a --rehash build finds the same keys and versions', { timeout: 240_000 }, async () => {
    const ws = tempDir('lacuna-inpass-demo-');
    makeDemo(ws, { overwriteManifests: false });
    const first = await build(ws);
    const audits = first.audits.map((a) => a.audit);
    const inputs = recordedInputs(ws, audits);
    expect(inputs.length).toBeGreaterThan(20);
    const total = [...new Map(inputs.map((f) => [f.path, f.bytes])).values()].reduce((s, b) => s + b, 0);
    expect(first.hashed.first).toBe(0); // nothing hashed on its own first
    expect(first.hashed.inPass).toBe(total);
    for (const f of inputs) expect(f.sha256, f.path).toBe(sha256sum(join(ws, f.path)));

    // The path every build took before: every file hashed first, then the dataset cache looked
    // up by key. Same keys: nothing computed, every version reused.
    const again = await build(ws, { rehash: true });
    expect(again.hashed).toEqual({ first: total, inPass: 0, reread: 0 });
    expect(again.computed).toBe(0);
    expect(again.audits.every((a) => a.reused)).toBe(true);
  });

  it('npy and spike CSV: every byte read once (the taps read nothing themselves), split over two lanes or not', { timeout: 120_000 }, async () => {
    const ws = emptyWorkspace('lacuna-inpass-once-');
    const rng = createRandom(11);
    writeNpy(join(ws, 'data', 'a.npy'), new Float32Array(40 * 500).map(() => (rng.next() < 0.2 ? 1 + rng.int(3) : 0)), [40, 500]);
    const lines = ['unit,time'];
    for (let u = 0; u < 6; u++) for (let k = 0; k < 40; k++) lines.push(`u${u},${(rng.next() * 5).toFixed(4)}`);
    writeFileSync(join(ws, 'data', 'b.csv'), `${lines.join('\n')}\n`);
    writeManifest(ws, 'a', ['{ id: a, path: ../data/a.npy, month: 2026-01 }']);
    writeManifest(ws, 'b', ['{ id: b, path: ../data/b.csv, format: spikes, month: 2026-01 }']);
    const first = await build(ws, { workers: '1' });
    expect(first.hashed).toEqual({ first: 0, inPass: statSync(join(ws, 'data', 'a.npy')).size + statSync(join(ws, 'data', 'b.csv')).size, reread: 0 });
    for (const f of recordedInputs(ws, ['a', 'b'])) expect(f.sha256, f.path).toBe(sha256sum(join(ws, f.path)));

    // Split over two lanes by unit ranges: the first range's lane hashes, and reads the other
    // range's bytes itself once its own are done.
    rmSync(join(ws, '.lacuna-cache'), { recursive: true });
    rmSync(join(ws, 'records'), { recursive: true });
    rmSync(join(ws, '_site'), { recursive: true });
    const split = await build(ws, { workers: '2', splitMinBytes: 1, audit: 'a' });
    expect(split.split).toBe(1);
    expect(split.hashed.reread).toBeGreaterThan(0);
    expect(split.hashed.reread).toBeLessThan(statSync(join(ws, 'data', 'a.npy')).size);
    for (const f of recordedInputs(ws, ['a'])) expect(f.sha256, f.path).toBe(sha256sum(join(ws, f.path)));
    expect((await build(ws, { rehash: true, audit: 'a' })).computed).toBe(0);
  });

  it('a touched file (same size) is hashed first and its dataset comes from the cache; a resized one is hashed in the pass', { timeout: 120_000 }, async () => {
    const ws = emptyWorkspace('lacuna-inpass-touch-');
    const rng = createRandom(12);
    for (const n of ['a', 'b']) writeNpy(join(ws, 'data', `${n}.npy`), new Float32Array(8 * 300).map(() => (rng.next() < 0.2 ? 1 : 0)), [8, 300]);
    writeManifest(ws, 'a', ['{ id: a, path: ../data/a.npy, month: 2026-01 }', '{ id: b, path: ../data/b.npy, month: 2026-02 }']);
    await build(ws);
    const a = join(ws, 'data', 'a.npy');
    const b = join(ws, 'data', 'b.npy');
    const later = new Date(Date.now() + 5000);
    utimesSync(a, later, later);
    const touched = await build(ws);
    expect(touched.hashed).toEqual({ first: statSync(a).size, inPass: 0, reread: 0 });
    expect(touched.computed).toBe(0);
    expect(touched.audits[0].reused).toBe(true);

    // b grows by one unit (a new header and one more row): new bytes, so hashed in the pass.
    writeNpy(b, new Float32Array(9 * 300).map(() => (rng.next() < 0.2 ? 1 : 0)), [9, 300]);
    const resized = await build(ws);
    expect(resized.hashed).toEqual({ first: 0, inPass: statSync(b).size, reread: 0 });
    expect(resized.computed).toBe(1);
    expect(recordedInputs(ws, ['a']).find((f) => f.path === 'data/b.npy')?.sha256).toBe(sha256sum(b));
  });

  it('a file two datasets read is hashed once, first, and not by both passes', { timeout: 120_000 }, async () => {
    const ws = emptyWorkspace('lacuna-inpass-shared-');
    const rng = createRandom(13);
    writeNpy(join(ws, 'data', 's.npy'), new Float32Array(8 * 300).map(() => (rng.next() < 0.2 ? 1 : 0)), [8, 300]);
    writeNpy(join(ws, 'data', 'o.npy'), new Float32Array(8 * 300).map(() => (rng.next() < 0.2 ? 1 : 0)), [8, 300]);
    writeManifest(ws, 'x', ['{ id: s, path: ../data/s.npy, month: 2026-01 }', '{ id: o, path: ../data/o.npy, month: 2026-02 }']);
    writeManifest(ws, 'y', ['{ id: s, path: ../data/s.npy, month: 2026-01 }']);
    const r = await build(ws);
    const s = statSync(join(ws, 'data', 's.npy')).size;
    expect(r.hashed).toEqual({ first: s, inPass: statSync(join(ws, 'data', 'o.npy')).size, reread: 0 });
    for (const f of recordedInputs(ws, ['x', 'y'])) expect(f.sha256, f.path).toBe(sha256sum(join(ws, f.path)));
  });

  it('when one dataset fails, the hashes learnt measuring the others are kept, and the next build takes those from the cache', { timeout: 120_000 }, async () => {
    const ws = emptyWorkspace('lacuna-inpass-fail-');
    const rng = createRandom(14);
    writeNpy(join(ws, 'data', 'good.npy'), new Float32Array(8 * 300).map(() => (rng.next() < 0.2 ? 1 : 0)), [8, 300]);
    const bad = join(ws, 'data', 'bad.npy');
    writeNpy(bad, new Float32Array(8 * 300).map(() => (rng.next() < 0.2 ? 1 : 0)), [8, 300]);
    const whole = readFileSync(bad);
    writeFileSync(bad, whole.subarray(0, whole.length - 100)); // cut short: its header promises more
    writeManifest(ws, 'a', ['{ id: good, path: ../data/good.npy, month: 2026-01 }', '{ id: bad, path: ../data/bad.npy, month: 2026-02 }']);
    const err = await build(ws, { workers: '1' }).then(() => null, (e: Error) => e);
    expect(err, 'the cut file must fail the build').not.toBeNull();
    const index = JSON.parse(readFileSync(join(ws, '.lacuna-cache', 'hashes.json'), 'utf8')) as Record<string, { sha256: string }>;
    expect(Object.keys(index)).toEqual(['data/good.npy']);
    expect(index['data/good.npy'].sha256).toBe(sha256sum(join(ws, 'data', 'good.npy')));
    writeFileSync(bad, whole);
    const again = await build(ws, { workers: '1' });
    expect(again.computed).toBe(1);
    expect(again.hashed).toEqual({ first: 0, inPass: whole.length, reread: 0 });
  });

  it('a file that grows while its dataset is read is refused, naming it, and its hash is not recorded', { timeout: 120_000 }, async () => {
    const ws = emptyWorkspace('lacuna-inpass-grow-');
    const csv = join(ws, 'data', 'g.csv');
    const rows = ['unit,time'];
    for (let k = 0; k < 200; k++) rows.push(`u${k % 3},${(k * 0.02).toFixed(3)}`);
    writeFileSync(csv, `${rows.join('\n')}\n`);
    writeManifest(ws, 'g', ['{ id: g, path: ../data/g.csv, format: spikes, month: 2026-01 }']);
    // Grow the file between the plan (its size) and the read: the hook runs as the build starts.
    const progress = createProgress({ quiet: true });
    const step = progress.step.bind(progress);
    progress.step = (label, total, unit) => {
      if (/computing/.test(label)) appendFileSync(csv, 'u0,4.5\n');
      return step(label, total, unit);
    };
    const err = await buildWorkspace({ workspace: ws, out: join(ws, '_site'), progress, workers: '1' }).then(() => null, (e: Error) => e);
    expect(err?.name).toBe('InputError');
    expect(causeChain(err).join('\n')).toMatch(/data\/g\.csv.*changed while it was being read/);
    const index = join(ws, '.lacuna-cache', 'hashes.json');
    expect(existsSync(index) ? Object.keys(JSON.parse(readFileSync(index, 'utf8')) as object) : []).not.toContain('data/g.csv');
  });
});

describe.skipIf(!hasSha256sum || !hasScipy)('npz members and an NWB file, written by other software', () => {
  if (!hasScipy) console.warn(`[lacuna tests] skipping the npz read-through check: ${pythonStatus.reason}`);
  it('numpy’s savez and savez_compressed, and the NWB reference software’s RoiResponseSeries: sha256sum’s digests', { timeout: 120_000 }, async () => {
    const ws = emptyWorkspace('lacuna-inpass-npz-');
    runPython(
      `rng = np.random.default_rng(5)
m = (rng.random((6, 400)) < 0.2).astype(np.float32)
np.savez(inp + "/stored.npz", activity=m)
np.savez_compressed(inp + "/deflated.npz", activity=m)
print(json.dumps(True))`,
      join(ws, 'data'),
    );
    const roi = resolve(import.meta.dirname, '../../../shared/data/nwb/roi-response-series.nwb');
    const nwb = existsSync(roi);
    if (nwb) copyFileSync(roi, join(ws, 'data', 'roi.nwb'));
    else console.warn('[lacuna tests] ../shared/data/nwb/roi-response-series.nwb is absent: the NWB part of the read-through check is skipped');
    writeManifest(ws, 'z', ['{ id: s, path: ../data/stored.npz, format: npz, member: activity, month: 2026-01 }', '{ id: d, path: ../data/deflated.npz, format: npz, member: activity, month: 2026-02 }']);
    if (nwb) writeManifest(ws, 'n', ['{ id: r, path: ../data/roi.nwb, format: nwb, month: 2026-01 }'], 'bin_ms: 100\nmin_bins: 5');
    const first = await build(ws);
    expect(first.hashed.first).toBe(0);
    const inputs = recordedInputs(ws, nwb ? ['z', 'n'] : ['z']);
    expect(inputs.length).toBe(nwb ? 3 : 2);
    for (const f of inputs) expect(f.sha256, f.path).toBe(sha256sum(join(ws, f.path)));
    expect((await build(ws, { rehash: true })).computed).toBe(0);
  });
});
