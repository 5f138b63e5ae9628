/**
 * Manifest validation, driven by the field table in `schema.ts`.
 *
 * 1. Walk the data against `MANIFEST_FIELDS`: unknown fields (with a "did you mean"), wrong
 *    types, out-of-range numbers, bad enum values, bad slugs and months; fill defaults.
 * 2. Cross-field checks the table cannot express: duplicate dataset ids, an event window that
 *    ends before it starts, formats and settings that do not fit `kind: weights`.
 * Every problem is collected; nothing stops at the first.
 */
import { InputError, InputErrors } from '../errors.ts';
import type { DataFormat, ResolvedDataset, ResolvedManifest } from './types.ts';
import { MANIFEST_FIELDS, TEXT_RULES, allowedText, flattenFields } from './schema.ts';
import type { FieldSpec, NumberField } from './schema.ts';

/** A dataset after validation, before its files are resolved. */
export interface ValidatedDataset extends Omit<ResolvedDataset, 'files' | 'relFiles' | 'format'> {
  /** null: inferred from the file extension when the files are resolved. */
  format: DataFormat | null;
  /** The `files` pattern as written, or null. */
  files: string | null;
}

/** A manifest after validation: every field present, defaults filled; no files, hash or notes yet. */
export interface ValidatedManifest extends Omit<ResolvedManifest, 'file' | 'relFile' | 'sha256' | 'datasets' | 'notes'> {
  datasets: ValidatedDataset[];
}

export interface ValidateContext {
  /** The manifest file as shown in messages (workspace-relative where possible). */
  file: string;
  /** Line of a field in the file (from `parseManifestText`). */
  lineOf?: (fieldPath: string) => number | undefined;
}

/** Validate front-matter data; throws `InputErrors` holding every problem found. */
export function validateManifest(data: unknown, ctx: ValidateContext): ValidatedManifest {
  const { value, problems } = collectManifest(data, ctx);
  if (problems.length > 0) throw new InputErrors(problems);
  return value;
}

/**
 * Validate and return the value (defaults filled, bad fields left at their defaults) together
 * with every problem, so a caller can go on checking the parts that are sound.
 */
export function collectManifest(data: unknown, ctx: ValidateContext): { value: ValidatedManifest; problems: InputError[] } {
  const problems: InputError[] = [];
  const report = (where: string, message: string, hint?: string) =>
    problems.push(new InputError(message, { file: ctx.file, where, line: ctx.lineOf?.(where), hint }));
  const value = walkMapping(MANIFEST_FIELDS, data ?? {}, '', report) as unknown as ValidatedManifest;
  crossChecks(value, data, report);
  // In file order (stable; problems without a line last), as people read the file.
  problems.sort((a, b) => (a.line ?? Infinity) - (b.line ?? Infinity));
  return { value, problems };
}

type Report = (where: string, message: string, hint?: string) => void;

/** How a found value is shown: text quoted and cut at 80 characters, else its kind. */
export function describeFound(v: unknown): string {
  if (typeof v === 'string') {
    const q = JSON.stringify(v);
    return q.length > 82 ? `${q.slice(0, 80)}…"` : q;
  }
  if (typeof v === 'number' || typeof v === 'boolean') return `${v} (a ${typeof v})`;
  if (v === null || v === undefined) return 'nothing';
  if (Array.isArray(v)) return `a list of ${v.length}`;
  if (v instanceof Date) return 'a date';
  return 'a mapping';
}

function isMapping(v: unknown): v is Record<string, unknown> {
  return v !== null && typeof v === 'object' && !Array.isArray(v) && !(v instanceof Date);
}

function walkMapping(fields: readonly FieldSpec[], v: unknown, prefix: string, report: Report): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  const here = prefix.replace(/\.$/, '');
  if (!isMapping(v)) {
    report(here || '(front matter)', `found ${describeFound(v)}; allowed: a mapping with fields ${fields.map((f) => f.name).join(', ')}`);
    v = {};
  }
  const obj = v as Record<string, unknown>;
  const names = new Set(fields.map((f) => f.name));
  for (const key of Object.keys(obj)) {
    if (names.has(key)) continue;
    const hint = suggest(key, fields, prefix);
    report(`${prefix}${key}`, `unknown field ${JSON.stringify(key)}; allowed here: ${[...names].join(', ')}`, hint);
  }
  for (const f of fields) out[f.name] = walkField(f, obj[f.name], `${prefix}${f.name}`, report);
  return out;
}

function walkField(f: FieldSpec, v: unknown, path: string, report: Report): unknown {
  const absent = v === undefined || v === null;
  if (absent) {
    if (f.required) {
      report(path, `required field is missing; allowed: ${allowedText(f)}`);
      return f.type === 'list' ? [] : f.type === 'text' ? '' : null;
    }
    if (f.type === 'mapping') return f.nullable ? null : walkMapping(f.fields, {}, `${path}.`, () => {});
    if (f.type === 'list') return [];
    if (f.type === 'words') return [...f.default];
    return f.default ?? null;
  }
  const bad = (hint?: string) => {
    report(path, `found ${describeFound(v)}; allowed: ${allowedText(f)}`, hint);
    if (f.type === 'words') return [...f.default];
    return f.type === 'mapping' ? walkMapping(f.fields, {}, `${path}.`, () => {}) : f.type === 'list' ? [] : (f.default ?? null);
  };
  switch (f.type) {
    case 'text':
      if (typeof v !== 'string') return bad(typeof v === 'number' || typeof v === 'boolean' ? 'write text in quotes, e.g. "01"' : undefined);
      return TEXT_RULES[f.rule].test(v) ? v : bad();
    case 'integer':
    case 'number':
      if (typeof v !== 'number' || !Number.isFinite(v) || (f.type === 'integer' && !Number.isInteger(v)) || !inRange(f, v)) return bad();
      return v;
    case 'enum':
      return typeof v === 'string' && f.values.includes(v) ? v : bad(suggestValue(v, f.values));
    case 'choice':
      if (typeof v === 'string' && f.words.includes(v)) return v;
      if (f.integerMin !== undefined && typeof v === 'number' && Number.isInteger(v) && v >= f.integerMin) return v;
      if (f.fields && isMapping(v)) return walkMapping(f.fields, v, `${path}.`, report);
      return bad(suggestValue(v, f.words));
    case 'words':
      if (typeof v === 'string' && TEXT_RULES[f.rule].test(v)) return [v]; // `labels: good` means [good]
      if (!Array.isArray(v) || v.length < f.minItems || v.length > f.maxItems || !v.every((w) => typeof w === 'string' && TEXT_RULES[f.rule].test(w))) return bad();
      return v;
    case 'mapping':
      return walkMapping(f.fields, v, `${path}.`, report);
    case 'list':
      if (!Array.isArray(v) || v.length < f.minItems || v.length > f.maxItems) return bad();
      return v.map((item, i) => walkMapping(f.item, item, `${path}[${i}].`, report));
  }
}

function inRange(f: NumberField, v: number): boolean {
  if (f.min !== undefined && (f.minExclusive ? v <= f.min : v < f.min)) return false;
  if (f.max !== undefined && (f.maxExclusive ? v >= f.max : v > f.max)) return false;
  return true;
}

function crossChecks(m: ValidatedManifest, raw: unknown, report: Report): void {
  const seen = new Map<string, number>();
  m.datasets.forEach((d, i) => {
    if (!d.id) return;
    const first = seen.get(d.id);
    if (first !== undefined) {
      report(`datasets[${i}].id`, `found ${describeFound(d.id)} again (also datasets[${first}].id); allowed: an id used once in the manifest`);
    } else seen.set(d.id, i);
    if (m.kind === 'weights' && (d.format === 'spikes' || d.format === 'nwb')) {
      report(`datasets[${i}].format`, `found ${describeFound(d.format)} with kind weights; allowed: npy, npz, csv, tsv, safetensors`);
    }
  });
  const b = m.events?.baseline;
  if (b && typeof b === 'object' && typeof b.start_s === 'number' && typeof b.end_s === 'number' && b.end_s <= b.start_s) {
    report('events.baseline.end_s', `found ${b.end_s}; allowed: a number greater than start_s (${b.start_s})`);
  }
  if (m.kind === 'weights' && isMapping(raw) && raw.events !== undefined && raw.events !== null) {
    report('events', 'found event settings with kind weights; allowed: events only for kind activity (imaging traces)');
  }
}

/**
 * Optimal-string-alignment edit distance (Levenshtein plus adjacent transpositions;
 * Damerau 1964). O(|a|·|b|).
 */
export function editDistance(a: string, b: string): number {
  const d: number[][] = Array.from({ length: a.length + 1 }, (_, i) => [i, ...new Array<number>(b.length).fill(0)]);
  for (let j = 1; j <= b.length; j++) d[0][j] = j;
  for (let i = 1; i <= a.length; i++) {
    for (let j = 1; j <= b.length; j++) {
      const cost = a[i - 1] === b[j - 1] ? 0 : 1;
      d[i][j] = Math.min(d[i - 1][j] + 1, d[i][j - 1] + 1, d[i - 1][j - 1] + cost);
      if (i > 1 && j > 1 && a[i - 1] === b[j - 2] && a[i - 2] === b[j - 1]) d[i][j] = Math.min(d[i][j], d[i - 2][j - 2] + 1);
    }
  }
  return d[a.length][b.length];
}

const norm = (s: string) => s.toLowerCase().replace(/-/g, '_');

/** The closest word within about a third of its length (or one it starts), as a hint. */
function closest(word: string, candidates: readonly string[]): string | undefined {
  const w = norm(word);
  let best: string | undefined;
  let bestD = Infinity;
  for (const c of candidates) {
    const d = editDistance(w, norm(c));
    if (d < bestD) [best, bestD] = [c, d];
  }
  if (best !== undefined && bestD <= Math.max(1, Math.floor(best.length / 3))) return best;
  if (w.length >= 4) return candidates.find((c) => norm(c).startsWith(w));
  return undefined;
}

function suggest(key: string, fields: readonly FieldSpec[], prefix: string): string | undefined {
  const near = closest(key, fields.map((f) => f.name));
  if (near) return `did you mean ${JSON.stringify(near)}?`;
  // A field written at the wrong level, e.g. `seed:` at the top instead of under `bootstrap:`.
  const elsewhere = flattenFields().find(({ path }) => path.endsWith(`.${key}`) || path === key);
  if (elsewhere) return `${JSON.stringify(key)} belongs at ${elsewhere.path}`;
  return undefined;
}

function suggestValue(v: unknown, values: readonly string[]): string | undefined {
  if (typeof v !== 'string') return undefined;
  const near = closest(v, values);
  return near ? `did you mean ${JSON.stringify(near)}?` : undefined;
}
