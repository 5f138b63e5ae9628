/**
 * The fused one-pass activity engine: every per-unit and per-bin measure of an activity
 * matrix from one stream of `UnitBlock`s (whole units, all bins each), in memory O(units + bins).
 *
 *   1. `createActivityPass(shape, options)` → { addBlock, state }
 *   2. for each block, for each row (unit):
 *        a. scanRow: counts (defined / NaN / ±Inf / missing / negative), Σx, Σ|x|, Σmax(0,x),
 *           min, max                                                     (activity-pass-row.ts)
 *        b. hashRow: two 32-bit hashes of the row's float bits           (duplicate units)
 *        c. rowMoments: Σd, Σd², Σd³, Σd⁴ about the raw mean (two-pass, corrected by Σd),
 *           nonzero and at-max counts (from the Gini histogram for integer rows)
 *        d. rowGini: histogram (integer rows, small range) or sorted copy (activity-pass-gini.ts)
 *           (skipped for silent and refused units)
 *        e. rowEvents (optional): median, MAD, event bins                  (activity-pass-events.ts)
 *      then, for the whole block, tile by tile of bins, the policy-transformed y added to the
 *      per-bin Σy, Σy² and active count, in unit order                      (activity-pass-bins.ts)
 *   3. `finishActivityPass(state | states[])`: merge disjoint unit ranges, then per-bin
 *      population sparseness and density, duplicates, totals               (activity-pass-finish.ts)
 * Density is of the raw values against the zero tolerance under every negatives policy (refused
 * units included); the policy applies to the measures that assume non-negative responses.
 *
 * Per unit (NaN = undefined), with n defined cells, mean x̄ and m_r = Σ(x − x̄)^r / n:
 * - mean x̄ (raw); skewness g1 = m3 / m2^{3/2}; excess kurtosis g2 = m4 / m2² − 3 (biased
 *   moment estimators, Joanes & Gill 1998, The Statistician 47:183–189; raw values whatever
 *   the negatives policy; NaN when m2 = 0, and g2 NaN when fewer than `minNonzero` nonzero cells);
 * - on y (the negatives policy applied, see `ActivityPassOptions.negatives`), ȳ, m2y = var(y):
 *   activity ratio a = ȳ² / (m2y + ȳ²) (= (Σy/n)² / (Σy²/n); Treves & Rolls 1991, Network
 *   2:371–397), lifetime sparseness S = (1 − a)/(1 − 1/n) (Vinje & Gallant 2000, Science
 *   287:1273–1276; the centred form keeps S = 0 exact for constant rows), Hoyer
 *   H = (√n − ‖y‖₁/‖y‖₂)/(√n − 1) (Hoyer 2004, JMLR 5:1457–1469) and Gini (Hurley & Rickard 2009);
 *   a undefined when Σy² = 0 (all zero: 0/0), S and H also when n < 2.
 * Zeros are ordinary values; NaN, ±Infinity and missing cells are excluded from every measure
 * and counted. Silent units (no |x| > zeroTolerance) get no lifetime measures; constant units
 * get S = 0 and no skewness or kurtosis (m2 = 0).
 * Cost: two passes over each row for float32 integer rows (scan + hash + Gini histogram, whose
 * counts give the moments; per-bin sums), three or four otherwise (separate hash; moments; Gini
 * by histogram or sorting, O(bins log bins));
 * events add two quickselects and a pass. Memory: the state (≈ 100 B a unit, ≈ 40 B a bin) and
 * scratch of 8 B a bin; no allocation per block once the block's 32-bit view is cached.
 */
import type { Numeric, UnitBlock } from '../types.ts';
import { InternalError } from '../errors.ts';
import { checkPassOptions, emptyPassState, type ActivityPassOptions, type ActivityPassState } from './activity-pass-types.ts';
import { correctMoments, countBinNegatives, rowMoments, newRowMoments, newRowScan, scanRow, type RowMode } from './activity-pass-row.ts';
import { hashRow, scanHashHistFloat32 } from './activity-pass-hash.ts';
import { COUNTING_RANGE_LIMIT, giniFromHistogram, newGiniScratch, rowGini, zeroedHistogram } from './activity-pass-gini.ts';
import { rowEvents, type RowEvents } from './activity-pass-events.ts';
import { accumulateBins, ensureBlockRows, newBlockRows } from './activity-pass-bins.ts';

export type { ActivityPassOptions, ActivityPassState, ActivityPassResult } from './activity-pass-types.ts';
export { finishActivityPass } from './activity-pass-finish.ts';

export interface ActivityPass {
  /** Add a block of whole units. Blocks may come in any order; each unit exactly once. */
  addBlock(block: UnitBlock): void;
  /** The accumulated state (the live arrays, not a copy: stop adding blocks once taken). */
  state(): ActivityPassState;
}

export function createActivityPass(shape: { units: number; bins: number }, options: ActivityPassOptions): ActivityPass {
  const opts = checkPassOptions(shape, options);
  const { units, bins } = shape;
  const st = emptyPassState(units, bins, opts);
  const scan = newRowScan();
  const mom = newRowMoments();
  const gini = newGiniScratch(bins);
  const evScratch = new Float64Array(opts.events ? bins : 0);
  const evOut: RowEvents = { median: NaN, robustSd: NaN, count: -1 };
  const hash = new Uint32Array(2);
  const acc = { partialDefined: st.binPartialDefined, sum: st.binSum, sumSq: st.binSumSq, active: st.binActive, refusedDefined: st.binRefusedDefined };
  const tol = opts.zeroTolerance;
  const policy = opts.negatives;
  let rows = newBlockRows(64);
  let viewOf: Numeric | null = null;
  let words: Uint32Array = new Uint32Array(0);
  // Counts of a Float32 row's values, filled by the scan itself (all zero between rows).
  let scanHist: Int32Array | null = null;

  function addBlock(block: UnitBlock): void {
    const { unitStart, units: count, data, missing: mask } = block;
    if (block.bins !== bins) throw new InternalError(`activity pass: block has ${block.bins} bins, the dataset ${bins}`);
    if (!Number.isInteger(unitStart) || unitStart < 0 || !Number.isInteger(count) || count < 0 || unitStart + count > units) {
      throw new InternalError(`activity pass: block units [${unitStart}, ${unitStart + count}) outside [0, ${units})`);
    }
    if (data.length < count * bins || (mask !== undefined && mask.length < count * bins)) {
      throw new InternalError(`activity pass: block data shorter than ${count} × ${bins}`);
    }
    if (viewOf !== data || words.buffer !== data.buffer || words.byteOffset !== data.byteOffset) {
      words = new Uint32Array(data.buffer, data.byteOffset, data.length * (data.BYTES_PER_ELEMENT / 4));
      viewOf = data;
    }
    const wpc = data.BYTES_PER_ELEMENT / 4;
    rows = ensureBlockRows(rows, count);
    for (let r = 0; r < count; r++) {
      const u = unitStart + r;
      if (st.seen[u] !== 0) throw new InternalError(`activity pass: unit ${u} added twice`);
      st.seen[u] = 1;
      rows.mode[r] = 3; // adds nothing to the bins unless processRow says otherwise
      processRow(data, mask, r * bins, u, wpc, r);
    }
    // The per-bin sums of the whole block, tile by tile (activity-pass-bins.ts).
    accumulateBins(data, mask, count, bins, rows, tol, acc);
  }

  function processRow(data: Numeric, mask: Uint8Array | undefined, off: number, u: number, wpc: number, r: number): void {
    // Float32 without a mask: scan, hash and the value histogram in one loop (a row with NaN/±Inf
    // is then re-scanned). `counted`: every value is an integer in [0, COUNTING_RANGE_LIMIT] and
    // scanHist holds the row's counts (zeroed again below, once used).
    let counted = false;
    if (mask === undefined && data instanceof Float32Array) {
      scanHist ??= new Int32Array(COUNTING_RANGE_LIMIT + 1);
      const r = scanHashHistFloat32(data, words, off, bins, scan, hash, scanHist);
      if (r < 0) scanRow(data, mask, off, bins, scan);
      counted = r === 1;
    } else {
      hashRow(words, off * wpc, bins * wpc, mask, off, bins, hash);
      scanRow(data, mask, off, bins, scan);
    }
    st.hashA[u] = hash[0];
    st.hashB[u] = hash[1];
    const n = scan.n;
    st.defined[u] = n;
    st.nan[u] = scan.nan;
    st.infinite[u] = scan.infinite;
    st.missing[u] = scan.missing;
    st.negative[u] = scan.negative;
    if (n === 0) return; // nothing defined: every measure stays NaN (an empty unit; never `counted`)
    st.min[u] = scan.min;
    st.max[u] = scan.max;
    const clean = n === bins;
    const mean = scan.sum / n; // plain Σx / n; corrected after the moments loop

    // The negatives policy: mode, shift, ȳ and ‖y‖₁ of the row.
    const hasNeg = scan.negative > 0;
    let mode: RowMode = 0, shiftBy = 0, yMean = mean, l1 = scan.sumAbs, maxAbsY = Math.max(scan.max, -scan.min), changed = 0;
    if (hasNeg) {
      if (policy === 'rectify') {
        mode = 1; yMean = scan.sumPos / n; l1 = scan.sumPos; maxAbsY = Math.max(0, scan.max); changed = scan.negative;
      } else if (policy === 'shift') {
        shiftBy = scan.min; yMean = mean - shiftBy; maxAbsY = scan.max - shiftBy; changed = n; // l1 from the corrected mean, below
      } else if (policy === 'refuse') {
        mode = 2; st.refused[u] = 1;
      }
    }
    st.changed[u] = changed;
    // Integer rows ≥ 0 with a small range get their Gini histogram from the scan (Float32) or
    // from the moments loop; their moments then come from the histogram.
    const range = Math.ceil(scan.max);
    const useHist = clean && scan.min >= 0 && range <= COUNTING_RANGE_LIMIT && range <= 2 * n;
    if (counted && !useHist) scanHist!.fill(0, 0, range + 1);
    const filled = counted && useHist;
    const hist = filled ? scanHist : useHist ? zeroedHistogram(gini, range, bins) : null;
    rowMoments(data, mask, off, bins, clean, mean, scan.max, mode, yMean, tol, hist, mom, filled);
    const meanC = correctMoments(mom, mean, n);
    st.mean[u] = meanC;
    if (mode === 0) yMean = meanC - shiftBy;
    if (shiftBy !== 0) l1 = n * yMean; // Σ(x − min) = n·(x̄ − min), from the corrected mean
    rows.mode[r] = mode;
    rows.shift[r] = shiftBy;
    rows.clean[r] = clean ? 1 : 0;
    if (mode !== 2 && clean) st.fullRows++;
    if (hasNeg) countBinNegatives(data, mask, off, bins, st.binNegative);
    const nonzero = mom.nonzero;
    st.nonzero[u] = nonzero;
    st.atMax[u] = mom.atMax;
    st.silent[u] = nonzero === 0 ? 1 : 0;
    st.constant[u] = scan.min === scan.max && nonzero > 0 ? 1 : 0;

    const m2 = mom.s2 / n;
    if (m2 > 0) {
      st.skewness[u] = mom.s3 / n / (m2 * Math.sqrt(m2));
      if (nonzero >= opts.minNonzero) st.kurtosis[u] = mom.s4 / n / (m2 * m2) - 3;
    }
    // Silent units (no |x| > tol) are left out of the lifetime measures (findings count them).
    if (mode !== 2 && nonzero > 0) {
      const m2y = mode === 1 ? mom.s2y / n : m2;
      const q = m2y + yMean * yMean; // Σy²/n
      if (q > 0) {
        const a = (yMean * yMean) / q;
        st.activityRatio[u] = a;
        if (n >= 2) {
          st.lifetimeSparseness[u] = (m2y / q) * (n / (n - 1));
          const sn = Math.sqrt(n);
          st.hoyer[u] = (sn - l1 / Math.sqrt(n * q)) / (sn - 1);
        }
      }
      st.gini[u] = hist !== null && mom.histOk ? giniFromHistogram(hist, range, n, l1) : rowGini(data, mask, off, bins, n, l1, mode, shiftBy, maxAbsY, gini);
    }
    if (filled) scanHist!.fill(0, 0, range + 1);

    const ev = opts.events;
    if (ev !== null) {
      rowEvents(data, mask, off, bins, ev.k, ev.baselineBins, clean, evScratch, st.binEvents, st.binEventPartialDefined, evOut);
      st.eventMedian[u] = evOut.median;
      st.eventRobustSd[u] = evOut.robustSd;
      st.eventCount[u] = evOut.count;
      if (evOut.count >= 0 && clean) st.eventFullRows++;
    }
  }

  return { addBlock, state: () => st };
}
