/**
 * Lacuna's reference measures: pure functions on numbers, typed arrays and row-major matrices.
 * Conventions shared by every measure:
 *  - `null` means undefined (0/0: all-zero input for the ratio measures, zero variance for
 *    kurtosis, too few elements); never 0 or 1 in its place;
 *  - non-finite input throws a `RangeError` naming the function, the index and the value — count
 *    and exclude such values first with `scanValues`;
 *  - negative values are not clipped (Vinje–Gallant S can then exceed 1); `scanValues` counts them.
 */
export { fsum } from './fsum.ts';
export { l0Count, l1Norm, l2Norm } from './norms.ts';
export { scanValues, type ValueCounts } from './scan-values.ts';
export { activityRatio } from './activity-ratio.ts';
export { vinjeGallantSparseness } from './vinje-gallant.ts';
export { hoyerSparseness } from './hoyer.ts';
export { giniIndex, GINI_COUNTING_MAX } from './gini.ts';
export {
  emptyMoments,
  momentsOf,
  mergeMoments,
  varianceFromMoments,
  skewnessFromMoments,
  kurtosisFromMoments,
  type Moments,
} from './moments.ts';
export { excessKurtosis } from './kurtosis.ts';
export { skewness } from './skewness.ts';
export { density, densityCurve } from './density.ts';
export { toDenseMatrix, type MatrixInput, type MlMatrixLike } from './matrix.ts';
export { populationSparseness, type PopulationSparseness } from './population-sparseness.ts';
export { lifetimeSparseness, type LifetimeSparseness } from './lifetime-sparseness.ts';
export { graphDensity, type GraphDensity, type GraphDensityOptions } from './graph-density.ts';
export type { DefinedSummary } from './defined-summary.ts';
export * from './activity-pass.ts';
