/**
 * Graph density and degrees with non-finite weights: such an entry is neither an edge nor a
 * non-edge, so it leaves the possible pairs and the degrees and is counted, instead of the whole
 * layer dropping out of graph density. Reference: numpy at test time (directed, no self-loops:
 * edges = #{|w| > tol} over finite off-diagonal entries; possible = #finite off-diagonal entries;
 * out-degree = row sums, in-degree = column sums of the edge mask). Layers are written as
 * safetensors by numpy (8-byte header length, JSON header, raw little-endian data).
 */
import { describe, expect, it } from 'vitest';
import { hasScipy, runPython, runPythonScript } from '../helpers/python.ts';
import { graphDensity } from '../../src/metrics/graph-density.ts';
import { weightsDataset } from './one-dataset.ts';

const REF = `
def ref(w, tol):
    w = np.array(w, dtype=float)
    n = w.shape[0]
    ok = np.isfinite(w) & ~np.eye(n, dtype=bool)
    e = ok & (np.abs(np.nan_to_num(w)) > tol)
    return {"edges": int(e.sum()), "possible": int(ok.sum()), "omitted": int((~np.isfinite(w) & ~np.eye(n, dtype=bool)).sum()),
            "out": e.sum(axis=1).tolist(), "in": e.sum(axis=0).tolist()}
`;

/** A seeded square matrix with NaN and ±Inf entries (some on the diagonal), as nested lists with null for NaN. */
const MAKE = `
rng = np.random.default_rng(3)
w = rng.normal(size=(9, 9)) * (rng.random((9, 9)) < 0.4)
w[1, 4] = np.nan; w[6, 2] = np.inf; w[3, 3] = np.nan; w[8, 0] = -np.inf
`;

describe.skipIf(!hasScipy)('graph density over defined entries (numpy)', () => {
  it("graphDensity(..., { nonFinite: 'omit' }) leaves non-finite entries out of the possible pairs and degrees", () => {
    const got = runPython<{ w: (number | string | null)[][]; ref: { edges: number; possible: number; omitted: number; out: number[]; in: number[] } }>(
      MAKE + REF + `enc = [[None if np.isnan(v) else ("inf" if v == np.inf else ("-inf" if v == -np.inf else float(v))) for v in r] for r in w]\nprint(json.dumps({"w": enc, "ref": ref(w, 0)}))`,
    );
    const data = Float64Array.from(got.w.flat(), (v) => (v === null ? NaN : v === 'inf' ? Infinity : v === '-inf' ? -Infinity : (v as number)));
    expect(() => graphDensity({ rows: 9, cols: 9, data })).toThrow(RangeError); // the default still refuses
    const g = graphDensity({ rows: 9, cols: 9, data }, { nonFinite: 'omit' });
    expect([g.edges, g.possible, g.omitted]).toEqual([got.ref.edges, got.ref.possible, got.ref.omitted]);
    expect(g.density).toBeCloseTo(got.ref.edges / got.ref.possible, 15);
    expect(Array.from(g.outDegree)).toEqual(got.ref.out);
    expect(Array.from(g.inDegree)).toEqual(got.ref.in);
  });

  it('a weights audit with one NaN in a square layer keeps that layer in graph density, and says so', async () => {
    const d = await weightsDataset('w.safetensors', (path) => {
      runPythonScript(`
import json, struct, sys
import numpy as np
rng = np.random.default_rng(8)
a = (rng.normal(size=(12, 12)) * (rng.random((12, 12)) < 0.3)).astype('<f4')
a[2, 7] = np.nan
b = (rng.normal(size=(12, 12)) * (rng.random((12, 12)) < 0.5)).astype('<f4')
blobs, header, off = [], {}, 0
for name, t in (("l1.weight", a), ("l2.weight", b)):
    raw = t.tobytes(); header[name] = {"dtype": "F32", "shape": list(t.shape), "data_offsets": [off, off + len(raw)]}; off += len(raw); blobs.append(raw)
h = json.dumps(header).encode()
open(sys.argv[1], "wb").write(struct.pack("<Q", len(h)) + h + b"".join(blobs))
`, [path]);
    });
    const ref = runPython<{ edges: number; possible: number; omitted: number; l1: number }>(
      REF + `
rng = np.random.default_rng(8)
a = (rng.normal(size=(12, 12)) * (rng.random((12, 12)) < 0.3)).astype('<f4')
a[2, 7] = np.nan
b = (rng.normal(size=(12, 12)) * (rng.random((12, 12)) < 0.5)).astype('<f4')
ra, rb = ref(a, 0), ref(b, 0)
print(json.dumps({"edges": ra["edges"] + rb["edges"], "possible": ra["possible"] + rb["possible"], "omitted": ra["omitted"] + rb["omitted"], "l1": ra["edges"] / ra["possible"]}))`,
    );
    const gd = d.measures.graph_density!;
    expect(gd.estimate).toBeCloseTo(ref.edges / ref.possible, 15);
    expect([gd.n, gd.excluded]).toEqual([ref.possible, ref.omitted]);
    const chart = d.chartData as { layers: { name: string; graphDensity: number | null }[] };
    expect(chart.layers.find((l) => l.name === 'l1.weight')!.graphDensity).toBeCloseTo(ref.l1, 15);
    const f = d.findings.find((x) => x.code === 'non-finite-weights')!;
    expect(f.message).toMatch(/neither an edge nor a non-edge/);
  });
});
