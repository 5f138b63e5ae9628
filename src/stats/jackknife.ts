/**
 * Jackknife: delete-one (Quenouille 1956; Tukey 1958) and delete-one-block over
 * non-overlapping blocks (Künsch 1989, Ann. Statist. 17:1217–1241, §2; Lahiri 2003,
 * "Resampling Methods for Dependent Data", Springer, ch. 3 — the block jackknife for series).
 *
 * With h leave-out replicates θ̂₍ⱼ₎ (j = 1…h), θ̄ = mean of them, dⱼ = θ̄ − θ̂₍ⱼ₎:
 *
 *   SE_jack = √((h − 1)/h · Σ dⱼ²)
 *   bias_jack = (h − 1)(θ̄ − θ̂)
 *   â = Σ dⱼ³ / (6 · (Σ dⱼ²)^{3/2})   (BCa acceleration, Efron 1987, JASA 82:171–185, eq. 6.6;
 *                                       Efron & Tibshirani 1993, eq. 14.15)
 *
 * For the delete-one-block jackknife the same formulas are used with h blocks (for blocks of
 * equal length they are the usual block-jackknife variance and acceleration; the last block
 * may be longer, see `jackknifeBlocks`).
 */

/** Leave-out replicates and what follows from them. */
export interface JackknifeResult {
  /** θ̂ on all items. */
  estimate: number;
  /** θ̂₍ⱼ₎, one per deleted item (or block). */
  replicates: Float64Array;
  /** θ̄, the mean of the replicates. */
  mean: number;
  se: number;
  bias: number;
  acceleration: number;
}

/**
 * Non-overlapping blocks for the delete-one-block jackknife: h = ⌊n/ℓ⌋ blocks
 * [jℓ, (j+1)ℓ), the last one extended to n so that every item belongs to exactly one block.
 * Needs 1 ≤ ℓ ≤ n/2 (at least two blocks), else `RangeError`.
 */
export function jackknifeBlocks(n: number, blockLength: number): { starts: Int32Array; lengths: Int32Array } {
  if (!Number.isInteger(blockLength) || blockLength < 1 || 2 * blockLength > n) {
    throw new RangeError(`jackknifeBlocks: block length must be an integer in [1, n/2] (n = ${n}), got ${blockLength}`);
  }
  const h = Math.floor(n / blockLength);
  const starts = new Int32Array(h);
  const lengths = new Int32Array(h);
  for (let j = 0; j < h; j++) {
    starts[j] = j * blockLength;
    lengths[j] = j === h - 1 ? n - j * blockLength : blockLength;
  }
  return { starts, lengths };
}

/**
 * SE, bias and acceleration from leave-out replicates (formulas in the module comment).
 * The acceleration is 0 when all replicates are equal (Σd² = 0). Replicates must be finite.
 * Shift-invariant: passing θ̂₍ⱼ₎ − c for any constant c gives the same se and acceleration.
 * Cost: O(h).
 */
export function summariseReplicates(
  replicates: Float64Array,
  estimate: number,
): Omit<JackknifeResult, 'replicates' | 'estimate'> {
  const h = replicates.length;
  let mean = 0;
  for (let j = 0; j < h; j++) mean += replicates[j];
  mean /= h;
  let s2 = 0;
  let s3 = 0;
  for (let j = 0; j < h; j++) {
    const d = mean - replicates[j];
    s2 += d * d;
    s3 += d * d * d;
  }
  return {
    mean,
    se: Math.sqrt(((h - 1) / h) * s2),
    bias: (h - 1) * (mean - estimate),
    acceleration: s2 > 0 ? s3 / (6 * Math.pow(s2, 1.5)) : 0,
  };
}

/**
 * Delete-one jackknife of `fn` over `values` (n ≥ 2). `fn` gets a scratch array of length
 * n − 1 that it may reorder (e.g. sort for a median) but must not keep.
 * Cost: n calls of `fn` plus O(n²) copying (memcpy speed).
 *
 * @example jackknife(Float64Array.of(1, 2, 3, 4), mean).se // → 0.6455 (= sd/√n)
 */
export function jackknife(values: Float64Array, fn: (sample: Float64Array) => number): JackknifeResult {
  const n = values.length;
  if (n < 2) throw new RangeError(`jackknife: needs at least 2 items, got ${n}`);
  const estimate = fn(Float64Array.from(values));
  const master = values.slice(1); // values without item 0
  const scratch = new Float64Array(n - 1);
  const replicates = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    if (i > 0) master[i - 1] = values[i - 1]; // now master = values without item i
    scratch.set(master);
    replicates[i] = fn(scratch);
  }
  return { estimate, replicates, ...summariseReplicates(replicates, estimate) };
}

/**
 * Delete-one-block jackknife of `fn` over `values`, blocks from `jackknifeBlocks(n, ℓ)`.
 * `fn` gets a scratch array (the series with one block removed, order kept).
 * Cost: ⌊n/ℓ⌋ calls of `fn` plus O(n²/ℓ) copying.
 */
export function blockJackknife(
  values: Float64Array,
  blockLength: number,
  fn: (sample: Float64Array) => number,
): JackknifeResult {
  const n = values.length;
  const { starts, lengths } = jackknifeBlocks(n, blockLength);
  const estimate = fn(Float64Array.from(values));
  const replicates = new Float64Array(starts.length);
  for (let j = 0; j < starts.length; j++) {
    const s = starts[j];
    const e = s + lengths[j];
    const scratch = new Float64Array(n - lengths[j]);
    scratch.set(values.subarray(0, s), 0);
    scratch.set(values.subarray(e), s);
    replicates[j] = fn(scratch);
  }
  return { estimate, replicates, ...summariseReplicates(replicates, estimate) };
}
