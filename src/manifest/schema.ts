/**
 * The manifest's fields, in ONE table.
 *
 * Validation (`validate.ts`), defaults, error text and the README reference table
 * (`manifestReferenceMarkdown`) are all generated from `MANIFEST_FIELDS`: to add a field,
 * add a row here (and to `ResolvedManifest` in `types.ts`). Enumerations are `as const`
 * lists so the union type, the check and the "allowed: …" text come from one list.
 */
import type { Adjustment, AuditKind, Axis, CellChoice, DataFormat, DriftChart, ImagingTrace, Layout, NegativesPolicy } from './types.ts';
import { pushAll } from '../util/arrays.ts';

export const AUDIT_KINDS = ['activity', 'weights'] as const satisfies readonly AuditKind[];
export const AXES = ['time', 'stimuli'] as const satisfies readonly Axis[];
export const LAYOUTS = ['units-by-bins', 'bins-by-units'] as const satisfies readonly Layout[];
export const DATA_FORMATS = ['npy', 'npz', 'csv', 'tsv', 'spikes', 'nwb', 'safetensors', 'sorter-folder', 'imaging-folder'] as const satisfies readonly DataFormat[];
export const IMAGING_TRACES = ['F', 'F-neuropil', 'spks'] as const satisfies readonly ImagingTrace[];
export const CELL_CHOICES = ['flag', 'probability', 'all'] as const satisfies readonly CellChoice[];
export const NEGATIVES_POLICIES = ['keep', 'rectify', 'shift', 'refuse'] as const satisfies readonly NegativesPolicy[];
export const DRIFT_CHARTS = ['ewma', 'cusum'] as const satisfies readonly DriftChart[];
export const ADJUSTMENTS = ['holm', 'bh', 'none'] as const satisfies readonly Adjustment[];
export const INTERVAL_METHODS = ['bca', 'percentile'] as const;

// Compile-time proof that each list covers its whole union (a missing member fails here).
type Covers<L extends readonly string[], U extends string> = [U] extends [L[number]] ? true : never;
const _covered: [
  Covers<typeof AUDIT_KINDS, AuditKind>, Covers<typeof AXES, Axis>, Covers<typeof LAYOUTS, Layout>,
  Covers<typeof DATA_FORMATS, DataFormat>, Covers<typeof NEGATIVES_POLICIES, NegativesPolicy>,
  Covers<typeof DRIFT_CHARTS, DriftChart>, Covers<typeof ADJUSTMENTS, Adjustment>,
  Covers<typeof IMAGING_TRACES, ImagingTrace>, Covers<typeof CELL_CHOICES, CellChoice>,
] = [true, true, true, true, true, true, true, true, true];
void _covered;

/** A rule for a text field: the test and how the allowed values are said to people. */
export interface TextRule {
  allowed: string;
  test(s: string): boolean;
}

const SLUG_RE = /^[a-z0-9][a-z0-9-]{0,63}$/;
// No control characters (C0, DEL, C1) anywhere in one-line text.
const CONTROL_RE = /[\u0000-\u001f\u007f-\u009f]/;

export const TEXT_RULES = {
  slug: { allowed: "1–64 lowercase letters, digits and '-', starting with a letter or digit", test: (s) => SLUG_RE.test(s) },
  title: { allowed: 'one line of 1–200 characters', test: (s) => s.trim().length > 0 && s.length <= 200 && !CONTROL_RE.test(s) },
  label: { allowed: 'one line of 1–64 characters', test: (s) => s.trim().length > 0 && s.length <= 64 && !CONTROL_RE.test(s) },
  month: {
    allowed: 'a month written YYYY-MM (month 01–12), e.g. 2026-01',
    test: (s) => /^(19|20|21)\d\d-(0[1-9]|1[0-2])$/.test(s),
  },
  path: { allowed: 'a path of 1–4096 characters, relative to the manifest, inside the workspace', test: (s) => s.length > 0 && s.length <= 4096 && !CONTROL_RE.test(s) },
  glob: {
    allowed: "a file-name pattern using only '*' and '?' as wildcards (no '**', no '/'), e.g. \"*.npy\"",
    test: (s) => s.length > 0 && s.length <= 255 && !s.includes('**') && !/[/\\[\]{}]/.test(s) && !CONTROL_RE.test(s),
  },
  name: { allowed: 'a name of 1–1024 characters', test: (s) => s.length > 0 && s.length <= 1024 && !CONTROL_RE.test(s) },
} as const satisfies Record<string, TextRule>;

interface Base {
  name: string;
  /** One line for the reference table. */
  description: string;
  /** Missing (or empty) is an error. */
  required?: boolean;
  /** How the default is shown in the reference table, when the value alone would not say it. */
  defaultText?: string;
}
export type TextField = Base & { type: 'text'; rule: keyof typeof TEXT_RULES; default?: string | null };
export type NumberField = Base & {
  type: 'integer' | 'number';
  min?: number;
  max?: number;
  /** Bounds are inclusive unless marked exclusive. */
  minExclusive?: boolean;
  maxExclusive?: boolean;
  default?: number;
};
export type EnumField = Base & { type: 'enum'; values: readonly string[]; default?: string | null };
/** A word from `words`, or an integer ≥ `integerMin`, or (when `fields` is set) a mapping of those fields. */
export type ChoiceField = Base & {
  type: 'choice';
  words: readonly string[];
  integerMin?: number;
  fields?: readonly FieldSpec[];
  default: string;
};
/** A list of one-line words, each passing `rule`. */
export type WordsField = Base & { type: 'words'; rule: keyof typeof TEXT_RULES; minItems: number; maxItems: number; default: readonly string[] };
/** A nested mapping. `nullable`: absent means null (off); otherwise absent means all defaults. */
export type MappingField = Base & { type: 'mapping'; fields: readonly FieldSpec[]; nullable: boolean };
export type ListField = Base & { type: 'list'; item: readonly FieldSpec[]; minItems: number; maxItems: number };
export type FieldSpec = TextField | NumberField | EnumField | ChoiceField | WordsField | MappingField | ListField;

const BOOTSTRAP_FIELDS: readonly FieldSpec[] = [
  { name: 'resamples', type: 'integer', min: 100, max: 1_000_000, default: 2000, description: 'Number of bootstrap resamples per interval.' },
  { name: 'level', type: 'number', min: 0, max: 1, minExclusive: true, maxExclusive: true, default: 0.95, description: 'Confidence level of the intervals.' },
  { name: 'method', type: 'enum', values: INTERVAL_METHODS, default: 'bca', description: 'Interval method: bias-corrected and accelerated (Efron 1987) or plain percentile.' },
  { name: 'seed', type: 'integer', min: 0, max: 4_294_967_295, default: 1, description: 'Seed of the random generator; the same seed gives the same intervals.' },
  {
    name: 'block_length', type: 'choice', words: ['auto'], integerMin: 1, default: 'auto',
    description: 'Moving-block length in bins for axis time; auto = Politis & White (2004, corrected 2009).',
  },
];

const EVENT_FIELDS: readonly FieldSpec[] = [
  { name: 'k', type: 'number', min: 0, max: 100, minExclusive: true, default: 3, description: 'A value is an event when it exceeds k robust SDs (MAD × 1.4826) above the median.' },
  {
    name: 'baseline', type: 'choice', words: ['trace'], default: 'trace',
    fields: [
      { name: 'start_s', type: 'number', min: 0, required: true, description: 'Start of the noise window, seconds from the first bin of the dataset (sessions joined).' },
      { name: 'end_s', type: 'number', min: 0, minExclusive: true, required: true, description: 'End of the noise window, seconds; greater than start_s.' },
    ],
    description: 'Where noise is estimated: the whole trace, or { start_s, end_s }.',
  },
];

const DRIFT_FIELDS: readonly FieldSpec[] = [
  { name: 'baseline_months', type: 'integer', min: 1, max: 120, default: 3, description: 'Number of first months that form the baseline.' },
  { name: 'chart', type: 'enum', values: DRIFT_CHARTS, default: 'ewma', description: 'Control chart: EWMA (Roberts 1959) or CUSUM (Page 1954).' },
  { name: 'ewma_lambda', type: 'number', min: 0, max: 1, minExclusive: true, default: 0.2, description: 'EWMA weight λ of the newest month.' },
  { name: 'ewma_L', type: 'number', min: 0, max: 10, minExclusive: true, default: 3, description: 'EWMA limit width L, in σ units.' },
  { name: 'cusum_k', type: 'number', min: 0, max: 10, default: 0.5, description: 'CUSUM reference value K, in σ units.' },
  { name: 'cusum_h', type: 'number', min: 0, max: 100, minExclusive: true, default: 5, description: 'CUSUM decision interval H, in σ units.' },
  { name: 'adjust', type: 'enum', values: ADJUSTMENTS, default: 'holm', description: 'Multiple-testing adjustment of trend p-values: Holm (1979), Benjamini–Hochberg (1995) or none.' },
];

const SORTER_FIELDS: readonly FieldSpec[] = [
  {
    name: 'labels', type: 'words', rule: 'label', minItems: 1, maxItems: 64, default: ['good'],
    description: "Curated labels whose clusters become units (as in the folder's label table, case-insensitive).",
  },
  { name: 'sample_rate_hz', type: 'number', min: 0, max: 1e7, minExclusive: true, default: undefined, defaultText: "params.py's sample_rate", description: 'Samples per second of spike_times.npy.' },
  { name: 'duration_s', type: 'number', min: 0, max: 1e7, minExclusive: true, default: undefined, defaultText: 'to the last spike', description: 'Recording length in seconds.' },
];

const IMAGING_FIELDS: readonly FieldSpec[] = [
  { name: 'frame_rate_hz', type: 'number', min: 0, max: 1e6, minExclusive: true, required: true, description: "Frames per second (the pipeline's settings file is a pickle and is never read)." },
  { name: 'trace', type: 'enum', values: IMAGING_TRACES, default: 'F-neuropil', description: 'F (fluorescence), F-neuropil (F − k·Fneu) or spks (deconvolved activity).' },
  { name: 'neuropil_k', type: 'number', min: 0, max: 10, default: 0.7, description: 'k of F − k·Fneu (0.7 is common practice).' },
  { name: 'cells', type: 'enum', values: CELL_CHOICES, default: 'flag', description: "Which ROIs are units: iscell.npy's flag, its probability ≥ min_probability, or all." },
  { name: 'min_probability', type: 'number', min: 0, max: 1, default: 0.5, description: 'With cells: probability, the lowest is-cell probability taken.' },
];

const DATASET_FIELDS: readonly FieldSpec[] = [
  { name: 'id', type: 'text', rule: 'slug', required: true, description: 'Dataset name, unique within the manifest.' },
  { name: 'path', type: 'text', rule: 'path', required: true, description: 'A file or a folder, relative to the manifest file; must stay inside the workspace.' },
  {
    name: 'files', type: 'text', rule: 'glob', default: null, defaultText: 'every non-hidden data file',
    description: 'For a folder: which files to take (not recursive; hidden files skipped).',
  },
  { name: 'month', type: 'text', rule: 'month', default: null, description: 'Recording month, for drift tracking.' },
  { name: 'group', type: 'text', rule: 'label', default: null, description: 'Group (rig, cohort, condition) compared within months.' },
  { name: 'layout', type: 'enum', values: LAYOUTS, default: 'units-by-bins', description: 'Orientation of activity matrices: rows are units, or rows are bins.' },
  {
    name: 'format', type: 'enum', values: DATA_FORMATS, default: null, defaultText: 'from the file extension',
    description: 'File format; `.csv`/`.tsv` are tables unless `format: spikes` (unit, time rows).',
  },
  { name: 'series', type: 'text', rule: 'name', default: null, description: 'NWB: path of the table or series to read, when the file holds several.' },
  { name: 'member', type: 'text', rule: 'name', default: null, defaultText: 'the only member', description: 'NPZ: member to read.' },
  {
    name: 'recording_end_s', type: 'number', min: 0, minExclusive: true, defaultText: 'as the file states (epochs, trials, obs_intervals), else the last spike',
    description: "NWB units tables: when each file's recording ended, in seconds; the matrix ends there and later spikes are left out and counted.",
  },
  { name: 'sorter', type: 'mapping', nullable: true, fields: SORTER_FIELDS, description: 'Spike-sorter output folder (format sorter-folder): which units and how long.' },
  { name: 'imaging', type: 'mapping', nullable: true, fields: IMAGING_FIELDS, description: 'Imaging-pipeline output folder (format imaging-folder): frame rate, trace and cells.' },
];

/** Every manifest field, in the order of the reference table. */
export const MANIFEST_FIELDS: readonly FieldSpec[] = [
  { name: 'audit', type: 'text', rule: 'slug', required: true, description: 'Short name of the audit; names its report folder. Unique in the workspace.' },
  { name: 'title', type: 'text', rule: 'title', required: true, description: 'Title shown on the report.' },
  { name: 'kind', type: 'enum', values: AUDIT_KINDS, default: 'activity', description: 'activity: units × bins matrices; weights: weight matrices.' },
  { name: 'axis', type: 'enum', values: AXES, default: 'time', description: 'time: bins are autocorrelated (block bootstrap); stimuli: columns are independent.' },
  { name: 'bin_ms', type: 'number', min: 0, max: 3_600_000, minExclusive: true, default: 10, description: 'Bin width in milliseconds (spike times are binned at this width).' },
  { name: 'zero_tolerance', type: 'number', min: 0, default: 0, description: 'Values with |x| ≤ this count as zero for density measures.' },
  { name: 'bootstrap', type: 'mapping', nullable: false, fields: BOOTSTRAP_FIELDS, description: 'Bootstrap interval settings.' },
  {
    name: 'negatives', type: 'enum', values: NEGATIVES_POLICIES, default: 'keep',
    description: 'Values below zero, for measures that assume non-negative responses (sparseness, activity ratio, Hoyer, Gini; density is always of the raw values): keep, rectify (set to 0), shift (subtract the minimum) or refuse.',
  },
  { name: 'events', type: 'mapping', nullable: true, fields: EVENT_FIELDS, defaultText: 'none (off)', description: 'Event detection for imaging traces; absent = off.' },
  { name: 'drift', type: 'mapping', nullable: false, fields: DRIFT_FIELDS, description: 'Drift tracking across months.' },
  { name: 'min_bins', type: 'integer', min: 2, max: 1e9, default: 100, description: 'Fewest bins (or stimuli) for an interval; fewer gives a caution and no interval.' },
  { name: 'min_nonzero', type: 'integer', min: 0, max: 1e9, default: 10, description: "Fewest nonzero bins for a unit's kurtosis to be reported." },
  { name: 'datasets', type: 'list', minItems: 1, maxItems: 10_000, item: DATASET_FIELDS, required: true, description: 'The data: one entry per dataset.' },
];

/** What a field allows, in words, for error messages and the reference table. */
export function allowedText(f: FieldSpec): string {
  switch (f.type) {
    case 'text':
      return TEXT_RULES[f.rule].allowed;
    case 'integer':
    case 'number':
      return `${f.type === 'integer' ? 'an integer' : 'a number'}${rangeText(f)}`;
    case 'enum':
      return `one of ${f.values.join(', ')}`;
    case 'choice': {
      const alts = f.words.map((w) => `\`${w}\``);
      if (f.integerMin !== undefined) alts.push(`an integer ≥ ${f.integerMin}`);
      if (f.fields) alts.push(`{ ${f.fields.map((c) => c.name).join(', ')} }`);
      return alts.join(' or ');
    }
    case 'words':
      return `a list of ${f.minItems}–${f.maxItems} words, each ${TEXT_RULES[f.rule].allowed}`;
    case 'mapping':
      return `a mapping with fields ${f.fields.map((c) => c.name).join(', ')}${f.nullable ? ', or nothing' : ''}`;
    case 'list':
      return `a list of ${f.minItems}–${fmt(f.maxItems)} mappings with fields ${f.item.map((c) => c.name).join(', ')}`;
  }
}

function rangeText(f: NumberField): string {
  const lo = f.min === undefined ? '' : `${fmt(f.min)} ${f.minExclusive ? '<' : '≤'} `;
  const hi = f.max === undefined ? '' : ` ${f.maxExclusive ? '<' : '≤'} ${fmt(f.max)}`;
  if (lo && hi) return ` (${lo}x${hi})`;
  if (lo) return ` (x ${f.minExclusive ? '>' : '≥'} ${fmt(f.min as number)})`;
  return hi ? ` (x${hi})` : '';
}

function fmt(n: number): string {
  return Number.isInteger(n) && Math.abs(n) >= 10_000 ? n.toLocaleString('en-US') : String(n);
}

/** The default as shown to people. */
export function defaultText(f: FieldSpec): string {
  if (f.defaultText) return f.defaultText;
  if (f.required) return 'required';
  if (f.type === 'mapping' || f.type === 'list') return f.type === 'mapping' && f.nullable ? 'none' : 'see below';
  if (f.type === 'words') return `[${f.default.join(', ')}]`;
  const d = f.default;
  return d === null || d === undefined ? 'none' : String(d);
}

/** Every field with its dotted path (`bootstrap.seed`, `datasets[].id`), depth first. */
export function flattenFields(fields: readonly FieldSpec[] = MANIFEST_FIELDS, prefix = ''): { path: string; field: FieldSpec }[] {
  const out: { path: string; field: FieldSpec }[] = [];
  for (const f of fields) {
    const path = prefix + f.name;
    out.push({ path, field: f });
    if (f.type === 'mapping') pushAll(out, flattenFields(f.fields, `${path}.`));
    if (f.type === 'list') pushAll(out, flattenFields(f.item, `${path}[].`));
    if (f.type === 'choice' && f.fields) pushAll(out, flattenFields(f.fields, `${path}.`));
  }
  return out;
}

/**
 * The README's manifest reference: a markdown table of every field (dotted path), its type and
 * allowed values, its default and what it does. Generated from `MANIFEST_FIELDS`, so it cannot
 * drift from the validator.
 */
export function manifestReferenceMarkdown(): string {
  const cell = (s: string) => s.replace(/\|/g, '\\|').replace(/\n/g, ' ');
  const rows = flattenFields().map(({ path, field }) =>
    `| \`${path}\` | ${cell(allowedText(field))} | ${cell(defaultText(field))} | ${cell(field.description)} |`,
  );
  return ['| field | allowed | default | meaning |', '|---|---|---|---|', ...rows].join('\n') + '\n';
}
