/**
 * Hostile NWB (HDF5) files: each must be refused by `lacuna check` and `lacuna build` with an
 * input error naming the file, the HDF5 object and the reason — never read past, never a crash,
 * a hang or a memory blow-up. The commands run in child processes with a 1.5 GB resident-memory
 * cap and a timeout (capped-run.ts).
 *
 * Two sets: files written here at test time with h5py (Debian's /usr/bin/python3 with
 * python3-h5py; skipped with a message without it), whose outside files hold values no real
 * data would (12345, 777, unit id 4242) so a reader that followed them would show it; and the
 * ready-made set in ../shared/data/hostile-nwb/ (skipped when absent), whose README lists what
 * each file tries; its outside/* files are copied to /tmp/lacuna-outside/ first, so a reader
 * that followed them would really read outside bytes (secret.bin: bytes 0…255 repeated).
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { basename, dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import { inspectNwb, openNwbActivity } from '../../src/readers/nwb.ts';
import { runLacunaCapped } from './capped-run.ts';

const PY = '/usr/bin/python3';
const h5py = spawnSync(PY, ['-c', 'import h5py, numpy'], { encoding: 'utf8' });
const hasH5py = !h5py.error && h5py.status === 0;
if (!hasH5py) console.warn(`[lacuna tests] skipping h5py-written hostile NWB files: ${PY} with h5py is not available`);

const SHARED = resolve(dirname(fileURLToPath(import.meta.url)), '../../../shared/data/hostile-nwb');
const hasShared = existsSync(join(SHARED, 'README.md'));
if (!hasShared) console.warn(`[lacuna tests] skipping shared hostile NWB files: ${SHARED} is absent`);

/** A workspace with one audit reading `file` (copied into data/). */
function workspace(root: string, file: string): string {
  const name = basename(file).replace(/\.\w+$/, '');
  const ws = join(root, name);
  mkdirSync(join(ws, 'audits'), { recursive: true });
  mkdirSync(join(ws, 'data'), { recursive: true });
  copyFileSync(file, join(ws, 'data', basename(file)));
  writeFileSync(
    join(ws, 'audits', `${name}.md`),
    `---\naudit: ${name}\ntitle: hostile ${name}\nkind: activity\naxis: time\nbin_ms: 10\ndatasets:\n  - { id: d1, path: ../data/${basename(file)}, format: nwb, month: 2026-01 }\n---\nHostile input.\n`,
  );
  return ws;
}

/** Every file under `dir`, concatenated (to look for numbers that came from outside). */
function allText(dir: string, ext = /\.(html|json|svg|txt|bib|md)$/): string {
  if (!existsSync(dir)) return '';
  return readdirSync(dir, { recursive: true, withFileTypes: true })
    .filter((e) => e.isFile() && ext.test(e.name))
    .map((e) => readFileSync(join(e.parentPath, e.name), 'utf8'))
    .join('\n');
}

/** check and build both exit 1 with every pattern in their output; nothing is written. */
async function expectRefused(root: string, file: string, patterns: RegExp[], forbidden: RegExp | null = null): Promise<void> {
  const ws = workspace(root, file);
  const out = join(root, `${basename(ws)}-site`);
  const check = await runLacunaCapped(['check', '--workspace', ws]);
  const build = await runLacunaCapped(['build', '--workspace', ws, '--out', out]);
  for (const [what, r] of [['check', check], ['build', build]] as const) {
    expect(r.killed, `${what}: ${r.killed}`).toBeNull();
    expect(r.code, `${what} exit code; stderr:\n${r.stderr}`).toBe(1);
    expect(r.stderr).toContain(`data/${basename(file)}`);
    for (const p of patterns) expect(r.stderr, what).toMatch(p);
    expect(r.stderr).not.toMatch(/internal error/i);
  }
  expect(existsSync(join(ws, 'records'))).toBe(false);
  if (forbidden) expect(allText(out)).not.toMatch(forbidden);
}

// Written with h5py at test time. Outside files live in a sibling folder, outside the workspace.
const SCRIPT = String.raw`
import sys, os, h5py, numpy as np
d, outside = sys.argv[1], sys.argv[2]
secret = os.path.join(outside, 'secret.raw')
np.full(64, 12345.0).tofile(secret)
with h5py.File(os.path.join(outside, 'units.h5'), 'w') as f:
    u = f.create_group('units'); u.attrs['neurodata_type'] = 'Units'
    u['spike_times'] = np.array([0.5, 1.5]); u['spike_times_index'] = np.array([1, 2]); u['id'] = np.array([4242, 4343])
with h5py.File(os.path.join(outside, 'series.h5'), 'w') as f:
    f['secret'] = np.full(64, 777.0)

def series(f, **data_kw):
    g = f.create_group('acquisition/trace'); g.attrs['neurodata_type'] = 'RoiResponseSeries'
    g.create_dataset('starting_time', data=0.0).attrs['rate'] = 100.0
    return g

with h5py.File(os.path.join(d, 'external-storage.nwb'), 'w') as f:
    g = series(f); g.create_dataset('data', shape=(64,), dtype='<f8', external=[(secret, 0, h5py.h5f.UNLIMITED)])
fifo = os.path.join(outside, 'fifo')
os.mkfifo(fifo)
with h5py.File(os.path.join(d, 'external-fifo.nwb'), 'w') as f:
    g = series(f); g.create_dataset('data', shape=(64,), dtype='<f8', external=[(fifo, 0, h5py.h5f.UNLIMITED)])
with h5py.File(os.path.join(d, 'external-link.nwb'), 'w') as f:
    f['units'] = h5py.ExternalLink(os.path.join(outside, 'units.h5'), '/units')
with h5py.File(os.path.join(d, 'virtual.nwb'), 'w') as f:
    g = series(f); lay = h5py.VirtualLayout(shape=(64,), dtype='<f8')
    lay[:] = h5py.VirtualSource(os.path.join(outside, 'series.h5'), 'secret', shape=(64,))
    g.create_virtual_dataset('data', lay, fillvalue=0)
p = os.path.join(d, 'corrupt-chunk.nwb')
with h5py.File(p, 'w') as f:
    g = series(f); ds = g.create_dataset('data', data=np.arange(64.0), chunks=(64,), compression='gzip')
    info = ds.id.get_chunk_info(0); off, size = info.byte_offset, info.size
with open(p, 'r+b') as fh:
    fh.seek(off); fh.write(b'\xff' * size)
with h5py.File(os.path.join(d, 'many-units.nwb'), 'w') as f:
    u = f.create_group('units'); u.attrs['neurodata_type'] = 'Units'
    u['spike_times'] = np.array([0.5])
    u.create_dataset('spike_times_index', shape=(10**8,), dtype='<i8', chunks=(10**6,), compression='gzip', fillvalue=1)
    u.create_dataset('id', shape=(10**8,), dtype='<i8', chunks=(10**6,), compression='gzip')
def units(f, ids):
    u = f.create_group('units'); u.attrs['neurodata_type'] = 'Units'
    u['spike_times'] = np.array([0.25, 0.5, 0.75]); u['spike_times_index'] = np.array([1, 2, 3]); u['id'] = ids
with h5py.File(os.path.join(d, 'string-ids.nwb'), 'w') as f:
    units(f, np.array([b'<img src=x onerror=alert(1)>', b'u1', b'\x1b[31mRED\x1b[0m'], dtype='S32'))
with h5py.File(os.path.join(d, 'vlen-ids.nwb'), 'w') as f:
    units(f, np.array(['a', 'b', 'c'], dtype=h5py.string_dtype()))
with h5py.File(os.path.join(d, 'far-spike.nwb'), 'w') as f:
    u = f.create_group('units'); u.attrs['neurodata_type'] = 'Units'
    u['spike_times'] = np.array([0.5, 1.5, 1e15]); u['spike_times_index'] = np.array([2, 3]); u['id'] = np.array([1, 2])
with h5py.File(os.path.join(d, 'long-series.nwb'), 'w') as f:
    g = f.create_group('acquisition/trace'); g.attrs['neurodata_type'] = 'RoiResponseSeries'
    g.create_dataset('starting_time', data=0.0).attrs['rate'] = 1000.0
    g.create_dataset('data', shape=(10**10,), dtype='<f4', chunks=(10**6,), compression='gzip')
`;

// Each test runs up to two capped children of at most 60 s each.
describe.skipIf(!hasH5py)('hostile NWB files written by h5py at test time', { timeout: 150_000 }, () => {
  let root = '';
  let files = '';
  beforeAll(() => {
    root = mkdtempSync(join(tmpdir(), 'lacuna-hostile-'));
    files = join(root, 'files');
    const outside = join(root, 'outside');
    mkdirSync(files);
    mkdirSync(outside);
    const r = spawnSync(PY, ['-c', SCRIPT, files, outside], { encoding: 'utf8', timeout: 120_000 });
    if (r.status !== 0) throw new Error(`h5py script failed: ${r.stderr}`);
  });
  afterAll(() => rmSync(root, { recursive: true, force: true }));

  it('refuses HDF5 external storage, naming the raw file, and reads none of it', async () => {
    await expectRefused(root, join(files, 'external-storage.nwb'), [/\/acquisition\/trace\/data/, /external storage/, /secret\.raw/], /12345/);
  });

  it('refuses external storage that names a FIFO, without waiting on it', async () => {
    // A reader that opened the FIFO would block until a writer appeared: the 60 s timeout of
    // capped-run.ts would kill it and this test would fail.
    await expectRefused(root, join(files, 'external-fifo.nwb'), [/\/acquisition\/trace\/data/, /external storage/, /fifo/]);
  });

  it('refuses an external link at /units instead of reading the outside units table', async () => {
    await expectRefused(root, join(files, 'external-link.nwb'), [/\/units/, /external link/, /units\.h5/], /4242/);
  });

  it('refuses a virtual dataset, naming its source', async () => {
    await expectRefused(root, join(files, 'virtual.nwb'), [/\/acquisition\/trace\/data/, /virtual dataset/, /series\.h5/], /777/);
  });

  it('refuses a gzip chunk that does not decode instead of reporting memory as data', async () => {
    await expectRefused(root, join(files, 'corrupt-chunk.nwb'), [/\/acquisition\/trace\/data/, /reported an error/, /filter returned failure/]);
  });

  it('refuses 10^8 declared units from the header, before reading a column', async () => {
    await expectRefused(root, join(files, 'many-units.nwb'), [/\/units\/spike_times_index/, /100000000 units/, /allowed \(a quarter of this machine/, /split the file/]);
  });

  it('refuses a spike at 10^15 s in check as in build, with the same message (check reads a units table\'s spike times)', async () => {
    // 10^15 s in 10 ms bins is 10^17 bins: over the memory budget and the bin limit.
    await expectRefused(root, join(files, 'far-spike.nwb'), [/\/units\/spike_times/, /bins/]);
  });

  it('refuses a series whose starting_time and rate make 10^9 bins of 10 ms, from the header', async () => {
    // 10^10 samples at 1000 Hz span 10^7 s: ⌊(10^10 − 1) / 1000 · 1000 / 10⌋ + 1 = 10^9 bins
    // (one more when the bin-edge tolerance of nwb-time.ts rounds 999999999.9 up to the edge).
    await expectRefused(root, join(files, 'long-series.nwb'), [/\/acquisition\/trace/, /100000000[01] bins of 10 ms/, /raise bin_ms/]);
  });

  it('reads fixed-length string ids as labels with control characters escaped; check and build agree', async () => {
    const name = 'string-ids.nwb';
    await inspectNwb(join(files, name), name, null, 10); // check's reader: no error
    const f = await openNwbActivity(join(files, name), { binMs: 10, series: null, relPath: name });
    try {
      // h5py wrote the ids above; ESC (U+001B) becomes the visible text \u{1b}.
      expect(f.unitLabels).toEqual(['<img src=x onerror=alert(1)>', 'u1', '\\u{1b}[31mRED\\u{1b}[0m']);
    } finally {
      await f.close();
    }
  });

  it('refuses variable-length string ids in check and build with the same message', async () => {
    const ws = workspace(root, join(files, 'vlen-ids.nwb'));
    const check = await runLacunaCapped(['check', '--workspace', ws]);
    const build = await runLacunaCapped(['build', '--workspace', ws, '--out', join(root, 'vlen-site')]);
    const line = (t: string) => /data\/vlen-ids\.nwb, \/units\/id: .*/.exec(t)?.[0];
    expect(check.code).toBe(1);
    expect(build.code).toBe(1);
    expect(line(check.stderr)).toMatch(/id holds variable-length strings; allowed: integers/);
    expect(line(build.stderr)).toBe(line(check.stderr));
  });

  it('the sandbox alone keeps outside bytes out: h5wasm used directly, with no check, reads none', async () => {
    // Control: h5wasm's Node build, which sees the machine's files, does read the outside values
    // (12345 from the raw file, 777 from the virtual source, id 4242 through the link), so the
    // fixtures really point outside and this test can fail.
    const node = (await import('h5wasm/node')).default;
    await node.ready;
    const plain = (name: string, path: string): number[] => {
      const f = new node.File(join(files, name), 'r');
      try {
        const d = f.get(path) as InstanceType<typeof node.Dataset> | null;
        return d ? Array.from(d.value as ArrayLike<number | bigint>, Number) : [];
      } finally {
        f.close();
      }
    };
    expect(plain('external-storage.nwb', '/acquisition/trace/data')).toContain(12345);
    expect(plain('virtual.nwb', '/acquisition/trace/data')).toContain(777);
    expect(plain('external-link.nwb', '/units/id')).toContain(4242);
    // The sandboxed library, asked for the same objects with every Lacuna check bypassed.
    const { openSandboxed, closeSandboxed } = await import('../../src/readers/hdf5-sandbox.ts');
    const boxed = async (name: string, path: string): Promise<number[]> => {
      const f = await openSandboxed(join(files, name), name);
      try {
        const d = f.get(path) as { value?: unknown } | null;
        const v = d && 'value' in d ? d.value : null;
        return ArrayBuffer.isView(v) ? Array.from(v as unknown as ArrayLike<number | bigint>, Number) : [];
      } finally {
        closeSandboxed(f);
      }
    };
    expect(await boxed('external-storage.nwb', '/acquisition/trace/data')).not.toContain(12345);
    expect(await boxed('virtual.nwb', '/acquisition/trace/data')).not.toContain(777);
    expect(await boxed('external-link.nwb', '/units/id')).not.toContain(4242);
  });

  it('the reader itself throws an InputError naming file and object (in process)', async () => {
    for (const [name, where] of [['external-storage.nwb', '/acquisition/trace/data'], ['virtual.nwb', '/acquisition/trace/data'], ['corrupt-chunk.nwb', '/acquisition/trace/data']]) {
      const err = await inspectNwb(join(files, name), name, null, 10).then(() => null, (e: unknown) => e);
      expect(err, name).toBeInstanceOf(InputError);
      expect((err as InputError).file).toBe(name);
      expect((err as InputError).where).toBe(where);
      let open: unknown = null;
      try {
        const f = await openNwbActivity(join(files, name), { binMs: 10, series: null, relPath: name });
        try {
          await f.readUnits(0, 1, new Float64Array(f.bins), f.bins, 0);
        } finally {
          await f.close();
        }
      } catch (e) {
        open = e;
      }
      expect(open, name).toBeInstanceOf(InputError);
    }
  });
});

describe.skipIf(!hasShared)('hostile NWB files in ../shared/data/hostile-nwb', { timeout: 150_000 }, () => {
  let root = '';
  beforeAll(() => {
    root = mkdtempSync(join(tmpdir(), 'lacuna-hostile-shared-'));
    mkdirSync('/tmp/lacuna-outside', { recursive: true });
    for (const f of readdirSync(join(SHARED, 'outside'))) {
      rmSync(join('/tmp/lacuna-outside', f), { force: true });
      copyFileSync(join(SHARED, 'outside', f), join('/tmp/lacuna-outside', f));
    }
  });
  afterAll(() => rmSync(root, { recursive: true, force: true }));
  const shared = (n: string) => join(SHARED, n);

  it('external-storage.nwb: refused, and nothing is measured from secret.bin', async () => {
    await expectRefused(root, shared('external-storage.nwb'), [/\/acquisition\/trace\/data/, /external storage/, /secret\.bin/]);
  });
  it('external-link.nwb: the link at /units is not followed (ids 4242, 4343 never appear)', async () => {
    await expectRefused(root, shared('external-link.nwb'), [/\/units/, /external link/], /4242|4343/);
  });
  it('virtual-dataset.nwb: refused, naming the source file', async () => {
    await expectRefused(root, shared('virtual-dataset.nwb'), [/\/acquisition\/trace\/data/, /virtual dataset/, /series\.h5/]);
  });
  it('corrupt-chunk.nwb: refused instead of uninitialised memory', async () => {
    await expectRefused(root, shared('corrupt-chunk.nwb'), [/\/acquisition\/trace\/data/, /reported an error/]);
  });
  it('many-units.nwb: 10^8 declared units refused from the header', async () => {
    await expectRefused(root, shared('many-units.nwb'), [/\/units\/spike_times_index/, /100000000 units/]);
  });
  it('link-cycle.nwb: a group that contains itself is refused, not walked forever', async () => {
    await expectRefused(root, shared('link-cycle.nwb'), [/\/a\/loop\/loop/, /hard-link cycle/]);
  });
  it('bad-index.nwb: an index claiming 10^12 spikes where 50 exist is refused by check and build', async () => {
    await expectRefused(root, shared('bad-index.nwb'), [/\/units\/spike_times_index\[\d+\]/, /past the end of its column \(length 50\)/]);
  });
  it('string-ids.nwb: read, with control characters escaped in every output', async () => {
    const ws = workspace(root, shared('string-ids.nwb'));
    const out = join(root, 'string-ids-site');
    const check = await runLacunaCapped(['check', '--workspace', ws]);
    const build = await runLacunaCapped(['build', '--workspace', ws, '--out', out]);
    expect(check.code, check.stderr).toBe(0);
    expect(build.code, build.stderr).toBe(0);
    const written = allText(out) + allText(join(ws, 'records')) + build.stdout + build.stderr + check.stderr;
    expect(written).not.toContain('\u001b'); // the README's payload carries ESC [31m
    expect(allText(out, /\.html$/)).not.toMatch(/<img src=x/); // and HTML, which pages must not render
    expect(allText(join(ws, 'records'))).toContain('\\\\u{1b}[31mRED'); // the escaped label, as JSON text
  });
});
