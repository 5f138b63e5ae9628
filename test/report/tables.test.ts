/**
 * Summary table downloads. CSV is read back by a small RFC 4180 parser written here from the
 * RFC's grammar (RFC 4180 §2) and, where python3 is present, by Python's `csv` module.
 */
import { describe, expect, it } from 'vitest';
import { COLUMNS, CSV_DIGITS, escapeLatex, formatSig, markdownCell, summaryRows, toCsv, toLatex, toMarkdown, type SummaryRow } from '../../src/report/tables.ts';
import { activityFixture, weightsFixture } from '../fixtures/audit-result.ts';
import { hasScipy, runPython } from '../helpers/python.ts';

/** RFC 4180 §2: records end in CRLF; a field is quoted or not; inside quotes `""` is `"`, and CR, LF and `,` are data. */
function parseCsv(text: string): string[][] {
  const records: string[][] = [];
  let field = '';
  let rec: string[] = [];
  let i = 0;
  let quoted = false;
  while (i < text.length) {
    const ch = text[i]!;
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') { field += '"'; i += 2; continue; }
      if (ch === '"') { quoted = false; i++; continue; }
      field += ch; i++; continue;
    }
    if (ch === '"' && field === '') { quoted = true; i++; continue; }
    if (ch === ',') { rec.push(field); field = ''; i++; continue; }
    if (ch === '\r' && text[i + 1] === '\n') { rec.push(field); records.push(rec); rec = []; field = ''; i += 2; continue; }
    if (ch === '"' || ch === '\n' || ch === '\r') throw new Error(`bare ${JSON.stringify(ch)} at ${i}`);
    field += ch; i++;
  }
  if (field !== '' || rec.length) throw new Error('last record not ended by CRLF');
  return records;
}

const nasty: SummaryRow = {
  dataset: 'rig "B", left\r\nhemisphere',
  month: '2024-03',
  group: 'a|b & c_d 100% $5 #1 {x} ~y ^z \\w',
  measure: 'population_sparseness',
  estimate: 0.4948261737089201,
  lower: 1.23456789e-7,
  upper: null,
  level: 0.95,
  method: null,
  n: 5964,
  excluded: 0,
};

/** What a reader of the CSV should get back for a row: strings verbatim, numbers to CSV_DIGITS significant digits. */
function expected(r: SummaryRow): string[] {
  return COLUMNS.map((c) => {
    const v = r[c];
    if (v === null) return '';
    if (typeof v === 'number') return c === 'estimate' || c === 'lower' || c === 'upper' ? String(Number(v.toPrecision(CSV_DIGITS))) : String(v);
    return v;
  });
}

describe('summaryRows', () => {
  it('gives one row per dataset × measure, event measures prefixed', () => {
    const r = activityFixture();
    const rows = summaryRows(r);
    // Fixture: 7 measures in dataset 1, 5 + 1 event measure in dataset 2.
    expect(rows.length).toBe(13);
    const ps = rows.find((x) => x.dataset === 'rig-a-2024-01' && x.measure === 'population_sparseness')!;
    const m = r.datasets[0]!.measures.population_sparseness!;
    expect([ps.estimate, ps.lower, ps.upper, ps.level, ps.method, ps.n, ps.excluded]).toEqual([m.estimate, m.interval![0], m.interval![1], m.level, m.method, m.n, m.excluded]);
    expect(rows.some((x) => x.measure === 'event_population_sparseness')).toBe(true);
    const hoyer2 = rows.find((x) => x.dataset === 'rig-a-2024-02' && x.measure === 'hoyer')!;
    expect([hoyer2.lower, hoyer2.upper]).toEqual([null, null]);
  });
});

describe('formatSig', () => {
  it('rounds to the stated significant digits (by hand)', () => {
    expect(formatSig(0.4948261737089201, 4)).toBe('0.4948');
    expect(formatSig(4.4555, 2)).toBe('4.5'); // 4.4555 → 4.5 at 2 significant digits
    expect(formatSig(5964, 6)).toBe('5964');
    expect(formatSig(1.23456789e-7, 3)).toBe('1.23e-7');
  });
});

describe('toCsv (RFC 4180)', () => {
  const rows = [...summaryRows(activityFixture()), ...summaryRows(weightsFixture()), nasty];
  const csv = toCsv(rows);

  it('parses back to the rows with an independent parser', () => {
    const parsed = parseCsv(csv);
    expect(parsed[0]).toEqual([...COLUMNS]);
    expect(parsed.slice(1)).toEqual(rows.map(expected));
  });

  it('quotes only fields that need it and doubles quotes', () => {
    expect(csv).toContain('"rig ""B"", left\r\nhemisphere"');
    expect(csv.split('\r\n')[1]!.startsWith('rig-a-2024-01,2024-01,rig A,population_sparseness,')).toBe(true);
  });

  describe.skipIf(!hasScipy)('read by Python’s csv module', () => {
    it('gives the same records', () => {
      const got = runPython<string[][]>('import csv, io\nprint(json.dumps(list(csv.reader(io.StringIO(inp, newline="")))))', csv);
      expect(got).toEqual([[...COLUMNS], ...rows.map(expected)]);
    });
  });
});

describe('toMarkdown', () => {
  it('escapes pipes so every line has exactly the column count', () => {
    const md = toMarkdown([nasty, ...summaryRows(activityFixture())]);
    const lines = md.trimEnd().split('\n');
    for (const line of lines) {
      // Split on pipes not preceded by a backslash (GFM cell rule); drop the outer empties.
      const cells = line.split(/(?<!\\)\|/).slice(1, -1);
      expect(cells.length).toBe(COLUMNS.length);
    }
    expect(md).toContain('a\\|b');
    expect(md).toContain('\\\\w'); // a backslash is doubled before pipes are escaped
    expect(md).not.toMatch(/hemisphere\r?\n/); // line breaks in a cell become spaces
    expect(markdownCell('x|y')).toBe('x\\|y');
    expect(md).toContain('| — |'); // missing upper bound
  });
});

describe('toLatex', () => {
  it('escapes each LaTeX special (LaTeX 2e manual: the ten special characters)', () => {
    const cases: [string, string][] = [
      ['\\', '\\textbackslash{}'],
      ['&', '\\&'],
      ['%', '\\%'],
      ['$', '\\$'],
      ['#', '\\#'],
      ['_', '\\_'],
      ['{', '\\{'],
      ['}', '\\}'],
      ['~', '\\textasciitilde{}'],
      ['^', '\\textasciicircum{}'],
    ];
    for (const [raw, esc] of cases) expect(escapeLatex(`a${raw}b`)).toBe(`a${esc}b`);
    // One pass: the braces added for \textbackslash{} are not escaped again.
    expect(escapeLatex('\\{')).toBe('\\textbackslash{}\\{');
  });

  it('writes a booktabs tabular with escaped cells', () => {
    const tex = toLatex([nasty]);
    expect(tex).toMatch(/^\\begin\{tabular\}\{llllrrrrlrr\}\n\\toprule\n/);
    expect(tex).toContain('\\midrule');
    expect(tex).toContain('\\bottomrule\n\\end{tabular}');
    expect(tex).toContain('a|b \\& c\\_d 100\\% \\$5 \\#1 \\{x\\} \\textasciitilde{}y \\textasciicircum{}z \\textbackslash{}w');
    expect(tex).toContain('population\\_sparseness');
    // Body line: after removing escapes and the row end, no raw special is left.
    const body = tex.split('\n')[4]!.replace(/ \\\\$/, '');
    const stripped = body.replace(/\\(textbackslash|textasciitilde|textasciicircum)\{\}/g, '').replace(/\\[&%$#_{}]/g, '');
    // `&` are the column separators; every other special must have been escaped.
    expect(stripped).not.toMatch(/[\\%$#_{}~^]/);
    expect(stripped.split('&').length).toBe(COLUMNS.length);
  });
});
