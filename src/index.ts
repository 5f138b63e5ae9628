/**
 * Lacuna as a library: the measures, the interval and drift statistics, and the pipeline
 * stages, for scripts and outside checks. The `lacuna` command (src/cli/) is built on these.
 *
 *   import { vinjeGallantSparseness, bootstrapInterval, createRandom } from 'lacuna';
 *
 * Matrices are `DenseMatrix` values (src/types.ts): a typed array in row-major order with
 * `rows` (units) and `cols` (bins or stimuli); ml-matrix `Matrix` objects are accepted too.
 */
export * from './metrics/index.ts';
export * from './stats/index.ts';
export { loadManifest, findManifests, checkWorkspace, manifestReferenceMarkdown } from './manifest/index.ts';
export { openDataset, inspectDataset } from './readers/index.ts';
export { writeNpy } from './readers/npy-write.ts';
export { buildWorkspace, type BuildOptions, type BuildSummary } from './audit/build.ts';
export { buildDrift } from './audit/drift.ts';
export { compareVersions, formatComparison } from './audit/compare.ts';
export { listVersions, readRecord } from './audit/versions.ts';
export { InputError, InputErrors, InternalError } from './errors.ts';
export { TOOL_VERSION } from './version.ts';
export type * from './types.ts';
export type { ResolvedManifest, ResolvedDataset } from './manifest/types.ts';
