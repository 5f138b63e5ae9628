/**
 * The plain values that pass between Lacuna's stages.
 *
 *   manifest → ResolvedDataset → (reader) ActivitySource | WeightsSource
 *            → (audit) DatasetResult → AuditResult (results.json) → charts → pages
 *
 * Everything here is JSON-serialisable except the sources, which hand out
 * typed-array chunks.
 */

/** How much a data problem matters. `exclude`: data were left out of a measure (and counted). */
export type FindingLevel = 'notice' | 'caution' | 'exclude';
export const FINDING_LEVELS = ['exclude', 'caution', 'notice'] as const satisfies readonly FindingLevel[];

/** A data problem found while reading or measuring. */
export interface Finding {
  level: FindingLevel;
  /** Stable machine code, kebab-case, e.g. `silent-units`, `nan-values`. */
  code: string;
  /** One sentence for people: what was found, how many, what Lacuna did about it. */
  message: string;
  /** Units, bins, files or byte offsets concerned (capped lists; `count` holds the full number). */
  where: string[];
  /** How many elements, units, bins or files this finding concerns. */
  count: number;
}

/** Provenance of one input file. */
export interface FileProvenance {
  /** Path relative to the workspace root, with forward slashes. */
  path: string;
  sha256: string;
  bytes: number;
}

// ---------------------------------------------------------------------------
// Matrices and chunks
// ---------------------------------------------------------------------------

export type Numeric = Float64Array | Float32Array;

/**
 * A dense matrix: a typed array plus its shape, row-major (C order).
 * For activity data, rows are units and columns are time bins or stimuli.
 */
export interface DenseMatrix {
  rows: number;
  cols: number;
  data: Numeric;
}

/**
 * A block of whole units of an activity matrix: row-major, `units` rows × `bins` columns.
 * Row r is unit `unitStart + r` across every bin of the dataset. Readers may reuse
 * `data` (and `missing`) between yields: consumers must not keep references.
 */
export interface UnitBlock {
  unitStart: number;
  units: number;
  bins: number;
  data: Numeric;
  /** Optional mask, same layout as data: 1 = missing (e.g. outside a unit's observed intervals). */
  missing?: Uint8Array;
}

/** An activity dataset opened for streaming. */
export interface ActivitySource {
  kind: 'activity';
  units: number;
  bins: number;
  /** Optional names for units (e.g. NWB unit ids, CSV header); length `units` when present. */
  unitLabels?: string[];
  /** Bin width in ms where the reader knows it (spike times, NWB series); else null. */
  binMs: number | null;
  files: FileProvenance[];
  /** Where each file's bins start and end in the joined bin axis (sessions joined along bins). */
  segments: { path: string; binStart: number; bins: number }[];
  /** Findings the reader made (e.g. missing bins, resampling). */
  findings: Finding[];
  /** Yield blocks of whole units, in order, covering every unit exactly once. */
  blocks(options?: { maxBlockBytes?: number }): AsyncIterable<UnitBlock>;
}

/** One tensor (layer) of a weights dataset. */
export interface Tensor {
  name: string;
  shape: number[];
  data: Numeric;
}

/** A weights dataset opened for streaming: one tensor at a time. */
export interface WeightsSource {
  kind: 'weights';
  files: FileProvenance[];
  /** Tensor names and shapes, known before reading data. */
  layers: { name: string; shape: number[] }[];
  findings: Finding[];
  tensors(): AsyncIterable<Tensor>;
}

export type DataSource = ActivitySource | WeightsSource;

// ---------------------------------------------------------------------------
// Intervals
// ---------------------------------------------------------------------------

export type IntervalMethod = 'percentile' | 'bca';
export type ResamplingUnit = 'units' | 'bins' | 'blocks-of-bins' | 'stimuli';

/** A bootstrap confidence interval and everything needed to reproduce it. */
export interface IntervalRecord {
  lower: number;
  upper: number;
  level: number;
  method: IntervalMethod;
  resamples: number;
  resampling: ResamplingUnit;
  /** Block length in bins for moving-block resampling; null otherwise. */
  blockLength: number | null;
  /** How the block length was chosen: 'auto' (Politis & White 2004/2009) or 'set'. */
  blockLengthChoice: 'auto' | 'set' | null;
  seed: number;
  /** Number of resampled items (units, bins). */
  n: number;
}

// ---------------------------------------------------------------------------
// Results (results.json)
// ---------------------------------------------------------------------------

export const ACTIVITY_MEASURES = [
  'population_sparseness',
  'lifetime_sparseness',
  'kurtosis',
  'density',
  'hoyer',
  'gini',
  'activity_ratio',
] as const;
export const WEIGHT_MEASURES = ['density', 'graph_density', 'hoyer', 'gini', 'kurtosis'] as const;
export type MeasureName = (typeof ACTIVITY_MEASURES)[number] | (typeof WEIGHT_MEASURES)[number];

export interface MeasureResult {
  estimate: number | null;
  interval: [number, number] | null;
  level: number | null;
  method: IntervalMethod | null;
  /** Number of defined items the estimate summarises (bins, units, elements). */
  n: number;
  /** Number of items left out (undefined, missing, non-finite). */
  excluded: number;
  /** What the estimate summarises, in words (e.g. "mean over defined bins"). */
  summary: string;
  /** Full interval record when an interval was computed. */
  intervalRecord?: IntervalRecord;
  /** Other summaries of the same per-item values (median, quartiles, sd). */
  spread?: { median?: number; q1?: number; q3?: number; sd?: number; min?: number; max?: number };
  /** Why there is no interval or no estimate, when there is none. */
  note?: string;
}

/**
 * Per-item values kept for the charts, downsampled where long: per-unit values are kept in
 * full (one number per unit), per-bin values as a summary of at most ~1,000 windows.
 */
export interface ActivityChartData {
  /** Per-unit values; null where the unit's value is undefined. Index = unit. */
  unitLabels: string[];
  lifetimeSparseness: (number | null)[];
  kurtosis: (number | null)[];
  meanRate: (number | null)[];
  /** Population sparseness across bins, summarised in consecutive windows of `windowBins` bins. */
  populationWindows: { binStart: number; bins: number; mean: number | null; min: number | null; max: number | null; defined: number }[];
  windowBins: number;
  /** Bin width in ms, when known; lets charts label the x axis in seconds. */
  binMs: number | null;
  /** Event-based population sparseness windows, when event detection is on. */
  eventPopulationWindows?: ActivityChartData['populationWindows'];
}

export interface WeightChartData {
  layers: { name: string; shape: number[]; density: number; hoyer: number | null; gini: number | null; kurtosis: number | null; graphDensity: number | null }[];
  /** Density as a function of magnitude threshold, per layer (thresholds ascending). */
  thresholdCurve: { layer: string; threshold: number; density: number }[];
  /** In- and out-degree per node, for square layers (as histograms: degree → count). */
  degrees: { layer: string; direction: 'in' | 'out'; degree: number; count: number }[];
}

export interface DatasetResult {
  id: string;
  month: string | null;
  group: string | null;
  kind: 'activity' | 'weights';
  /** [units, bins] for activity; for weights the shape of the single tensor, or [] with layers in chartData. */
  shape: number[];
  files: FileProvenance[];
  measures: Partial<Record<MeasureName, MeasureResult>>;
  /** Event-based measures (imaging, when event detection is on), labelled separately. */
  eventMeasures?: Partial<Record<'density' | 'population_sparseness' | 'l0', MeasureResult>>;
  findings: Finding[];
  chartData: ActivityChartData | WeightChartData;
  /** Content hash of everything this dataset's result depends on (cache key). */
  cacheKey: string;
}

/** One monthly point of one measure (and group) in the drift series. */
export interface DriftPoint {
  month: string;
  estimate: number | null;
  interval: [number, number] | null;
  /** Datasets pooled into this month's point. */
  datasets: string[];
  n: number;
  /** True when the month had too few units or bins; shown, never hidden. */
  thin: boolean;
  /**
   * Chart statistic and whether it signals. EWMA: `chartValue` = z_t, `chartUpper`/`chartLower` =
   * the control limits at that month. CUSUM: `chartUpper` = S_H, `chartLower` = S_L,
   * `chartValue` = max(S_H, S_L), and `chartLimit` = the decision interval H = cusum_h·σ.
   */
  chartValue: number | null;
  chartUpper?: number | null;
  chartLower?: number | null;
  chartLimit?: number | null;
  signal: boolean;
}

export interface DriftSeries {
  measure: MeasureName;
  group: string | null;
  /** Weights audits: the layer (matched by name across months) this series follows; absent = whole datasets. */
  layer?: string;
  points: DriftPoint[];
  baselineMonths: string[];
  baseline: { mean: number; sd: number } | null;
  mannKendall: { S: number; varS: number; z: number; p: number; n: number } | null;
  theilSen: { slope: number; lower: number; upper: number; level: number; intercept: number } | null;
  /** p-value after the audit-wide multiple-testing adjustment. */
  pAdjusted: number | null;
  chart: 'ewma' | 'cusum';
  firstSignal: string | null;
}

export interface DriftResult {
  months: string[];
  pooling: string;
  chart: 'ewma' | 'cusum';
  adjustment: 'holm' | 'bh' | 'none';
  testsRun: number;
  series: DriftSeries[];
  /** Group differences in shared months (e.g. rig A − rig B), with bootstrap intervals. */
  groupDifferences: { measure: MeasureName; month: string; a: string; b: string; difference: number; interval: [number, number] | null }[];
  /** A short generated paragraph of what changed. */
  summary: string;
}

/** The whole result of one audit version: what `results.json` holds. */
export interface AuditResult {
  audit: string;
  title: string;
  kind: 'activity' | 'weights';
  version: string;
  created: string;
  /**
   * The code that computed (`version`, and `sourceCommit`: Lacuna's own git commit when it ran
   * from a checkout) and the data it used (`commit`: the workspace's git commit, with
   * `workspaceDirty` when tracked files had uncommitted changes). Older records lack the
   * optional fields.
   */
  tool: { name: 'lacuna'; version: string; node: string; commit: string | null; sourceCommit?: string | null; workspaceDirty?: boolean | null };
  inputs: FileProvenance[];
  manifest: { path: string; sha256: string };
  parameters: Record<string, unknown>;
  datasets: DatasetResult[];
  drift: DriftResult | null;
  notes: string;
}

/** A chart ready for a page: a Vega-Lite spec plus its text alternative and pre-rendered SVG. */
export interface ChartSpec {
  id: string;
  title: string;
  /** Text alternative: what the chart shows, in words, with the key numbers. */
  description: string;
  datasetId: string | null;
  spec: Record<string, unknown>;
  svg?: string;
}

/** One version of an audit as listed on the audit's page. */
export interface VersionEntry {
  version: string;
  created: string;
  /** Hash of everything the version depends on (data hashes, manifest, parameters, tool version). */
  inputsHash: string;
  /** One line: what changed since the previous version. */
  changes: string;
}

/** What changed between two versions of one audit (`lacuna compare`, and a page per consecutive pair). */
export interface VersionComparison {
  audit: string;
  from: string;
  to: string;
  /** Inputs that differ (added, removed or changed content); unchanged ones are not listed. */
  inputs: { path: string; change: 'added' | 'removed' | 'changed' }[];
  parameters: { name: string; from: unknown; to: unknown }[];
  datasets: {
    id: string;
    change: 'added' | 'removed' | 'changed' | 'same';
    measures: {
      measure: MeasureName;
      from: number | null;
      to: number | null;
      delta: number | null;
      /** delta / |from|, null when from is 0 or missing. */
      relative: number | null;
      /** Whether the two intervals overlap; null when either has none. */
      overlap: boolean | null;
    }[];
  }[];
  summary: string;
}
