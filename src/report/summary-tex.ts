/**
 * `summary.tex`: the version page's overview table for a manuscript — one row per dataset,
 * one column per measure, each cell the estimate with its confidence interval on the line
 * below in smaller type, datasets grouped by month.
 *
 * It is a `longtable` (so any number of datasets breaks across pages, with the column heads
 * repeated) with booktabs rules; with more than five measure columns it is set on a landscape
 * page (`pdflscape`). The packages it needs are named in a comment at its top. Numbers have
 * three significant digits, as on the page; values below 0.001 or of 10,000 and more are
 * written as a × 10^k in math mode. Dataset ids and groups are user text: escaped.
 */
import type { AuditResult, MeasureResult } from '../types.ts';
import { byMonthGroup, columnLabel, columnOrder, measureOf } from './site-overview.ts';
import { formatLevel, formatMethod, formatNumber, NONE } from './site-format.ts';
import { escapeLatex } from './tables.ts';

/** Measure columns beyond this many turn the page to landscape. */
export const PORTRAIT_MAX_COLUMNS = 5;

/** A number as LaTeX: `0.991`, `$1.23\times10^{-4}$`, `---` for none. */
export function latexNumber(x: number | null | undefined): string {
  const s = formatNumber(x);
  if (s === NONE) return '---';
  const m = /^(-?[\d.]+)e([+-]?\d+)$/.exec(s);
  if (m) return `$${m[1]}\\times10^{${Number(m[2])}}$`;
  return s.replace(/^-/, '$-$');
}

/** The whole `summary.tex`. */
export function summaryTex(result: AuditResult): string {
  const keys = columnOrder(result); // the page's overview columns, in its order
  const landscape = keys.length > PORTRAIT_MAX_COLUMNS;
  const cols = 2 + keys.length;
  const all = result.datasets.flatMap((d) => keys.map((k) => measureOf(d, k)).filter((m): m is MeasureResult => m !== undefined));
  const kinds = [...new Set(all.filter((m) => m.interval).map((m) => `${formatLevel(m.level)} ${formatMethod(m.method)}`))];
  const intervalWords = kinds.length ? `, with its ${kinds.join(' or ')} confidence interval below it` : ' (no sampling intervals)';
  const line = (cells: string[]) => `${cells.join(' & ')} \\\\`;
  const head = line(['Dataset', 'Group', ...keys.map((k) => `\\multicolumn{1}{c}{${escapeLatex(columnLabel(k))}}`)]);
  const sorted = [...result.datasets].sort(byMonthGroup);
  const body: string[] = [];
  let month: string | null | undefined;
  for (const ds of sorted) {
    if (ds.month !== month) {
      month = ds.month;
      if (body.length) body.push('\\addlinespace');
      body.push(`\\multicolumn{${cols}}{l}{\\textit{${escapeLatex(ds.month ?? 'month not set')}}} \\\\`);
    }
    const ms = keys.map((k) => measureOf(ds, k));
    body.push(line([`\\texttt{${escapeLatex(ds.id)}}`, escapeLatex(ds.group ?? ''), ...ms.map((m) => (m ? latexNumber(m.estimate) : '---'))]));
    if (ms.some((m) => m?.interval)) {
      body.push(`${line(['', '', ...ms.map((m) => (m?.interval ? `{\\scriptsize [${latexNumber(m.interval[0])}, ${latexNumber(m.interval[1])}]}` : ''))])}[2pt]`);
    }
  }
  const caption = `${escapeLatex(result.title)} (${escapeLatex(result.version)}): estimate of each measure per dataset${escapeLatex(intervalWords)}.`;
  return [
    `% summary.tex: ${result.title.replace(/[\r\n]+/g, ' ')}, version ${result.version}, written by Lacuna ${result.tool.version}.`,
    `% Needs in the preamble: \\usepackage{booktabs} \\usepackage{longtable}${landscape ? ' \\usepackage{pdflscape}' : ''}`,
    `% (${landscape ? 'pdflscape turns the page for the table; lscape does the same without turning the PDF page. ' : ''}Then \\input{summary.tex} where the table goes.)`,
    `% One row per dataset (${result.datasets.length}), grouped by month; each cell is the estimate with its interval below.`,
    ...(landscape ? ['\\begin{landscape}'] : []),
    '{\\small',
    '\\setlength{\\tabcolsep}{4pt}',
    `\\begin{longtable}{ll${'r'.repeat(keys.length)}}`,
    `\\caption{${caption}}\\\\`,
    '\\toprule',
    head,
    '\\midrule',
    '\\endfirsthead',
    '\\toprule',
    head,
    '\\midrule',
    '\\endhead',
    '\\bottomrule',
    '\\endfoot',
    ...body,
    '\\end{longtable}',
    '}',
    ...(landscape ? ['\\end{landscape}'] : []),
    '',
  ].join('\n');
}
