/**
 * CSV/TSV numeric matrices. Source: the values written into each small file in the test, and the
 * rules stated in src/readers/csv.ts (header detection, NaN cells, 1-based row/column counting the
 * header). numpy's `np.savetxt` output is also read back (live cross-check, skipped without numpy).
 */
import { describe, it, expect, afterAll } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { openDataset } from '../../src/readers/index.ts';
import { hasScipy, runPythonScript } from '../helpers/python.ts';
import { dataset, readAll, tempDir, errorOf, firstDifference } from './helpers.ts';

const tmp = tempDir();
afterAll(tmp.cleanup);
const ctx = { kind: 'activity' as const, binMs: 10, workspaceRoot: tmp.dir };
function file(name: string, text: string): string {
  writeFileSync(join(tmp.dir, name), text);
  return join(tmp.dir, name);
}

describe('CSV and TSV matrices', () => {
  it('reads a headerless CSV as units-by-bins, with NaN, nan and empty cells as NaN', async () => {
    const f = file('a.csv', '1,2.5,-3\r\nNaN,,nan\n1e2, 0.5 ,inf\n\n');
    const src = await openDataset(dataset(tmp.dir, [f], 'csv'), ctx);
    if (src.kind !== 'activity') throw new Error('kind');
    expect([src.units, src.bins, src.unitLabels, src.findings.length]).toEqual([3, 3, undefined, 0]);
    expect(firstDifference(await readAll(src), [1, 2.5, -3, NaN, NaN, NaN, 100, 0.5, Infinity])).toBe(-1);
  });

  it('uses a header as unit labels for bins-by-units', async () => {
    const f = file('h.tsv', 'cell a\tcell b\n1\t2\n3\t4\n5\t6\n');
    const src = await openDataset(dataset(tmp.dir, [f], 'tsv', { layout: 'bins-by-units' }), ctx);
    if (src.kind !== 'activity') throw new Error('kind');
    expect(src.unitLabels).toEqual(['cell a', 'cell b']);
    // Columns are units: unit 0 = 1,3,5 and unit 1 = 2,4,6.
    expect(Array.from(await readAll(src))).toEqual([1, 3, 5, 2, 4, 6]);
  });

  it('ignores a header for units-by-bins with a notice finding', async () => {
    const f = file('h.csv', 't0,t1\n1,2\n3,4\n');
    const src = await openDataset(dataset(tmp.dir, [f], 'csv'), ctx);
    expect(src.findings.map((x) => [x.level, x.code])).toEqual([['notice', 'header-ignored']]);
    expect(Array.from(await readAll(src))).toEqual([1, 2, 3, 4]);
  });

  it('names row and column (1-based, counting the header) of a ragged row', async () => {
    const f = file('r.csv', 'a,b,c\n1,2,3\n4,5\n');
    const e = await errorOf(() => openDataset(dataset(tmp.dir, [f], 'csv'), ctx));
    expect([e.name, e.file, e.where]).toEqual(['InputError', 'r.csv', 'row 3, column 3']);
    expect(e.message).toMatch(/row has 2 cells, expected 3/);
    const g = file('r2.csv', '1,2\n3,4,5\n');
    expect((await errorOf(() => openDataset(dataset(tmp.dir, [g], 'csv'), ctx))).where).toBe('row 2, column 3');
  });

  it('names row and column of a non-numeric cell', async () => {
    const f = file('n.csv', 'x,y\n1,2\n3,abc\n');
    const e = await errorOf(() => openDataset(dataset(tmp.dir, [f], 'csv'), ctx));
    expect([e.file, e.where]).toEqual(['n.csv', 'row 3, column 2']);
    expect(e.message).toMatch(/"abc" is not a number/);
    // Hexadecimal is not decimal notation even though JavaScript's Number() accepts it.
    const h = file('hex.csv', '1,2\n1,0x10\n');
    expect((await errorOf(() => openDataset(dataset(tmp.dir, [h], 'csv'), ctx))).where).toBe('row 2, column 2');
  });

  it('refuses an empty file and a header with no rows', async () => {
    expect((await errorOf(() => openDataset(dataset(tmp.dir, [file('e.csv', '')], 'csv'), ctx))).message).toMatch(/empty/);
    expect((await errorOf(() => openDataset(dataset(tmp.dir, [file('ho.csv', 'a,b\n')], 'csv'), ctx))).message).toMatch(/no data rows/);
  });

  it.skipIf(!hasScipy)('reads numpy savetxt output exactly (live cross-check)', async () => {
    const out = JSON.parse(runPythonScript(`
import json, sys, numpy as np
a = np.random.default_rng(3).normal(size=(4, 6)); a[1, 2] = np.nan
np.savetxt(sys.argv[1], a, delimiter=',', fmt='%.17g', header='generated')
print(json.dumps([None if np.isnan(x) else float(x) for x in a.ravel()]))
`, [join(tmp.dir, 'np.csv')])) as (number | null)[];
    const got = await readAll(await openDataset(dataset(tmp.dir, [join(tmp.dir, 'np.csv')], 'csv'), ctx));
    expect(firstDifference(got, out.map((v) => (v === null ? NaN : v)))).toBe(-1);
  });
});
