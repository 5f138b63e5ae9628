/**
 * The summary table of an audit — one row per dataset × measure — and its downloads:
 * CSV (RFC 4180; user text neutralised against spreadsheet formulas), Markdown (GitHub table
 * syntax; HTML in user text escaped) and LaTeX (booktabs).
 *
 * Numbers are written to a stated number of significant digits (CSV_DIGITS for CSV,
 * TABLE_DIGITS for Markdown and LaTeX, both overridable), trailing zeros dropped; counts
 * (n, excluded) exactly; a missing value is an empty CSV field and an em dash elsewhere.
 */
import type { AuditResult, MeasureResult } from '../types.ts';

export interface SummaryRow {
  dataset: string;
  month: string | null;
  group: string | null;
  /** Measure name as in results.json; event-based measures are prefixed `event_`. */
  measure: string;
  estimate: number | null;
  lower: number | null;
  upper: number | null;
  level: number | null;
  method: string | null;
  n: number;
  excluded: number;
}

export const COLUMNS = ['dataset', 'month', 'group', 'measure', 'estimate', 'lower', 'upper', 'level', 'method', 'n', 'excluded'] as const satisfies readonly (keyof SummaryRow)[];
const NUMERIC = new Set<keyof SummaryRow>(['estimate', 'lower', 'upper', 'level', 'n', 'excluded']);
const ROUNDED = new Set<keyof SummaryRow>(['estimate', 'lower', 'upper']);

/** Significant digits in CSV (enough to re-plot without visible loss). */
export const CSV_DIGITS = 6;
/** Significant digits in Markdown and LaTeX tables (for reading). */
export const TABLE_DIGITS = 4;

function row(ds: AuditResult['datasets'][number], measure: string, m: MeasureResult): SummaryRow {
  return {
    dataset: ds.id,
    month: ds.month,
    group: ds.group,
    measure,
    estimate: m.estimate,
    lower: m.interval ? m.interval[0] : null,
    upper: m.interval ? m.interval[1] : null,
    level: m.level,
    method: m.method,
    n: m.n,
    excluded: m.excluded,
  };
}

/** One row per dataset × measure (then its event-based measures), in results order. */
export function summaryRows(result: AuditResult): SummaryRow[] {
  const out: SummaryRow[] = [];
  for (const ds of result.datasets) {
    for (const [name, m] of Object.entries(ds.measures)) if (m) out.push(row(ds, name, m));
    for (const [name, m] of Object.entries(ds.eventMeasures ?? {})) if (m) out.push(row(ds, `event_${name}`, m));
  }
  return out;
}

/** `x` to `digits` significant digits, trailing zeros dropped ("0.4948", "1.2e-7"). Non-finite: "NaN"/"Infinity". */
export function formatSig(x: number, digits: number): string {
  if (!Number.isFinite(x)) return String(x);
  return String(Number(x.toPrecision(digits)));
}

function cellText(r: SummaryRow, c: keyof SummaryRow, digits: number): string | null {
  const v = r[c];
  if (v === null || v === undefined) return null;
  if (typeof v === 'number') return ROUNDED.has(c) ? formatSig(v, digits) : String(v);
  return v;
}

/** One CSV field, quoted when it holds a comma, a double quote, CR or LF (RFC 4180 §2.6–2.7). */
export function csvField(s: string): string {
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/**
 * A text cell of a CSV export made inert for spreadsheets (formula or "CSV injection"): a cell
 * that starts with `=`, `+`, `-`, `@`, a tab or a carriage return is prefixed with a single
 * quote, which spreadsheets show as text, as the OWASP "CSV Injection" page advises; then quoted
 * as RFC 4180 requires. Only for text taken from users (ids, months, groups, names): numbers
 * this program formats are written as numbers, so a negative estimate stays `-0.25`.
 */
export function csvTextField(s: string): string {
  return csvField(/^[=+\-@\t\r]/.test(s) ? `'${s}` : s);
}

/** RFC 4180 CSV: a header line, CRLF line ends (also after the last record), missing = empty field. */
export function toCsv(rows: SummaryRow[], options: { digits?: number } = {}): string {
  const digits = options.digits ?? CSV_DIGITS;
  const lines = [COLUMNS.join(',')];
  const field = (r: SummaryRow, c: keyof SummaryRow) => {
    const t = cellText(r, c, digits) ?? '';
    return NUMERIC.has(c) ? csvField(t) : csvTextField(t);
  };
  for (const r of rows) lines.push(COLUMNS.map((c) => field(r, c)).join(','));
  return lines.join('\r\n') + '\r\n';
}

/**
 * A Markdown table cell: `&`, `<` and `>` written as HTML entities (Markdown passes raw HTML
 * through, so a user's `<script>` or `<img onerror=…>` would reach a rendered page), backslashes
 * and pipes escaped, line breaks turned into spaces.
 */
export function markdownCell(s: string): string {
  return s
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;')
    .replace(/>/g, '&gt;')
    .replace(/\\/g, '\\\\')
    .replace(/\|/g, '\\|')
    .replace(/\r\n|\r|\n/g, ' ');
}

/** A GitHub-style Markdown table; numeric columns right-aligned. */
export function toMarkdown(rows: SummaryRow[], options: { digits?: number } = {}): string {
  const digits = options.digits ?? TABLE_DIGITS;
  const head = `| ${COLUMNS.join(' | ')} |`;
  const rule = `|${COLUMNS.map((c) => (NUMERIC.has(c) ? '---:' : ':---')).join('|')}|`;
  const body = rows.map((r) => `| ${COLUMNS.map((c) => markdownCell(cellText(r, c, digits) ?? '—')).join(' | ')} |`);
  return [head, rule, ...body].join('\n') + '\n';
}

const LATEX_SPECIALS: Record<string, string> = {
  '\\': '\\textbackslash{}',
  '&': '\\&',
  '%': '\\%',
  $: '\\$',
  '#': '\\#',
  _: '\\_',
  '{': '\\{',
  '}': '\\}',
  '~': '\\textasciitilde{}',
  '^': '\\textasciicircum{}',
};

/** Escape LaTeX's special characters `\ & % $ # _ { } ~ ^` in one pass (no double escaping). */
export function escapeLatex(s: string): string {
  return s.replace(/[\\&%$#_{}~^]/g, (ch) => LATEX_SPECIALS[ch]!).replace(/\r\n|\r|\n/g, ' ');
}

/** A booktabs `tabular` (needs `\usepackage{booktabs}`); numeric columns right-aligned. */
export function toLatex(rows: SummaryRow[], options: { digits?: number } = {}): string {
  const digits = options.digits ?? TABLE_DIGITS;
  const spec = COLUMNS.map((c) => (NUMERIC.has(c) ? 'r' : 'l')).join('');
  const line = (cells: string[]) => `${cells.join(' & ')} \\\\`;
  return [
    `\\begin{tabular}{${spec}}`,
    '\\toprule',
    line(COLUMNS.map((c) => escapeLatex(c))),
    '\\midrule',
    ...rows.map((r) => line(COLUMNS.map((c) => { const t = cellText(r, c, digits); return t === null ? '---' : escapeLatex(t); }))),
    '\\bottomrule',
    '\\end{tabular}',
    '',
  ].join('\n');
}
