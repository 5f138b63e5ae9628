/**
 * The validated manifest: every field present, defaults applied, paths resolved.
 * Field names follow the manifest's own YAML keys (snake_case) so scripts that
 * write manifests and code that reads results speak the same words.
 */

export type AuditKind = 'activity' | 'weights';
export type Axis = 'time' | 'stimuli';
export type Layout = 'units-by-bins' | 'bins-by-units';
export type DataFormat = 'npy' | 'npz' | 'csv' | 'tsv' | 'spikes' | 'nwb' | 'safetensors' | 'sorter-folder' | 'imaging-folder';
/** Which trace of an imaging-pipeline folder is read: fluorescence, fluorescence minus k × neuropil, or deconvolved activity. */
export type ImagingTrace = 'F' | 'F-neuropil' | 'spks';
/** Which ROIs of an imaging-pipeline folder are units: the pipeline's is-cell flag, its probability ≥ a threshold, or every ROI. */
export type CellChoice = 'flag' | 'probability' | 'all';

/** A spike-sorter output folder (`format: sorter-folder`); see src/readers/sorter-folder.ts. */
export interface SorterSettings {
  /** Curated labels whose clusters become units (compared case-insensitively). */
  labels: string[];
  /** Samples per second; null: taken from the folder's params.py. */
  sample_rate_hz: number | null;
  /** Recording length in seconds; null: up to the bin of the last spike (a notice says so). */
  duration_s: number | null;
}

/** An imaging-pipeline output folder (`format: imaging-folder`); see src/readers/imaging-folder.ts. */
export interface ImagingSettings {
  /** Frames per second of every plane (the pipeline keeps it in a pickle, which is never loaded). */
  frame_rate_hz: number;
  trace: ImagingTrace;
  /** k of F − k·Fneu. */
  neuropil_k: number;
  cells: CellChoice;
  /** With cells: probability, ROIs whose is-cell probability is at least this are units. */
  min_probability: number;
}
/** What to do with values below zero, for the measures that assume non-negative responses. */
export type NegativesPolicy = 'keep' | 'rectify' | 'shift' | 'refuse';
export type DriftChart = 'ewma' | 'cusum';
export type Adjustment = 'holm' | 'bh' | 'none';

export interface BootstrapSettings {
  resamples: number;
  level: number;
  method: 'bca' | 'percentile';
  seed: number;
  /** Moving-block length in bins, or 'auto' (Politis & White 2004, corrected 2009). */
  block_length: number | 'auto';
}

export interface EventSettings {
  /** A value is an event when it exceeds k robust SDs (MAD × 1.4826) above the ROI's median. */
  k: number;
  /** Where the noise is estimated: the whole trace, or a window in seconds from the first bin of the dataset (its files joined along bins). */
  baseline: 'trace' | { start_s: number; end_s: number };
}

export interface DriftSettings {
  /** Number of first months that form the baseline window. */
  baseline_months: number;
  chart: DriftChart;
  /** EWMA weight λ (Roberts 1959) and limit width L in σ units. */
  ewma_lambda: number;
  ewma_L: number;
  /** CUSUM reference value K and decision interval H, in σ units (Page 1954). */
  cusum_k: number;
  cusum_h: number;
  adjust: Adjustment;
}

export interface ResolvedDataset {
  id: string;
  /** The manifest's path, as written. */
  path: string;
  /** Absolute paths of the files that make up this dataset, sorted; each checked to be inside the workspace. */
  files: string[];
  /** Workspace-relative paths of the same files, forward slashes. */
  relFiles: string[];
  format: DataFormat;
  month: string | null;
  group: string | null;
  layout: Layout;
  /** NWB: path of the table or series to read, when the file holds several. */
  series: string | null;
  /** NPZ: member name to read (activity); null = the only member. */
  member: string | null;
  /** NWB units tables: when the recording ended, seconds; null = as the file states (epochs, trials), else the last spike. */
  recording_end_s?: number | null;
  /** Settings of a spike-sorter output folder; null for other formats. */
  sorter: SorterSettings | null;
  /** Settings of an imaging-pipeline output folder; null for other formats. */
  imaging: ImagingSettings | null;
}

export interface ResolvedManifest {
  /** Absolute path of the manifest file, and workspace-relative. */
  file: string;
  relFile: string;
  /** SHA-256 of the manifest file's bytes. */
  sha256: string;
  audit: string;
  title: string;
  kind: AuditKind;
  axis: Axis;
  bin_ms: number;
  zero_tolerance: number;
  bootstrap: BootstrapSettings;
  negatives: NegativesPolicy;
  events: EventSettings | null;
  drift: DriftSettings;
  /** Minimum bins (or stimuli) for an interval; fewer gives a `caution` finding and no interval. */
  min_bins: number;
  /** Minimum nonzero bins for a unit's kurtosis to be reported. */
  min_nonzero: number;
  datasets: ResolvedDataset[];
  /** The markdown body: the lab's notes, rendered escaped in the report. */
  notes: string;
}
