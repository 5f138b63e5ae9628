/** Seeded randomness, bootstrap intervals and their helpers (see each module for formulas and sources). */
export { createRandom, type Random } from './random.ts';
export { normalCdf, normalPdf, normalPpf } from './normal.ts';
export { quantileSorted } from './quantile.ts';
export {
  jackknife,
  blockJackknife,
  jackknifeBlocks,
  summariseReplicates,
  type JackknifeResult,
} from './jackknife.ts';
export { politisWhiteBlockLength, politisWhiteDetails, type BlockLengthDetails } from './block-length.ts';
export {
  compensatedPrefixSums,
  resampleFunction,
  resampleRatioOfSums,
  type ResamplingScheme,
} from './bootstrap-resample.ts';
export {
  bcaAdjustedLevel,
  intervalFromDistribution,
  proportionBelow,
  type DistributionInterval,
  type IntervalMethodName,
} from './bootstrap-interval.ts';
export { bootstrapInterval, type BootstrapOptions, type BootstrapResult, type BootstrapStatistic } from './bootstrap.ts';
export { bootstrapDifference, type DifferenceOptions, type DifferenceResult } from './bootstrap-difference.ts';
export { mannKendall, type MannKendallResult } from './mann-kendall.ts';
export { theilSen, type TheilSenResult } from './theil-sen.ts';
export { ewmaChart, type EwmaChart, type EwmaOptions } from './ewma.ts';
export { cusumChart, type CusumChart, type CusumOptions } from './cusum.ts';
export { holm, benjaminiHochberg } from './multiple-testing.ts';
