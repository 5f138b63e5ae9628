/**
 * The top of a version page: the verdict (a short generated paragraph a reader can stop after),
 * the overview table (one row per dataset, one column per measure) and the findings grouped by
 * kind. Plain text values only; the templates escape them.
 *
 * "Stands out" is deliberately conservative: a dataset stands out in a measure when its whole
 * interval lies above every other dataset's interval or below every other one (no overlap with
 * any). Separate intervals are not a significance test; the page says so beside the verdict.
 */
import type { AuditResult, DatasetResult, FindingLevel, MeasureResult } from '../types.ts';
import { ACTIVITY_MEASURES, WEIGHT_MEASURES } from '../types.ts';
import { siteData, findingKind } from './site-data.ts';
import { NONE, formatCount, formatInterval, formatLevel, formatMethod, formatNumber, measureLabel } from './site-format.ts';

/** One measure column: `key` is the measure name, or `event:<name>` for an event-based measure. */
export interface OverviewColumn {
  key: string;
  label: string;
  /** What the estimate summarises (from the result), once per column. */
  summarises: string;
  /** `95% BCa bootstrap` when every interval of the column shares it, else the distinct ones listed. */
  interval: string;
}

export interface OverviewRow {
  id: string;
  href: string;
  month: string;
  group: string;
  cells: { estimate: string; interval: string }[];
  /** `2 exclude, 1 caution` or `none`. */
  findings: string;
}

export interface OverviewModel {
  columns: OverviewColumn[];
  /** Rows grouped by month (then group, then id); `label` is the month or `month not set`; one group labelled '' when no dataset has a month. */
  groups: { label: string; rows: OverviewRow[] }[];
  rowCount: number;
  /** Whether any estimate has an interval (weights have none: every weight is read). */
  hasIntervals: boolean;
}

export interface FindingKindItem {
  level: FindingLevel;
  levelTitle: string;
  code: string;
  kind: string;
  /** Total of the findings' counts (units, cells, bins, files). */
  count: string;
  datasets: { id: string; href: string; count: string }[];
  /** One message as an example of what the finding says. */
  example: string;
}

type Entry = [string, MeasureResult];

/** Every (column key, measure) of a dataset, plain measures then event-based ones. */
export function measureEntries(ds: DatasetResult): Entry[] {
  const plain = Object.entries(ds.measures) as Entry[];
  const events = (Object.entries(ds.eventMeasures ?? {}) as Entry[]).map(([k, m]) => [`event:${k}`, m] as Entry);
  return [...plain, ...events];
}

export function columnLabel(key: string): string {
  return key.startsWith('event:') ? `${measureLabel(key.slice(6))} (event-based)` : measureLabel(key);
}

/** The measure columns of an audit, in the order of the measure lists, event-based ones last. */
export function columnOrder(result: AuditResult): string[] {
  const known: readonly string[] = result.kind === 'weights' ? WEIGHT_MEASURES : ACTIVITY_MEASURES;
  const seen = new Set(result.datasets.flatMap((d) => measureEntries(d).map(([k]) => k)));
  const rank = (k: string) => {
    const base = k.startsWith('event:') ? k.slice(6) : k;
    const i = known.indexOf(base);
    return (k.startsWith('event:') ? 100 : 0) + (i < 0 ? 50 : i);
  };
  return [...seen].sort((a, b) => rank(a) - rank(b) || a.localeCompare(b));
}

/** A dataset's measure under a column key of `measureEntries`. */
export function measureOf(ds: DatasetResult, key: string): MeasureResult | undefined {
  const [table, name] = key.startsWith('event:') ? [ds.eventMeasures ?? {}, key.slice(6)] : [ds.measures, key];
  return Object.hasOwn(table, name) ? (table as Record<string, MeasureResult>)[name] : undefined;
}

function levelCounts(ds: DatasetResult): string {
  const order = siteData().levels.order;
  const c = new Map<FindingLevel, number>();
  for (const f of ds.findings) c.set(f.level, (c.get(f.level) ?? 0) + 1);
  const parts = order.filter((l) => c.get(l)).map((l) => `${c.get(l)} ${l}`);
  return parts.length ? parts.join(', ') : 'none';
}

/** Datasets by month, then group, then id (undated last). */
export const byMonthGroup = (a: DatasetResult, b: DatasetResult) =>
  (a.month ?? '\uffff').localeCompare(b.month ?? '\uffff') || (a.group ?? '').localeCompare(b.group ?? '') || a.id.localeCompare(b.id);

/** The overview table. `hrefFor` gives the link of a dataset's own page. */
export function overviewModel(result: AuditResult, hrefFor: (id: string) => string): OverviewModel {
  const keys = columnOrder(result);
  const columns = keys.map((key): OverviewColumn => {
    const ms = result.datasets.map((d) => measureOf(d, key)).filter((m): m is MeasureResult => m !== undefined);
    const summaries = [...new Set(ms.map((m) => m.summary))];
    const ivs = [...new Set(ms.filter((m) => m.interval).map((m) => `${formatLevel(m.level)} ${formatMethod(m.method)}`))];
    const notes = [...new Set(ms.filter((m) => !m.interval && m.note).map((m) => m.note as string))];
    return {
      key,
      label: columnLabel(key),
      summarises: summaries.length === 1 ? summaries[0] : summaries.join('; or '),
      interval: ivs.length === 0 ? (notes.length === 1 ? `none (${notes[0]})` : 'none') : ivs.join(' or '),
    };
  });
  const sorted = [...result.datasets].sort(byMonthGroup);
  const groups: OverviewModel['groups'] = [];
  for (const ds of sorted) {
    const label = ds.month ?? 'month not set';
    let g = groups[groups.length - 1];
    if (!g || g.label !== label) groups.push((g = { label, rows: [] }));
    g.rows.push({
      id: ds.id,
      href: hrefFor(ds.id),
      month: ds.month ?? '',
      group: ds.group ?? '',
      cells: keys.map((k) => {
        const m = measureOf(ds, k);
        if (!m) return { estimate: NONE, interval: '' };
        return { estimate: m.estimate === null ? 'no estimate' : formatNumber(m.estimate), interval: m.interval ? formatInterval(m.interval) : '' };
      }),
      findings: levelCounts(ds),
    });
  }
  const byMonth = result.datasets.some((d) => d.month !== null);
  const hasIntervals = result.datasets.some((d) => measureEntries(d).some(([, m]) => m.interval !== null));
  return { columns, groups: byMonth ? groups : [{ label: '', rows: groups.flatMap((g) => g.rows) }], rowCount: sorted.length, hasIntervals };
}

/** Findings grouped by kind (code), most serious level first, then by how many datasets they touch. */
export function findingKinds(result: AuditResult, hrefFor: (id: string) => string): FindingKindItem[] {
  const { order, levels } = siteData().levels;
  const map = new Map<string, FindingKindItem & { total: number }>();
  for (const ds of result.datasets) {
    for (const f of ds.findings) {
      const key = `${f.level}\u0000${f.code}`;
      let item = map.get(key);
      if (!item) {
        item = { level: f.level, levelTitle: levels[f.level]?.title ?? f.level, code: f.code, kind: findingKind(f.code), count: '', datasets: [], example: f.message, total: 0 };
        map.set(key, item);
      }
      item.total += f.count;
      item.datasets.push({ id: ds.id, href: hrefFor(ds.id), count: formatCount(f.count) });
    }
  }
  return [...map.values()]
    .sort((a, b) => order.indexOf(a.level) - order.indexOf(b.level) || b.datasets.length - a.datasets.length || a.kind.localeCompare(b.kind))
    .map(({ total, ...item }) => ({ ...item, count: formatCount(total) }));
}

/** Measures named in the verdict's ranges (the first of these present, at most three). */
const HEADLINE: Record<'activity' | 'weights', string[]> = {
  activity: ['population_sparseness', 'lifetime_sparseness', 'density', 'kurtosis'],
  weights: ['density', 'hoyer', 'gini'],
};

/** A measure label inside a sentence: lower-case, except names of people (Hoyer, Gini). */
export const inSentence = (label: string): string => (/^(Hoyer|Gini)\b/.test(label) ? label : label.charAt(0).toLowerCase() + label.slice(1));

const plural = (n: number, one: string, many = `${one}s`) => `${n} ${n === 1 ? one : many}`;
const list = (xs: string[]) => (xs.length <= 1 ? xs.join('') : `${xs.slice(0, -1).join(', ')} and ${xs[xs.length - 1]}`);

/** Datasets whose interval for `key` lies wholly above or below every other dataset's interval. */
export function standOut(result: AuditResult, key: string): { id: string; side: 'above' | 'below' }[] {
  const withIv = result.datasets.flatMap((d) => {
    const m = measureOf(d, key);
    return m?.interval ? [{ id: d.id, lo: m.interval[0], hi: m.interval[1] }] : [];
  });
  if (withIv.length < 3) return [];
  const out: { id: string; side: 'above' | 'below' }[] = [];
  for (const x of withIv) {
    const others = withIv.filter((o) => o !== x);
    if (others.every((o) => x.lo > o.hi)) out.push({ id: x.id, side: 'above' });
    else if (others.every((o) => x.hi < o.lo)) out.push({ id: x.id, side: 'below' });
  }
  return out;
}

/** The verdict: a few plain sentences generated from the result. */
export function verdictSentences(result: AuditResult): string[] {
  const s: string[] = [];
  const ds = result.datasets;
  const months = [...new Set(ds.map((d) => d.month).filter((m): m is string => m !== null))].sort();
  const groups = [...new Set(ds.map((d) => d.group).filter((g): g is string => g !== null))].sort();
  let head = `${plural(ds.length, result.kind === 'weights' ? 'weight dataset' : 'dataset')}`;
  if (months.length) head += months.length === 1 ? ` from ${months[0]}` : ` over ${months.length} months (${months[0]} to ${months[months.length - 1]})`;
  if (groups.length) head += `, in ${plural(groups.length, 'group')} (${list(groups)})`;
  s.push(`${head}.`);
  const keys = columnOrder(result).filter((k) => HEADLINE[result.kind].includes(k)).slice(0, 3);
  const ranges = keys.flatMap((k) => {
    const est = ds.map((d) => measureOf(d, k)?.estimate).filter((x): x is number => typeof x === 'number' && Number.isFinite(x));
    if (!est.length) return [];
    let lo = Infinity;
    let hi = -Infinity;
    for (const x of est) {
      if (x < lo) lo = x;
      if (x > hi) hi = x;
    }
    const label = inSentence(measureLabel(k));
    return [est.length === 1 || lo === hi ? `${label} was ${formatNumber(lo)}` : `${label} ranged from ${formatNumber(lo)} to ${formatNumber(hi)}`];
  });
  if (ranges.length) s.push(`Across ${ds.length === 1 ? 'the dataset' : 'datasets'}, ${list(ranges)}.`);
  const outs = columnOrder(result).flatMap((k) => standOut(result, k).map((o) => `${o.id} (${inSentence(columnLabel(k))}, ${o.side} all others)`));
  if (outs.length) s.push(`Outside every other dataset’s interval: ${list(outs)}.`);
  else if (ds.length >= 3) s.push('No dataset’s interval lies wholly outside all the others’.');
  if (result.drift) {
    const sig = result.drift.series.filter((x) => x.firstSignal !== null);
    const trend = result.drift.series.filter((x) => x.pAdjusted !== null && x.pAdjusted < 0.05);
    const name = (x: (typeof sig)[number]) => `${inSentence(measureLabel(x.measure))}${x.group ? ` (${x.group})` : ''}`;
    if (sig.length) {
      const firsts = [...new Set(sig.map((x) => x.firstSignal as string))].sort();
      const named = sig.slice(0, 4).map(name);
      const shown = sig.length > 4 ? `${named.join(', ')} and ${sig.length - 4} more` : list(named);
      s.push(`Drift screening flagged ${plural(sig.length, 'series', 'series')} of ${result.drift.series.length} from ${firsts[0]} on: ${shown}.`);
    } else s.push(`Drift screening flagged none of ${plural(result.drift.series.length, 'series', 'series')}.`);
    if (trend.length) s.push(`A monotonic trend was significant after adjustment for ${list(trend.map(name))}.`);
    // Months where two groups measured the same month apart (difference interval excludes 0).
    // Measures that differ in the same months for the same pair are named together.
    const byWhen = new Map<string, string[]>();
    for (const k of keys) {
      const gs = result.drift.groupDifferences.filter((g) => g.measure === k && g.interval && (g.interval[0] > 0 || g.interval[1] < 0));
      for (const pair of [...new Set(gs.map((g) => `${g.a} − ${g.b}`))]) {
        const when = `${pair}\u0000${list(gs.filter((g) => `${g.a} − ${g.b}` === pair).map((g) => g.month))}`;
        byWhen.set(when, [...(byWhen.get(when) ?? []), inSentence(measureLabel(k))]);
      }
    }
    const apart = [...byWhen].map(([when, ms]) => {
      const [pair, months] = when.split('\u0000');
      return `${list(ms)} (${pair}) in ${months}`;
    });
    if (apart.length) s.push(`Groups measured in the same month differed, with a difference interval excluding zero: ${apart.join('; ')}.`);
  }
  const serious = findingKinds(result, () => '').filter((k) => siteData().levels.levels[k.level]?.affectsNumbers);
  if (serious.length) {
    const named = (ids: string[]) => (ids.length <= 4 ? ids.join(', ') : `${ids.length} datasets`);
    s.push(`Findings that can affect numbers: ${serious.map((k) => `${k.kind} (${named(k.datasets.map((d) => d.id))})`).join('; ')}.`);
  } else s.push('No finding affects the numbers.');
  return s;
}
