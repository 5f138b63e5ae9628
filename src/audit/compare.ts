/**
 * What changed between two versions of one audit (`lacuna compare`, and the compare page).
 *
 *   1. inputs: by path; a path only in `to` is added, only in `from` removed, in both with a
 *      different sha256 changed; identical ones are not listed
 *   2. parameters: both `parameters` objects flattened to dotted names (`bootstrap.resamples`;
 *      arrays compared whole); names whose JSON values differ, sorted
 *   3. datasets: every id in either version (from's order, then new ids); `changed` when its
 *      files (sha256), month, group, measures or findings differ, else `same`; per measure in
 *      either version: from/to estimates, delta = to − from, relative = delta/|from| (null when
 *      from is 0 or missing), and whether the two intervals overlap (null when either has none)
 *   4. summary: one or two sentences
 *
 * `formatComparison` renders it as aligned plain text for a terminal. Cost: O(size of the results).
 */
import type { AuditResult, DatasetResult, MeasureName, VersionComparison } from '../types.ts';
import { ACTIVITY_MEASURES, WEIGHT_MEASURES } from '../types.ts';
import { maxOf, pushAll } from '../util/arrays.ts';

type DatasetChange = VersionComparison['datasets'][number];
type MeasureChange = DatasetChange['measures'][number];

const ORDER: readonly MeasureName[] = [...new Set<MeasureName>([...ACTIVITY_MEASURES, ...WEIGHT_MEASURES])];

function flatten(value: unknown, prefix: string, out: Map<string, unknown>): void {
  if (value !== null && typeof value === 'object' && !Array.isArray(value)) {
    const entries = Object.entries(value as Record<string, unknown>);
    if (entries.length === 0 && prefix) out.set(prefix, value);
    for (const [k, v] of entries) flatten(v, prefix ? `${prefix}.${k}` : k, out);
  } else out.set(prefix, value);
}

function same(a: unknown, b: unknown): boolean {
  return JSON.stringify(a) === JSON.stringify(b);
}

function measureChanges(a: DatasetResult | undefined, b: DatasetResult | undefined): MeasureChange[] {
  const names = new Set([...Object.keys(a?.measures ?? {}), ...Object.keys(b?.measures ?? {})]);
  return ORDER.filter((m) => names.has(m)).map((measure) => {
    const ma = a?.measures[measure];
    const mb = b?.measures[measure];
    const from = ma?.estimate ?? null;
    const to = mb?.estimate ?? null;
    const delta = from !== null && to !== null ? to - from : null;
    const relative = delta !== null && from !== 0 ? delta / Math.abs(from as number) : null;
    const ia = ma?.interval ?? null;
    const ib = mb?.interval ?? null;
    const overlap = ia && ib ? ia[0] <= ib[1] && ib[0] <= ia[1] : null;
    return { measure, from, to, delta, relative, overlap };
  });
}

function datasetChanged(a: DatasetResult, b: DatasetResult): boolean {
  const key = (d: DatasetResult) => ({ files: d.files.map((f) => [f.path, f.sha256]), month: d.month, group: d.group, measures: d.measures, findings: d.findings });
  return !same(key(a), key(b));
}

/** Compare two versions of the same audit. */
export function compareVersions(from: AuditResult, to: AuditResult): VersionComparison {
  // 1. Inputs.
  const fa = new Map(from.inputs.map((f) => [f.path, f.sha256]));
  const fb = new Map(to.inputs.map((f) => [f.path, f.sha256]));
  const inputs: VersionComparison['inputs'] = [];
  for (const path of [...new Set([...fa.keys(), ...fb.keys()])].sort()) {
    if (!fb.has(path)) inputs.push({ path, change: 'removed' });
    else if (!fa.has(path)) inputs.push({ path, change: 'added' });
    else if (fa.get(path) !== fb.get(path)) inputs.push({ path, change: 'changed' });
  }
  // 2. Parameters.
  const pa = new Map<string, unknown>();
  const pb = new Map<string, unknown>();
  flatten(from.parameters, '', pa);
  flatten(to.parameters, '', pb);
  const parameters = [...new Set([...pa.keys(), ...pb.keys()])]
    .sort()
    .filter((name) => !same(pa.get(name) ?? null, pb.get(name) ?? null))
    .map((name) => ({ name, from: pa.get(name) ?? null, to: pb.get(name) ?? null }));
  // 3. Datasets.
  const da = new Map(from.datasets.map((d) => [d.id, d]));
  const db = new Map(to.datasets.map((d) => [d.id, d]));
  const ids = [...from.datasets.map((d) => d.id), ...to.datasets.map((d) => d.id).filter((id) => !da.has(id))];
  const datasets: DatasetChange[] = ids.map((id) => {
    const a = da.get(id);
    const b = db.get(id);
    const change: DatasetChange['change'] = !a ? 'added' : !b ? 'removed' : datasetChanged(a, b) ? 'changed' : 'same';
    return { id, change, measures: measureChanges(a, b) };
  });
  const c: VersionComparison = { audit: to.audit, from: from.version, to: to.version, inputs, parameters, datasets, summary: '' };
  c.summary = summarise(c);
  return c;
}

function plural(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}

function summarise(c: VersionComparison): string {
  const moved = c.datasets.filter((d) => d.change !== 'same');
  if (c.inputs.length === 0 && c.parameters.length === 0 && moved.length === 0) {
    return `No changes from ${c.from} to ${c.to}: the same inputs, parameters and results.`;
  }
  const parts: string[] = [];
  if (c.inputs.length) parts.push(`${plural(c.inputs.length, 'input file')} ${c.inputs.length === 1 ? 'differs' : 'differ'}`);
  if (c.parameters.length) parts.push(`${plural(c.parameters.length, 'parameter')} changed (${c.parameters.slice(0, 3).map((p) => p.name).join(', ')}${c.parameters.length > 3 ? ', …' : ''})`);
  const byKind = (k: DatasetChange['change']) => moved.filter((d) => d.change === k).map((d) => d.id);
  for (const k of ['changed', 'added', 'removed'] as const) {
    const list = byKind(k);
    if (list.length) parts.push(`${plural(list.length, 'dataset')} ${k} (${list.slice(0, 4).join(', ')}${list.length > 4 ? ', …' : ''})`);
  }
  let text = `From ${c.from} to ${c.to}: ${parts.join('; ')}.`;
  const disjoint = moved.flatMap((d) => d.measures.filter((m) => m.overlap === false).map((m) => `${d.id} ${m.measure.replace(/_/g, ' ')}`));
  if (disjoint.length) text += ` Intervals no longer overlap for ${disjoint.slice(0, 3).join(', ')}${disjoint.length > 3 ? ` and ${disjoint.length - 3} more` : ''}.`;
  return text;
}

// ---------------------------------------------------------------------------
// Terminal rendering
// ---------------------------------------------------------------------------

function num(v: number | null, sign = false): string {
  if (v === null) return '—';
  const s = Math.abs(v) >= 1e-4 && Math.abs(v) < 1e6 ? String(Number(v.toPrecision(4))) : v === 0 ? '0' : v.toExponential(3);
  return sign && v > 0 ? `+${s}` : s;
}

function value(v: unknown): string {
  return v === undefined || v === null ? '—' : typeof v === 'string' ? v : JSON.stringify(v);
}

function table(rows: string[][], indent = '  '): string[] {
  const widths = rows[0].map((_, i) => maxOf(rows.map((r) => r[i].length)));
  return rows.map((r) => indent + r.map((cell, i) => (i === r.length - 1 ? cell : cell.padEnd(widths[i]))).join('  ').trimEnd());
}

/** Plain-text rendering of a comparison, ending in a newline. */
export function formatComparison(c: VersionComparison): string {
  const lines = [`audit ${c.audit}: ${c.from} → ${c.to}`, c.summary];
  const moved = c.datasets.filter((d) => d.change !== 'same');
  if (c.inputs.length === 0 && c.parameters.length === 0 && moved.length === 0) {
    lines.push('', 'no changes');
    return `${lines.join('\n')}\n`;
  }
  lines.push('', 'Inputs');
  pushAll(lines, c.inputs.length ? table(c.inputs.map((i) => [i.change, i.path])) : ['  no changes']);
  lines.push('', 'Parameters');
  pushAll(lines, c.parameters.length ? table([['name', 'from', 'to'], ...c.parameters.map((p) => [p.name, value(p.from), value(p.to)])]) : ['  no changes']);
  lines.push('', 'Datasets');
  if (moved.length === 0) lines.push('  no changes');
  for (const d of moved) {
    lines.push(`  ${d.id} (${d.change})`);
    const rows = d.measures
      .filter((m) => d.change !== 'changed' || m.from !== m.to)
      .map((m) => [m.measure, num(m.from), num(m.to), num(m.delta, true), m.relative === null ? '—' : `${num(100 * m.relative, true)}%`, m.overlap === null ? '—' : m.overlap ? 'yes' : 'no']);
    if (rows.length === 0) lines.push('    estimates unchanged (files, findings or intervals differ)');
    else pushAll(lines, table([['measure', 'from', 'to', 'delta', 'relative', 'intervals overlap'], ...rows], '    '));
  }
  const unchanged = c.datasets.length - moved.length;
  if (unchanged) lines.push('', `${plural(unchanged, 'dataset')} unchanged.`);
  return `${lines.join('\n')}\n`;
}
