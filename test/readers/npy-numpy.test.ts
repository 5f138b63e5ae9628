/**
 * `.npy` / `.npz` files written by numpy itself (np.save, np.lib.format.write_array with versions
 * 2.0 and 3.0, np.savez, np.savez_compressed) read back by our readers. Source of truth: the
 * values numpy wrote, passed back as JSON (every value chosen to be exactly representable in JSON,
 * i.e. |integers| < 2^53 and floats printed by Python's shortest round-trip repr).
 */
import { describe, it, expect, afterAll } from 'vitest';
import { join } from 'node:path';
import { hasScipy, runPythonScript } from '../helpers/python.ts';
import { openActivityFile, openDataset } from '../../src/readers/index.ts';
import { openNpyFile, npyActivityFile } from '../../src/readers/npy.ts';
import { dataset, readAll, tempDir, firstDifference } from './helpers.ts';

const DTYPES = ['f2', 'f4', 'f8', 'i1', 'i2', 'i4', 'i8', 'u1', 'u2', 'u4', 'u8', 'b1'];

interface Fixture { file: string; shape: number[]; values: number[]; dtype: string; fortran: boolean }

describe.skipIf(!hasScipy)('npy and npz written by numpy', () => {
  const tmp = tempDir();
  afterAll(tmp.cleanup);
  // Python writes each array and prints its C-order values (as Python floats) in JSON.
  const fixtures = JSON.parse(runPythonScript(`
import json, sys, numpy as np
out = []
rng = np.random.default_rng(7)
root = sys.argv[1]
def vals(code, shape):
    k = code[0]; n = int(code[1:])
    if k == 'f': return rng.normal(0, 50, shape)
    if k == 'b': return rng.integers(0, 2, shape)
    info = np.iinfo(code)
    lo, hi = max(info.min, -2**52), min(info.max, 2**52)
    a = rng.integers(lo, hi, shape, endpoint=True)
    a.flat[0] = lo; a.flat[1] = hi
    return a
for code in ${JSON.stringify(DTYPES)}:
    orders = ['|'] if code[1] == '1' else ['<', '>']
    for bo in orders:
        for fortran in (False, True):
            a = vals(code, (3, 5)).astype(np.dtype(code).newbyteorder(bo if bo != '|' else '='))
            a = np.asfortranarray(a) if fortran else np.ascontiguousarray(a)
            name = f"{root}/{code}{'be' if bo == '>' else 'le'}{'F' if fortran else 'C'}.npy"
            np.save(name, a)
            out.append({'file': name, 'shape': [3, 5], 'values': [float(x) for x in a.astype(np.float64).ravel(order='C')], 'dtype': a.dtype.str, 'fortran': fortran})
for ver in ((2, 0), (3, 0)):
    a = rng.normal(size=(4, 6)).astype('<f4')
    name = f"{root}/v{ver[0]}.npy"
    with open(name, 'wb') as f:
        np.lib.format.write_array(f, a, version=ver)
    out.append({'file': name, 'shape': [4, 6], 'values': [float(x) for x in a.ravel()], 'dtype': '<f4', 'fortran': False})
a1 = rng.normal(size=7)
np.save(f"{root}/one.npy", a1)
out.append({'file': f"{root}/one.npy", 'shape': [7], 'values': [float(x) for x in a1], 'dtype': '<f8', 'fortran': False})
m1 = rng.integers(-9, 9, (3, 4)).astype('<i2'); m2 = rng.normal(size=(2, 8))
np.savez(f"{root}/stored.npz", first=m1, second=m2)
np.savez_compressed(f"{root}/deflated.npz", first=m1, second=m2)
z = np.zeros((50, 400), dtype='<f8'); z[3, 7] = 2.5
np.savez_compressed(f"{root}/zeros.npz", z)
out.append({'file': 'members', 'shape': [3, 4], 'values': [float(x) for x in m1.ravel()], 'dtype': '<i2', 'fortran': False})
out.append({'file': 'members', 'shape': [2, 8], 'values': [float(x) for x in m2.ravel()], 'dtype': '<f8', 'fortran': False})
print(json.dumps(out))
`, [tmp.dir])) as Fixture[];

  const arrays = fixtures.filter((f) => f.file !== 'members');

  it('reads every dtype, byte order and memory order exactly, as units-by-bins and bins-by-units', async () => {
    // multi-byte: 9 dtypes × 2 byte orders × C/F; 1-byte (i1 u1 b1): 3 × C/F; versions 2.0, 3.0; one 1-D.
    expect(arrays.length).toBe(9 * 2 * 2 + 3 * 2 + 2 + 1);
    expect(arrays.filter((f) => f.dtype.startsWith('>')).length).toBe(18); // numpy really wrote big-endian files
    for (const fx of arrays) {
      const ds = dataset(tmp.dir, [fx.file], 'npy');
      const [r, c] = fx.shape.length === 2 ? fx.shape : [1, fx.shape[0]];
      const got = await readAll(await openDataset(ds, { kind: 'activity', binMs: 10, workspaceRoot: tmp.dir }));
      expect(firstDifference(got, fx.values), `${fx.file}`).toBe(-1);
      if (fx.shape.length === 2) {
        const t = await readAll(await openDataset({ ...ds, layout: 'bins-by-units' }, { kind: 'activity', binMs: 10, workspaceRoot: tmp.dir }));
        // bins-by-units: unit u is column u of numpy's array, so t[u][b] = values[b][u].
        const want = new Float64Array(r * c);
        for (let b = 0; b < r; b++) for (let u = 0; u < c; u++) want[u * r + b] = fx.values[b * c + u];
        expect(firstDifference(t, want), `${fx.file} bins-by-units`).toBe(-1);
      }
    }
  });

  it('picks float64 blocks for 4- and 8-byte integers and f8, float32 for the rest (dtype.ts)', async () => {
    for (const fx of arrays.filter((f) => f.shape.length === 2 && !f.file.includes('/v'))) {
      const f = await openActivityFile(fx.file, 'x.npy', dataset(tmp.dir, [fx.file], 'npy'), { binMs: 1 });
      const wide = /^[<>|=](f8|i8|u8|i4|u4)$/.test(fx.dtype);
      expect((f as unknown as { precision: string }).precision, fx.dtype).toBe(wide ? 'f64' : 'f32');
      await f.close();
    }
  });

  it('gathers strided units correctly with a scratch buffer smaller than one row', async () => {
    // Fortran order read as units-by-bins is strided; 16-byte scratch forces many partial reads.
    for (const fx of arrays.filter((f) => f.fortran && f.dtype.endsWith('f8'))) {
      const { src, header } = await openNpyFile(fx.file, 'x.npy');
      const f = npyActivityFile(src, header, { path: fx.file, relPath: 'x.npy', layout: 'units-by-bins', scratchBytes: 16 });
      const out = new Float64Array(2 * 9).fill(-1);
      await f.readUnits(1, 2, out, 9, 2); // units 1..2 into columns 2..6 of a 9-column block
      for (let u = 0; u < 2; u++) {
        for (let b = 0; b < 5; b++) expect(out[u * 9 + 2 + b]).toBe(fx.values[(u + 1) * 5 + b]);
        expect(out[u * 9]).toBe(-1); // columns outside this file's range untouched
      }
      await f.close();
    }
  });

  it('reads stored (savez) and deflated (savez_compressed) members, chosen by name', async () => {
    const members = fixtures.filter((f) => f.file === 'members');
    for (const file of ['stored.npz', 'deflated.npz']) {
      for (const [name, fx] of [['first', members[0]], ['second.npy', members[1]]] as const) {
        const ds = dataset(tmp.dir, [join(tmp.dir, file)], 'npz', { member: name });
        const got = await readAll(await openDataset(ds, { kind: 'activity', binMs: 10, workspaceRoot: tmp.dir }), 64);
        expect(firstDifference(got, fx.values), `${file} ${name}`).toBe(-1);
      }
      const w = await openDataset(dataset(tmp.dir, [join(tmp.dir, file)], 'npz'), { kind: 'weights', binMs: 10, workspaceRoot: tmp.dir });
      if (w.kind !== 'weights') throw new Error('expected weights');
      expect(w.layers).toEqual([{ name: 'first', shape: [3, 4] }, { name: 'second', shape: [2, 8] }]);
      const tensors = [];
      for await (const t of w.tensors()) tensors.push(t);
      expect(firstDifference(tensors[0].data, members[0].values)).toBe(-1);
      expect(firstDifference(tensors[1].data, members[1].values)).toBe(-1);
    }
  });

  it('reads a deflated member with a ratio near 1000:1 when its .npy header accounts for every byte', async () => {
    // numpy compresses 160,000 zero bytes far beyond 100:1; the header is valid, so it is accepted.
    const ds = dataset(tmp.dir, [join(tmp.dir, 'zeros.npz')], 'npz', { layout: 'bins-by-units' });
    const src = await openDataset(ds, { kind: 'activity', binMs: 10, workspaceRoot: tmp.dir });
    const got = await readAll(src, 4000); // strided layout, small blocks: the stream restarts per block
    expect(got.length).toBe(20000);
    // numpy's z[3, 7] = 2.5 is bin 3 of unit 7 in bins-by-units.
    expect(got[7 * 50 + 3]).toBe(2.5);
    expect(got.reduce((a, b) => a + b, 0)).toBe(2.5);
  });

  it('refuses an .npz with several members and no `member`', async () => {
    const ds = dataset(tmp.dir, [join(tmp.dir, 'stored.npz')], 'npz');
    await expect(openDataset(ds, { kind: 'activity', binMs: 10, workspaceRoot: tmp.dir })).rejects.toThrow(/2 members \(first, second\)/);
  });
});
