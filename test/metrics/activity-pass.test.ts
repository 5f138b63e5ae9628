/**
 * The fused activity pass against numpy/scipy (live), against itself under different block
 * sizes and worker splits, and against hand-worked negatives policies.
 */
import { describe, expect, it } from 'vitest';
import { hasScipy, runPython } from '../helpers/python.ts';
import { createActivityPass, finishActivityPass, type ActivityPassOptions, type ActivityPassResult } from '../../src/metrics/activity-pass.ts';
import type { NegativesPolicy } from '../../src/manifest/types.ts';
import { hashRow, scanHashHistFloat32 } from '../../src/metrics/activity-pass-hash.ts';
import { newRowScan } from '../../src/metrics/activity-pass-row.ts';
import { blocksOf, close, mixedMatrix, mulberry32, poisson, runPass, toArrays } from './activity-pass-fixtures.ts';
import { giniIndex } from '../../src/metrics/gini.ts';
import { COUNTING_RANGE_LIMIT } from '../../src/metrics/activity-pass-gini.ts';
import { excessKurtosis } from '../../src/metrics/kurtosis.ts';

// Reference per unit and per bin computed by numpy/scipy from the same matrix: scipy.stats.skew
// and scipy.stats.kurtosis with bias=True (g1, g2), numpy formulas for a, S, Hoyer and the
// Hurley & Rickard Gini on the sorted |y|. The conventions (silent units left out of lifetime
// measures, kurtosis withheld below min_nonzero, refuse/rectify/shift) are restated in Python.
const PY = `
import scipy.stats as ss
U, B = inp['units'], inp['bins']
vals = np.array(inp['values'], dtype=float).reshape(U, B)
code = np.array(inp['code']).reshape(U, B)
x = vals.copy(); x[code == 1] = np.nan; x[code == 2] = np.inf; x[code == 3] = -np.inf
defined = code == 0
def f(v): return None if v is None or not np.isfinite(v) else float(v)
res = []
for cfg in inp['configs']:
    tol, pol, mnz = cfg['tol'], cfg['policy'], cfg['minNonzero']
    keys = ['mean','S','a','H','G','skew','kurt','min','max','defined','nan','inf','missing','neg','nz','atMax','changed']
    unit = {k: [] for k in keys}
    Y = np.zeros((U, B)); use = np.zeros((U, B), bool)
    for u in range(U):
        d = defined[u]; v = vals[u][d]; n = len(v)
        unit['defined'].append(int(n)); unit['nan'].append(int((code[u] == 1).sum()))
        unit['inf'].append(int(((code[u] == 2) | (code[u] == 3)).sum())); unit['missing'].append(int((code[u] == 4).sum()))
        neg = int((v < 0).sum()); nz = int((np.abs(v) > tol).sum())
        unit['neg'].append(neg); unit['nz'].append(nz)
        if n == 0:
            for k in ['mean','S','a','H','G','skew','kurt','min','max']: unit[k].append(None)
            unit['atMax'].append(0); unit['changed'].append(0); continue
        unit['mean'].append(f(v.mean())); unit['min'].append(f(v.min())); unit['max'].append(f(v.max()))
        unit['atMax'].append(int((v == v.max()).sum()))
        m2 = np.mean((v - v.mean())**2)
        unit['skew'].append(f(ss.skew(v, bias=True)) if m2 > 0 else None)
        unit['kurt'].append(f(ss.kurtosis(v, bias=True, fisher=True)) if m2 > 0 and nz >= mnz else None)
        refused = pol == 'refuse' and neg > 0
        if pol == 'rectify': y = np.maximum(v, 0); ch = neg
        elif pol == 'shift' and neg > 0: y = v - v.min(); ch = n
        else: y = v; ch = 0
        unit['changed'].append(int(ch))
        if not refused:
            Y[u][d] = y; use[u][d] = True
        S = a = H = G = None
        if not refused and nz > 0:
            sq = float((y**2).sum()); l1 = float(np.abs(y).sum())
            if sq > 0:
                a = (y.mean()**2) / (sq / n)
                if n >= 2:
                    S = (1 - a) / (1 - 1 / n)
                    H = (np.sqrt(n) - l1 / np.sqrt(sq)) / (np.sqrt(n) - 1)
            if l1 > 0:
                c = np.sort(np.abs(y)); k = np.arange(1, n + 1)
                G = 1 - 2 * np.sum((c / l1) * ((n - k + 0.5) / n))
        unit['S'].append(f(S)); unit['a'].append(f(a)); unit['H'].append(f(H)); unit['G'].append(f(G))
    bins = {'S': [], 'density': [], 'defined': [], 'densityDefined': [], 'active': [], 'neg': []}
    for j in range(B):
        s = Y[use[:, j], j]; n = len(s)
        bins['defined'].append(int(n))
        # density: raw values of every unit defined in the bin, whatever the policy
        raw = vals[defined[:, j], j]; nd = len(raw)
        bins['densityDefined'].append(int(nd)); bins['active'].append(int((np.abs(raw) > tol).sum()))
        bins['neg'].append(int(((vals[:, j] < 0) & defined[:, j]).sum()))
        bins['density'].append(f(bins['active'][-1] / nd) if nd > 0 else None)
        sq = float((s**2).sum())
        bins['S'].append(f((1 - (s.mean()**2) / (sq / n)) / (1 - 1 / n)) if n >= 2 and sq > 0 else None)
    res.append({'unit': unit, 'bin': bins})
print(json.dumps(res))
`;

type PyUnit = Record<'mean' | 'S' | 'a' | 'H' | 'G' | 'skew' | 'kurt' | 'min' | 'max', (number | null)[]> &
  Record<'defined' | 'nan' | 'inf' | 'missing' | 'neg' | 'nz' | 'atMax' | 'changed', number[]>;
type PyBin = Record<'S' | 'density', (number | null)[]> & Record<'defined' | 'densityDefined' | 'active' | 'neg', number[]>;

function mismatches(r: ActivityPassResult, ref: { unit: PyUnit; bin: PyBin }, rel: number): string[] {
  const bad: string[] = [];
  const floatPairs: [string, Float64Array, (number | null)[]][] = [
    ['mean', r.unit.mean, ref.unit.mean], ['lifetimeSparseness', r.unit.lifetimeSparseness, ref.unit.S],
    ['activityRatio', r.unit.activityRatio, ref.unit.a], ['hoyer', r.unit.hoyer, ref.unit.H], ['gini', r.unit.gini, ref.unit.G],
    ['skewness', r.unit.skewness, ref.unit.skew], ['kurtosis', r.unit.kurtosis, ref.unit.kurt],
    ['min', r.unit.min, ref.unit.min], ['max', r.unit.max, ref.unit.max],
    ['populationSparseness', r.bin.populationSparseness, ref.bin.S], ['density', r.bin.density, ref.bin.density],
  ];
  for (const [name, got, want] of floatPairs) {
    for (let i = 0; i < want.length; i++) if (!close(got[i], want[i], rel)) bad.push(`${name}[${i}]: ${got[i]} vs ${want[i]}`);
  }
  const intPairs: [string, Int32Array, number[]][] = [
    ['defined', r.unit.defined, ref.unit.defined], ['nan', r.unit.nan, ref.unit.nan], ['infinite', r.unit.infinite, ref.unit.inf],
    ['missing', r.unit.missing, ref.unit.missing], ['negative', r.unit.negative, ref.unit.neg], ['nonzero', r.unit.nonzero, ref.unit.nz],
    ['atMax', r.unit.atMax, ref.unit.atMax], ['changed', r.unit.changed, ref.unit.changed],
    ['bin.defined', r.bin.defined, ref.bin.defined], ['bin.densityDefined', r.bin.densityDefined, ref.bin.densityDefined], ['bin.active', r.bin.active, ref.bin.active], ['bin.negative', r.bin.negative, ref.bin.neg],
  ];
  for (const [name, got, want] of intPairs) {
    for (let i = 0; i < want.length; i++) if (got[i] !== want[i]) bad.push(`${name}[${i}]: ${got[i]} vs ${want[i]}`);
  }
  return bad;
}

const CONFIGS: { tol: number; policy: NegativesPolicy; minNonzero: number }[] = [
  { tol: 0, policy: 'keep', minNonzero: 3 },
  { tol: 0, policy: 'rectify', minNonzero: 3 },
  { tol: 0, policy: 'shift', minNonzero: 3 },
  { tol: 0, policy: 'refuse', minNonzero: 3 },
  { tol: 0.5, policy: 'keep', minNonzero: 20 },
];

describe.skipIf(!hasScipy)('activity pass vs numpy/scipy (live)', () => {
  const m = mixedMatrix();
  // float32 runs: the matrix is rounded through float32 first, so numpy sees exactly the values the pass sees.
  const m32 = { ...m, values: m.values.map((v) => Math.fround(v)) };
  const refs = {
    f64: runPython<{ unit: PyUnit; bin: PyBin }[]>(PY, { ...m, configs: CONFIGS }),
    f32: runPython<{ unit: PyUnit; bin: PyBin }[]>(PY, { ...m32, configs: CONFIGS }),
  };
  for (const [i, cfg] of CONFIGS.entries()) {
    for (const type of ['f64', 'f32'] as const) {
      it(`every per-unit and per-bin value, ${cfg.policy}, tol ${cfg.tol}, ${type}`, () => {
        const opts: ActivityPassOptions = { zeroTolerance: cfg.tol, negatives: cfg.policy, events: null, minNonzero: cfg.minNonzero };
        const r = runPass(type === 'f32' ? m32 : m, opts, type);
        expect(mismatches(r, refs[type][i], 1e-12)).toEqual([]);
      });
    }
  }
});

describe('block size and worker splits do not change results', () => {
  const m = mixedMatrix(11);
  const opts: ActivityPassOptions = { zeroTolerance: 0, negatives: 'rectify', events: { k: 3 }, minNonzero: 3 };
  const units = (r: ActivityPassResult) => ({ ...r.unit });
  const whole = runPass(m, opts, 'f64', m.units);

  // Derived from the design: per-unit values depend only on the row, and per-bin sums are
  // added in unit order whatever the block size, so results must be bit-identical.
  it('blocks of 1 and 7 units equal one block of all units, bit for bit', () => {
    for (const size of [1, 7]) {
      const r = runPass(m, opts, 'f64', size);
      expect(units(r)).toEqual(units(whole));
      expect(r.bin).toEqual(whole.bin);
      expect(r.events).toEqual(whole.events);
      expect(r.totals).toEqual(whole.totals);
      expect(r.duplicates).toEqual(whole.duplicates);
    }
  });

  it('two workers over disjoint halves, merged, equal the whole (per-bin sums to 1e-13)', () => {
    const { data, mask } = toArrays(m, 'f64');
    const half = 17;
    const a = createActivityPass({ units: m.units, bins: m.bins }, opts);
    const b = createActivityPass({ units: m.units, bins: m.bins }, opts);
    for (const blk of blocksOf(data, mask, m.units, m.bins, 5, 0, half)) a.addBlock(blk);
    for (const blk of blocksOf(data, mask, m.units, m.bins, 5, half, m.units)) b.addBlock(blk);
    // Worker states travel by structured clone (postMessage): the clone must be enough.
    const merged = finishActivityPass([structuredClone(b.state()), structuredClone(a.state())]);
    expect(units(merged)).toEqual(units(whole));
    expect(merged.totals).toEqual(whole.totals);
    expect(merged.duplicates).toEqual(whole.duplicates);
    expect(merged.bin.defined).toEqual(whole.bin.defined);
    expect(merged.bin.active).toEqual(whole.bin.active);
    expect(merged.events?.binEvents).toEqual(whole.events?.binEvents);
    const off: string[] = [];
    for (let j = 0; j < m.bins; j++) {
      if (!close(merged.bin.populationSparseness[j], Number.isNaN(whole.bin.populationSparseness[j]) ? null : whole.bin.populationSparseness[j], 1e-13)) off.push(`S[${j}]`);
      if (!close(merged.bin.sum[j], whole.bin.sum[j], 1e-13)) off.push(`sum[${j}]`);
    }
    expect(off).toEqual([]);
  });

  it('a unit missing from the merged states, or in both, is an internal error', () => {
    const { data, mask } = toArrays(m, 'f64');
    const a = createActivityPass({ units: m.units, bins: m.bins }, opts);
    for (const blk of blocksOf(data, mask, m.units, m.bins, 5, 0, 10)) a.addBlock(blk);
    expect(() => finishActivityPass(a.state())).toThrow(/unit 10 was never added/);
    expect(() => finishActivityPass([a.state(), a.state()])).toThrow(/unit 0 is in two merged states/);
    expect(() => a.addBlock(blocksOf(data, mask, m.units, m.bins, 1, 3, 4).next().value!)).toThrow(/unit 3 added twice/);
  });
});

describe('row hash', () => {
  // Self-consistency (no outside source): the fused float32 scan+hash loop must give the same
  // hashes as the general word loop, for even and odd row lengths, or duplicates would be missed
  // between a row with NaN (general loop) and one without.
  it('fused float32 scan+hash equals the word-by-word hash', () => {
    for (const bins of [1, 5, 6, 301]) {
      const data = Float32Array.from({ length: bins * 2 }, (_, i) => ((i * 7919) % 13) - 3);
      const words = new Uint32Array(data.buffer);
      const a = new Uint32Array(2), b = new Uint32Array(2);
      hashRow(words, bins, bins, undefined, bins, bins, a);
      const hist = new Int32Array(COUNTING_RANGE_LIMIT + 1);
      expect(scanHashHistFloat32(data, words, bins, bins, newRowScan(), b, hist)).toBe(0); // finite; negatives stop the counting
      expect(hist.every((h) => h === 0)).toBe(true);
      expect(Array.from(b)).toEqual(Array.from(a));
      // and a one-bit change changes both hashes
      const c = new Uint32Array(2);
      words[bins + (bins >> 1)] ^= 1;
      hashRow(words, bins, bins, undefined, bins, bins, c);
      expect(c[0]).not.toBe(a[0]);
      expect(c[1]).not.toBe(a[1]);
      // a row of counts (the counting path) hashes the same way too
      const counts = Float32Array.from({ length: bins }, (_, i) => (i * 7919) % 13);
      const cw = new Uint32Array(counts.buffer);
      const d = new Uint32Array(2), e = new Uint32Array(2);
      hashRow(cw, 0, bins, undefined, 0, bins, d);
      expect(scanHashHistFloat32(counts, cw, 0, bins, newRowScan(), e, hist)).toBe(1);
      expect(Array.from(e)).toEqual(Array.from(d));
      hist.fill(0);
    }
  });

  it('a float32 duplicate of a row holding NaN is found (general loop on both)', () => {
    const bins = 9;
    const data = new Float32Array(3 * bins).map((_, i) => (i * 37) % 11);
    data[4] = NaN;
    data.copyWithin(2 * bins, 0, bins);
    const pass = createActivityPass({ units: 3, bins }, { zeroTolerance: 0, negatives: 'keep', events: null, minNonzero: 0 });
    pass.addBlock({ unitStart: 0, units: 3, bins, data });
    expect(finishActivityPass(pass.state()).duplicates).toEqual([[0, 2]]);
  });
});

describe('value histogram counted by the float32 scan', () => {
  // Integer float32 rows are counted into the Gini histogram during the scan (its counts also
  // give the moments). Where the counting stops part-way (a non-integer, a value above the
  // counting range, a negative, NaN), the counts must be cleared, or they would leak into the
  // next row. Each such row is followed by a plain integer row. References: the stand-alone
  // giniIndex and excessKurtosis (Hurley & Rickard 2009; Joanes & Gill 1998; themselves checked
  // against published values and scipy in their own tests), and the float64 pass, which never
  // counts during the scan.
  const bins = 101; // odd: the scan's last, unpaired cell is counted on its own
  const rand = mulberry32(2027);
  const intRow = () => Array.from({ length: bins }, () => poisson(rand, 1.5));
  const stopAt = (v: number, at: number) => intRow().map((x, j) => (j === at ? v : x));
  const rows: number[][] = [
    intRow(),
    stopAt(0.5, 60), intRow(),
    stopAt(70_000, 99), intRow(),
    stopAt(2.25, bins - 1), intRow(),
    stopAt(-1, 3), intRow(),
    stopAt(NaN, 40), intRow(),
    new Array(bins).fill(0), intRow(),
    stopAt(300, 0), intRow(), // range > 2 × bins: counted, then not used (Gini sorts)
  ];
  const m = { units: rows.length, bins, values: rows.flat().map((v) => (Number.isNaN(v) ? 0 : v)), code: rows.flat().map((v) => (Number.isNaN(v) ? 1 : 0)) };
  const opts: ActivityPassOptions = { zeroTolerance: 0, negatives: 'keep', events: null, minNonzero: 1 };

  it('each row matches the stand-alone measures, and the float64 pass bit for bit', () => {
    const f32 = runPass(m, opts, 'f32', 3);
    const f64 = runPass(m, opts, 'f64', 3);
    rows.forEach((row, u) => {
      const defined = row.filter((v) => !Number.isNaN(v));
      const g = defined.some((v) => v < 0) ? null : giniIndex(defined); // (negatives kept: Gini of |y|)
      if (g !== null) expect(close(f32.unit.gini[u], g), `gini, row ${u}`).toBe(true);
      const k = excessKurtosis(defined);
      expect(close(f32.unit.kurtosis[u], k), `kurtosis, row ${u}`).toBe(true);
      for (const key of ['gini', 'kurtosis', 'skewness', 'lifetimeSparseness', 'hoyer'] as const) {
        expect(Object.is(f32.unit[key][u], f64.unit[key][u]) || f32.unit[key][u] === f64.unit[key][u], `${key}, row ${u}`).toBe(true);
      }
    });
  });
});
