/**
 * Downloads made from user text must not run anything where they are opened.
 *
 * - summary.csv: text cells starting with `=`, `+`, `-`, `@`, tab or CR get a leading `'` (the
 *   OWASP "CSV Injection" advice), so spreadsheets show them as text; numbers we format stay
 *   numbers (a negative estimate is still `-0.25`). Read back with Python's csv module (an RFC 4180
 *   reader outside this project).
 * - summary.md: `<`, `>` and `&` in user text become entities, so a Markdown renderer passes no raw
 *   HTML through; checked by rendering with markdown-it (html enabled, as GitHub-style renderers do).
 */
import MarkdownIt from 'markdown-it';
import { describe, expect, it } from 'vitest';
import { toCsv, toMarkdown, type SummaryRow } from '../../src/report/tables.ts';
import { hasScipy, runPython } from '../helpers/python.ts';

const base: SummaryRow = {
  dataset: 'd', month: null, group: null, measure: 'hoyer', estimate: -0.25, lower: -0.5, upper: 0.1,
  level: 0.95, method: 'bca', n: 10, excluded: 0,
};
const hostile = ['=HYPERLINK("http://x.invalid","c")', '+1+2', '-2+3', '@SUM(A1)', '\t=1', '\r=1'];
const rows: SummaryRow[] = hostile.map((dataset) => ({ ...base, dataset, group: '=cmd|"/c calc"!A1' }));

describe.skipIf(!hasScipy)('summary.csv against spreadsheet formulas', () => {
  it("text cells that start a formula get a leading ', numbers stay numbers (read by Python's csv)", () => {
    const parsed = runPython<string[][]>(
      'import csv, io\nprint(json.dumps(list(csv.reader(io.StringIO(inp, newline=""))))) ',
      toCsv(rows),
    );
    const [head, ...body] = parsed;
    const col = (name: string) => head.indexOf(name);
    body.forEach((r, i) => {
      expect(r[col('dataset')]).toBe(`'${hostile[i]}`);
      expect(r[col('group')]).toBe(`'=cmd|"/c calc"!A1`);
      expect(r[col('estimate')]).toBe('-0.25');
      expect(r[col('lower')]).toBe('-0.5');
    });
  });
  it('ordinary text is written unchanged', () => {
    const parsed = runPython<string[][]>('import csv, io\nprint(json.dumps(list(csv.reader(io.StringIO(inp, newline="")))))', toCsv([{ ...base, dataset: 'rig-a 2026' }]));
    expect(parsed[1][0]).toBe('rig-a 2026');
  });
});

describe('summary.md against raw HTML', () => {
  it('a user string with tags renders as text, not HTML (markdown-it, html: true)', () => {
    const md = toMarkdown([{ ...base, dataset: '<img src=x onerror=alert(1)>', group: '<script>alert(1)</script> & co' }]);
    const html = new MarkdownIt({ html: true }).render(md);
    expect(html).not.toMatch(/<img|<script/);
    expect(html).toContain('&lt;img src=x onerror=alert(1)&gt;');
    expect(html).toContain('&lt;script&gt;alert(1)&lt;/script&gt; &amp; co');
  });
});
