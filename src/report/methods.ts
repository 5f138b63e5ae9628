/**
 * A methods paragraph ready to paste into a manuscript, and the cautions a reader needs, both
 * generated from what an audit actually did: `result.parameters` (the manifest's resolved
 * settings under their manifest names) and each measure's `intervalRecord`. No number in the
 * text is written here; every one comes from the result.
 *
 * Text is built once with a light markup: `*…*` is emphasis in our own wording, and strings
 * that come from the user's data (dataset ids, finding messages) are wrapped by `u()` so the
 * Markdown form escapes them and the plain form keeps them verbatim.
 */
import type { AuditResult, DatasetResult, IntervalRecord, MeasureResult } from '../types.ts';
import { measureLabel } from '../charts/format.ts';
import { citeText } from './citations.ts';
import { findingKind } from './site-data.ts';
import { formatCount } from '../format/number.ts';
import { maxOf, minOf } from '../util/arrays.ts';

const OPEN = '\u0001';
const CLOSE = '\u0002';
/** Mark user text: escaped in Markdown, verbatim in plain text. */
const u = (s: string): string => `${OPEN}${s.replace(/[\u0001\u0002]/g, '')}${CLOSE}`;

/**
 * Escape only what can start Markdown inline syntax inside running text (emphasis, code, links,
 * HTML, strikethrough): parentheses, pipes and the like stay as they are, so methods.md reads as
 * plain prose. The text is always mid-paragraph, so block markers (`#`, `+`) need no escape.
 */
function escapeMarkdown(s: string): string {
  return s.replace(/[\\`*_[\]<>~]/g, (ch) => `\\${ch}`);
}

function render(text: string): { markdown: string; plain: string } {
  const parts = text.split(new RegExp(`(${OPEN}[^${CLOSE}]*${CLOSE})`));
  let markdown = '';
  let plain = '';
  for (const p of parts) {
    if (p.startsWith(OPEN)) {
      const inner = p.slice(1, -1);
      markdown += escapeMarkdown(inner);
      plain += inner;
    } else {
      markdown += p;
      plain += p.replace(/\*/g, '');
    }
  }
  return { markdown, plain };
}

/** Collects cited keys in order of first use. */
function citer() {
  const keys: string[] = [];
  return {
    keys,
    cite(...ks: string[]): string {
      for (const k of ks) if (!keys.includes(k)) keys.push(k);
      return citeText(...ks);
    },
  };
}

const obj = (v: unknown): Record<string, unknown> => (v !== null && typeof v === 'object' && !Array.isArray(v) ? (v as Record<string, unknown>) : {});
const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);
const str = (v: unknown): string | null => (typeof v === 'string' ? v : null);
const pct = (level: number): string => `${String(Number((level * 100).toPrecision(6)))}%`;
const list = (xs: string[]): string => (xs.length <= 1 ? xs.join('') : `${xs.slice(0, -1).join(', ')} and ${xs[xs.length - 1]}`);
const uniq = <T>(xs: T[]): T[] => [...new Set(xs)];

interface Rec {
  ds: DatasetResult;
  name: string;
  m: MeasureResult;
  r: IntervalRecord;
}

/** Every (dataset, measure) with an interval record, event measures included. */
function records(result: AuditResult): Rec[] {
  const out: Rec[] = [];
  for (const ds of result.datasets) {
    const all: [string, MeasureResult | undefined][] = [...Object.entries(ds.measures), ...Object.entries(ds.eventMeasures ?? {}).map(([k, m]) => [`event ${k}`, m] as [string, MeasureResult | undefined])];
    for (const [name, m] of all) if (m?.intervalRecord) out.push({ ds, name, m, r: m.intervalRecord });
  }
  return out;
}

/** Whether any dataset had negative values (the readers and the pass report them as findings). */
export function hadNegatives(result: AuditResult): boolean {
  return result.datasets.some((d) => d.findings.some((f) => f.code === 'negative-values' || f.code === 'negative-units-refused'));
}

/** A count with thousands separators (`72,000`). */
const count = (n: number): string => formatCount(n);

/** `from 71 to 129 bins`, or `78 bins` when all are equal. */
function blockRange(lens: (number | null)[]): string {
  const xs = lens.filter((x): x is number => x !== null);
  if (!xs.length) return 'not recorded';
  const lo = minOf(xs);
  const hi = maxOf(xs);
  return lo === hi ? `${lo} bins` : `from ${lo} to ${hi} bins`;
}

const labelOf = (name: string) => (name.startsWith('event ') ? `event-based ${measureLabel(name.slice(6))}` : measureLabel(name));

function measuresParagraph(result: AuditResult, c: ReturnType<typeof citer>): string {
  const p = result.parameters;
  const present = uniq(result.datasets.flatMap((d) => Object.keys(d.measures)));
  const has = (m: string) => present.includes(m);
  const s: string[] = [];
  const t = result.tool;
  const nDs = result.datasets.length;
  const axis = str(p.axis) ?? 'time';
  const binMs = num(p.bin_ms);
  let what = `${nDs} ${result.kind === 'weights' ? 'weight' : 'activity'} dataset${nDs === 1 ? '' : 's'}`;
  if (result.kind === 'activity') {
    const units = result.datasets.reduce((a, d) => a + (d.shape[0] ?? 0), 0);
    const bins = result.datasets.reduce((a, d) => a + (d.shape[1] ?? 0), 0);
    what += axis === 'stimuli' ? ` (${count(units)} units in total, responses to ${count(bins)} stimuli)` : ` (${count(units)} units in total; ${count(bins)} time bins${binMs !== null ? ` of ${binMs} ms` : ''})`;
  }
  // The code that computed (the tool, and its own commit when it runs from a checkout) and the
  // data it used (the workspace's commit) are different things, and are said apart.
  const source = t.sourceCommit ? `, source commit ${u(t.sourceCommit.slice(0, 12))}` : '';
  s.push(`Sparseness was measured with Lacuna ${u(t.version)} (Node ${u(t.node)}${source}) on ${what}.`);
  if (t.commit) s.push(`The manifest and data were those of workspace commit ${u(t.commit.slice(0, 12))}${t.workspaceDirty ? ', with uncommitted changes in the workspace' : ''}; every input file is identified by its SHA-256 in the report.`);
  const tol = num(p.zero_tolerance);
  if (tol === 0) s.push('Only values exactly equal to zero counted as zero.');
  else if (tol !== null) s.push(`A value counted as zero when its magnitude was at most ${tol} (the zero tolerance).`);
  const neg = str(p.negatives);
  const negText: Record<string, string> = {
    keep: 'Negative values were kept as recorded; they can push sparseness above 1, and each dataset that had them carries a finding.',
    rectify: 'Negative values were set to zero (rectified) for the sparseness measures, activity ratio, Hoyer and Gini; density, skewness and kurtosis used the raw values.',
    shift: 'Each unit with negative values was shifted so that its smallest value was zero for the sparseness measures, activity ratio, Hoyer and Gini; density, skewness and kurtosis used the raw values.',
    refuse: 'Units with negative values were left out of the sparseness measures, activity ratio, Hoyer and Gini; density, skewness and kurtosis used the raw values.',
  };
  // A policy that did nothing is not a method: say it only when some dataset had negative values.
  if (neg && result.kind === 'activity' && hadNegatives(result)) s.push(negText[neg] ?? `Negative values: policy ${u(neg)}.`);
  if (result.kind === 'weights') s.push('Weights keep their sign; the Hoyer and Gini measures and density use their magnitudes |*w*|.');
  if (has('population_sparseness') || has('lifetime_sparseness') || has('activity_ratio')) {
    s.push(
      `For a non-negative response vector *r* of length *n*, the activity ratio is *a* = (Σ*r*ᵢ/*n*)² / Σ(*r*ᵢ²/*n*) (${c.cite('treves1991', 'rolls1995')}) ` +
        `and the sparseness is *S* = (1 − *a*)/(1 − 1/*n*) (${c.cite('vinje2000')}), from 0 when all elements are equal to 1 when one element is active.`,
    );
  }
  const defs: string[] = [];
  if (has('population_sparseness')) defs.push(`population sparseness is the mean over defined ${axis === 'stimuli' ? 'stimuli' : 'time bins'} of each ${axis === 'stimuli' ? 'stimulus' : 'bin'}’s sparseness *S* across units`);
  if (has('lifetime_sparseness')) defs.push(`lifetime sparseness is the mean over defined units of each unit’s sparseness *S* across ${axis === 'stimuli' ? 'stimuli' : 'bins'}`);
  if (defs.length) s.push(`${defs.join('; ').replace(/^./, (ch) => ch.toUpperCase())} (${c.cite('willmore2001')}).`);
  if (has('kurtosis') && result.kind === 'weights') {
    s.push(`Kurtosis is the excess kurtosis *g*₂ = *m*₄/*m*₂² − 3 of all weights of a dataset taken together, with *m*ₖ the *k*-th central moment (the moment estimator without small-sample adjustment; ${c.cite('joanes1998')}); the layer table gives it per layer.`);
  } else if (has('kurtosis')) {
    const minNz = num(p.min_nonzero);
    const over = result.kind === 'weights' ? 'each output unit’s weights' : `${axis === 'stimuli' ? 'stimuli' : 'bins'}`;
    s.push(
      `Kurtosis is the median over units of each unit’s excess kurtosis *g*₂ = *m*₄/*m*₂² − 3 across ${over}, with *m*ₖ the *k*-th central moment (the moment estimator without small-sample adjustment; ${c.cite('joanes1998')})` +
        (minNz !== null && result.kind === 'activity' ? `, for units with at least ${minNz} nonzero ${axis === 'stimuli' ? 'responses' : 'bins'}.` : '.'),
    );
  }
  const perUnit: string[] = [];
  if (has('hoyer')) perUnit.push(`Hoyer sparseness (√*n* − ‖*x*‖₁/‖*x*‖₂)/(√*n* − 1) (${c.cite('hoyer2004')})`);
  if (has('gini')) perUnit.push(`the Gini index of sparsity (${c.cite('hurley2009')})`);
  if (has('activity_ratio')) perUnit.push('the activity ratio *a*');
  if (perUnit.length) {
    const how = result.kind === 'weights' ? 'over all weights of a dataset taken together (and per layer in the layer table)' : 'per unit and averaged over units';
    s.push(`${list(perUnit).replace(/^./, (ch) => ch.toUpperCase())} ${perUnit.length === 1 ? 'was' : 'were'} computed ${how}.`);
  }
  if (has('density')) s.push(`Density is the fraction of all elements whose magnitude is above the zero tolerance.`);
  if (has('graph_density')) s.push('Graph density reads each square layer as a directed graph with an edge where a weight is above the zero tolerance: *E*/(*N*(*N* − 1)), self-loops left out.');
  s.push('Where a measure is undefined for a bin or unit (for example 0/0 for an all-zero vector), that item was left out of the measure and counted.');
  const ev = p.events === null || p.events === undefined ? null : obj(p.events);
  if (ev) {
    const k = num(ev.k);
    const base = ev.baseline === 'trace' ? 'the whole trace' : (() => { const b = obj(ev.baseline); return `the window from ${num(b.start_s)} s to ${num(b.end_s)} s from the start of the recording`; })();
    s.push(`For the event-based measures, reported separately, a value was an event when it exceeded ${k} robust standard deviations (median absolute deviation × 1.4826) above the trace’s median, with the noise estimated over ${base}.`);
  }
  return s.join(' ');
}

function intervalParagraph(result: AuditResult, c: ReturnType<typeof citer>): string {
  const recs = records(result);
  const s: string[] = [];
  if (recs.length === 0) {
    s.push('No bootstrap intervals were computed.');
    return s.join(' ');
  }
  const levels = uniq(recs.map((x) => x.r.level));
  const byMethod = (method: string) => uniq(recs.filter((x) => x.r.method === method).map((x) => labelOf(x.name)));
  const bca = byMethod('bca');
  const perc = byMethod('percentile');
  const methods: string[] = [];
  if (bca.length) methods.push(`bias-corrected and accelerated (BCa; ${c.cite('efron1987')}) for ${list(bca)}`);
  if (perc.length) methods.push(`percentile intervals (${c.cite('efron1993')}) for ${list(perc)}`);
  const resamples = uniq(recs.map((x) => x.r.resamples));
  const seeds = uniq(recs.map((x) => x.r.seed));
  s.push(
    `Confidence intervals are ${list(levels.map(pct))} bootstrap intervals: ${methods.join('; ')}; ` +
      `each from ${list(resamples.map(String))} resamples, with random seed ${list(seeds.map(String))}.`,
  );
  const resampledBy = (kind: string) => uniq(recs.filter((x) => x.r.resampling === kind).map((x) => labelOf(x.name)));
  const units = resampledBy('units');
  if (units.length) s.push(`For ${list(units)}, units were resampled with replacement.`);
  const stim = resampledBy('stimuli');
  if (stim.length) s.push(`For ${list(stim)}, stimuli were resampled with replacement.`);
  const bins = resampledBy('bins');
  if (bins.length) s.push(`For ${list(bins)}, single bins were resampled with replacement.`);
  const blockRecs = recs.filter((x) => x.r.resampling === 'blocks-of-bins');
  if (blockRecs.length) {
    const perDs = uniq(blockRecs.map((x) => x.ds.id)).map((id) => {
      const r = blockRecs.find((x) => x.ds.id === id)!.r;
      return { id, len: r.blockLength, choice: r.blockLengthChoice };
    });
    const auto = perDs.some((d) => d.choice === 'auto');
    const lens = perDs.map((d) => `${d.len} bins (${u(d.id)}${d.choice === 'set' ? ', set in the manifest' : ''})`);
    // Past a handful of datasets the list stops being readable: give the range (each dataset's
    // length is on its page and in results.json).
    const many = perDs.length > 4 ? blockRange(perDs.map((d) => d.len)) : null;
    s.push(
      `For ${list(uniq(blockRecs.map((x) => labelOf(x.name))))}, which are computed per time bin and may be autocorrelated, a moving-block bootstrap (${c.cite('kunsch1989')}) resampled blocks of consecutive bins; ` +
        (auto ? `the block length was chosen automatically for each dataset (${c.cite('politis2004', 'patton2009')})` : 'the block length was') +
        (many ? `${auto ? ', ' : ' '}${many} across the ${perDs.length} datasets.` : `${auto ? ': ' : ' '}${list(lens)}.`),
    );
  }
  const without: string[] = [];
  for (const ds of result.datasets)
    for (const [name, m] of Object.entries(ds.measures)) if (m && m.estimate !== null && !m.interval) without.push(`${measureLabel(name)} in ${u(ds.id)}${m.note ? ` (${u(m.note)})` : ''}`);
  if (without.length) s.push(`No interval was computed for ${list(without)}.`);
  return s.join(' ');
}

/**
 * The findings in words, by kind, with their total counts and the datasets concerned (no
 * internal codes): what was left out, what may bias an estimate, and what was routine.
 */
function findingSentences(result: AuditResult): string[] {
  const byKind = new Map<string, { level: string; kind: string; count: number; datasets: string[] }>();
  for (const d of result.datasets) {
    for (const f of d.findings) {
      const key = `${f.level}\u0000${f.code}`;
      const k = byKind.get(key) ?? { level: f.level, kind: findingKind(f.code), count: 0, datasets: [] };
      k.count += f.count;
      if (!k.datasets.includes(d.id)) k.datasets.push(d.id);
      byKind.set(key, k);
    }
  }
  const phrase = (level: string) =>
    list(
      [...byKind.values()]
        .filter((k) => k.level === level)
        .map((k) => `${u(k.kind)} (${count(k.count)}, in ${k.datasets.length <= 3 ? list(k.datasets.map(u)) : `${k.datasets.length} datasets`})`),
    );
  const s: string[] = [];
  const ex = phrase('exclude');
  const ca = phrase('caution');
  const no = phrase('notice');
  s.push(ex ? `Data that could not be measured were left out and counted: ${ex}.` : 'No data were left out as unmeasurable.');
  if (ca) s.push(`Possible sources of bias were flagged: ${ca}.`);
  if (no) s.push(`Routine findings, expected by the definitions of the measures or the formats: ${no}.`);
  return s;
}

function exclusionsAndDrift(result: AuditResult, c: ReturnType<typeof citer>): string {
  const s: string[] = [...findingSentences(result)];
  s.push('The number of items each estimate summarises and the number left out are listed with every estimate.');
  const dr = result.drift;
  if (dr) {
    const ds = obj(result.parameters.drift);
    const base = num(ds.baseline_months);
    const chart =
      dr.chart === 'ewma'
        ? `an exponentially weighted moving-average chart (${c.cite('roberts1959')}; λ = ${num(ds.ewma_lambda)}, limits at ±${num(ds.ewma_L)}σ)`
        : `a tabular CUSUM chart (${c.cite('page1954')}; *K* = ${num(ds.cusum_k)}σ, *H* = ${num(ds.cusum_h)}σ)`;
    const adj = dr.adjustment === 'holm' ? ` with Holm’s procedure (${c.cite('holm1979')})` : dr.adjustment === 'bh' ? ` with the Benjamini–Hochberg procedure (${c.cite('benjamini1995')})` : '';
    const months = dr.months.length;
    const span = months ? ` (${u(dr.months[0])}${months > 1 ? ` to ${u(dr.months[months - 1])}` : ''})` : '';
    s.push(
      `Monthly estimates over ${months} month${months === 1 ? '' : 's'}${span} were screened for drift with ${chart}` +
        (base !== null ? ` against a baseline of the first ${base} month${base === 1 ? '' : 's'}` : '') +
        `; monotonic trends were tested with the Mann–Kendall test (${c.cite('gilbert1987')}) and sized with the Theil–Sen slope (${c.cite('theil1950', 'sen1968')}), ` +
        (dr.adjustment === 'none' ? `without adjustment of the ${dr.testsRun} p-values.` : `and the p-values of the ${dr.testsRun} tests were adjusted${adj}.`),
    );
    // The pooling rule is a sentence of its own (it carries its own parentheses and colon).
    const pooling = dr.pooling.trim();
    if (pooling) s.push(/[.!?]$/.test(pooling) ? u(pooling) : `${u(pooling)}.`);
  }
  return s.join(' ');
}

/**
 * The methods paragraphs of an audit, as Markdown and as plain text, plus the citation keys
 * they use (all present in `citations.ts`, so `bibtex(citations)` gives their entries).
 */
export function methodsText(result: AuditResult): { markdown: string; plain: string; citations: string[] } {
  const c = citer();
  const paras = [measuresParagraph(result, c), intervalParagraph(result, c), exclusionsAndDrift(result, c)].map(render);
  return { markdown: paras.map((p) => p.markdown).join('\n\n'), plain: paras.map((p) => p.plain).join('\n\n'), citations: c.keys };
}

/** The cautions a reader needs, as a Markdown bullet list and as plain lines; `items` are the plain sentences. */
export function cautionsText(result: AuditResult): { markdown: string; plain: string; items: string[] } {
  const recs = records(result);
  const items: string[] = [];
  const kinds = uniq(recs.map((x) => x.r.resampling));
  if (kinds.includes('units') || kinds.includes('stimuli') || kinds.includes('bins')) {
    const what = kinds.filter((k) => k !== 'blocks-of-bins').join(', ');
    items.push(`Intervals that resample ${u(what)} assume those items are independent draws from the population of interest; units that share inputs or noise, or that come from one animal or session, make intervals too narrow for claims beyond the recorded items.`);
  }
  if (kinds.includes('blocks-of-bins')) {
    const lens = uniq(recs.filter((x) => x.r.resampling === 'blocks-of-bins').map((x) => x.r.blockLength));
    const said = lens.length > 4 ? blockRange(lens) : `${lens.join(', ')} bins`;
    items.push(`Moving-block intervals assume the bin series is stationary and that its dependence is shorter than the block length (${said}); slow drift within a recording, or dependence longer than a block, makes them too narrow.`);
  }
  if (result.drift) items.push('Drift flags (control-chart signals and trend tests) are screening aids, not tests of a hypothesis fixed in advance: a flagged month asks for a look at the data and the lab’s notes, and thin months carry little weight.');
  const neg = str(result.parameters.negatives);
  const negs = hadNegatives(result);
  if (result.kind === 'activity' && negs && neg === 'keep') items.push('Negative values were kept, so sparseness values above 1 can occur; they reflect baseline subtraction, not a sparser code.');
  if (result.kind === 'activity' && negs && (neg === 'rectify' || neg === 'shift')) items.push(`Negative values were ${neg === 'rectify' ? 'set to zero' : 'shifted'}; the measures then depend on how the baseline was subtracted upstream.`);
  const ev = result.parameters.events !== null && result.parameters.events !== undefined;
  if (ev || result.datasets.some((d) => d.eventMeasures && Object.keys(d.eventMeasures).length > 0)) {
    items.push('Sparseness of events detected in fluorescence traces depends on the indicator’s kinetics and on the detection threshold; it is not directly comparable with sparseness of spike counts.');
  }
  items.push('Data from human participants may be published, with this report and its files, only under the approvals and consents that cover them (ethics review, data protection); the report names input files and their hashes.');
  const cautions = result.datasets.reduce((a, d) => a + d.findings.filter((f) => f.level === 'caution').length, 0);
  if (cautions) items.push(`${cautions} caution finding${cautions === 1 ? ' is' : 's are'} listed with ${cautions === 1 ? 'its dataset' : 'the datasets'}; read ${cautions === 1 ? 'it' : 'them'} before using the estimates.`);
  const r = items.map(render);
  return { markdown: r.map((x) => `- ${x.markdown}`).join('\n') + '\n', plain: r.map((x) => x.plain).join('\n') + '\n', items: r.map((x) => x.plain) };
}
