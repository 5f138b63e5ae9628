/**
 * summary.tex: one row per dataset with the measures as columns, a longtable that breaks across
 * pages, landscape when the columns are many, the packages it needs named at its top, user
 * text escaped. (LaTeX itself is not installed here: the structure is checked, against the
 * longtable and booktabs package documentation for the commands used.)
 */
import { describe, expect, it } from 'vitest';
import { latexNumber, summaryTex } from '../../src/report/summary-tex.ts';
import { activityFixture, weightsFixture } from '../fixtures/audit-result.ts';

/** Body rows that hold a dataset (they start with its \texttt id). */
const datasetRows = (tex: string) => tex.split('\n').filter((l) => l.startsWith('\\texttt{'));
/** Column separators of a row, not counting escaped ampersands. */
const cells = (row: string) => row.replace(/\\&/g, '').split('&').length;

describe('summaryTex', () => {
  it('activity fixture: a row per dataset, a column per measure, its interval on the line below', () => {
    const r = activityFixture();
    const tex = summaryTex(r);
    expect(tex.split('\n')[1]).toBe('% Needs in the preamble: \\usepackage{booktabs} \\usepackage{longtable} \\usepackage{pdflscape}');
    const rows = datasetRows(tex);
    expect(rows.length).toBe(r.datasets.length);
    // 7 measures + event-based population sparseness = 8 measure columns, plus dataset and group.
    expect(tex).toContain('\\begin{longtable}{llrrrrrrrr}');
    for (const row of rows) expect(cells(row)).toBe(10);
    // rig-a-2024-01 population sparseness 0.4948… → 0.495, interval [0.4712, 0.5179] → [0.471, 0.518] (fixture).
    expect(rows[0]).toMatch(/^\\texttt\{rig-a-2024-01\} & rig A & 0\.495 & /);
    const below = tex.split('\n')[tex.split('\n').indexOf(rows[0]!) + 1]!;
    expect(below).toMatch(/^ &  & \{\\scriptsize \[0\.471, 0\.518\]\} & /);
    // 8 measure columns > 5: a landscape page; column heads repeat on every page (\endhead).
    expect(tex).toContain('\\begin{landscape}');
    expect(tex).toContain('\\endhead');
    expect(tex.match(/\\begin\{/g)?.length).toBe(tex.match(/\\end\{/g)?.length);
  });

  it('weights fixture: no interval row, portrait when the columns are few', () => {
    const r = weightsFixture();
    const tex = summaryTex(r);
    expect(datasetRows(tex).length).toBe(r.datasets.length);
    expect(tex).not.toContain('\\scriptsize');
    const measureCols = Object.keys(r.datasets[0]!.measures).length;
    expect(tex.includes('\\begin{landscape}')).toBe(measureCols > 5);
    expect(tex).toContain('estimate of each measure per dataset (no sampling intervals).}'); // the caption says so
  });

  it('escapes dataset ids and groups, and writes small numbers in math mode', () => {
    const r = activityFixture();
    r.datasets[0]!.id = 'a_b & 100%';
    r.datasets[0]!.group = '#1 {x}';
    const tex = summaryTex(r);
    expect(tex).toContain('\\texttt{a\\_b \\& 100\\%} & \\#1 \\{x\\} &');
    expect(latexNumber(0.000123)).toBe('$1.23\\times10^{-4}$');
    expect(latexNumber(-0.5)).toBe('$-$0.500');
    expect(latexNumber(null)).toBe('---');
  });
});
