/**
 * Numeric matrices in CSV or TSV (table-text.ts for cells and numbers).
 *
 * The first row that is not a `#` comment is a header when any of its cells is not a number
 * (NaN, nan, empty and ±inf count as numbers): for `layout: bins-by-units` its cells become the
 * unit labels; for `units-by-bins` they are ignored and a `notice` finding says so. Every data row
 * must have as many cells as the first; a ragged row or a non-numeric cell is an InputError naming
 * the row and column (1-based, counting every line of the file, header and comments included).
 * NaN and ±Infinity are kept (the audit counts them). Blank lines inside the table are rows of one
 * empty cell (so they are ragged in a wider table); blank lines at the end are dropped.
 *
 * Cost: one streamed pass over the text; the matrix is then held in memory as float64
 * (8 bytes per cell) and `readUnits` copies from it.
 */
import type { Finding } from '../types.ts';
import type { Layout } from '../manifest/types.ts';
import { inputError } from './byte-source.ts';
import { splitCells, cellNumber } from './table-text.ts';
import { textLines } from './text-lines.ts';
import { MAX_TENSOR_ELEMENTS } from './npy.ts';
import type { ReadableActivityFile } from './activity-file.ts';

export interface NumericTable {
  rows: number;
  cols: number;
  /** Row-major, rows × cols. */
  data: Float64Array;
  /** Header cells, when the first row is a header. */
  header: string[] | null;
}

/** Parse the whole table. */
export async function readNumericTable(path: string, relPath: string, delim: string): Promise<NumericTable> {
  let data = new Float64Array(1024);
  let n = 0;
  let cols = -1;
  let rows = 0;
  let header: string[] | null = null;
  let pendingBlank: number[] = [];
  const addRow = (line: number, cells: string[]) => {
    if (cols < 0) {
      const firstBad = cells.findIndex((c) => cellNumber(c) === undefined);
      if (firstBad >= 0 && header === null && rows === 0) {
        header = cells;
        cols = cells.length;
        return;
      }
      cols = cells.length;
    }
    if (cells.length !== cols) {
      const col = Math.min(cells.length, cols) + 1;
      throw inputError(relPath, `row ${line}, column ${col}`, `row has ${cells.length} cells, expected ${cols}${header ? ' (as in the header)' : ' (as in the first row)'}`);
    }
    if (n + cols > data.length) {
      if (n + cols > MAX_TENSOR_ELEMENTS) throw inputError(relPath, `row ${line}`, `table has more than ${MAX_TENSOR_ELEMENTS} cells`);
      const bigger = new Float64Array(Math.min(MAX_TENSOR_ELEMENTS, Math.max(2 * data.length, n + cols)));
      bigger.set(data.subarray(0, n));
      data = bigger;
    }
    for (let c = 0; c < cols; c++) {
      const v = cellNumber(cells[c]);
      if (v === undefined) {
        throw inputError(relPath, `row ${line}, column ${c + 1}`, `cell ${JSON.stringify(cells[c].slice(0, 40))} is not a number; allowed decimal numbers, NaN, nan, inf or an empty cell`);
      }
      data[n++] = v;
    }
    rows++;
  };
  for await (const [line, text] of textLines(path, relPath)) {
    if (text.trimStart().startsWith('#')) continue;
    if (text.trim() === '') {
      if (cols >= 0) pendingBlank.push(line);
      continue;
    }
    for (const b of pendingBlank) addRow(b, ['']);
    pendingBlank = [];
    addRow(line, splitCells(text, delim));
  }
  if (rows === 0) throw inputError(relPath, 'row 1', header ? 'table has a header but no data rows' : 'file is empty; expected a numeric table');
  return { rows, cols, data: n === data.length ? data : data.slice(0, n), header };
}

/** A CSV/TSV matrix as an activity file (float64). */
export async function openCsvActivity(path: string, relPath: string, layout: Layout, delim: string): Promise<ReadableActivityFile> {
  const t = await readNumericTable(path, relPath, delim);
  const unitsFirst = layout === 'units-by-bins';
  const units = unitsFirst ? t.rows : t.cols;
  const bins = unitsFirst ? t.cols : t.rows;
  const findings: Finding[] = [];
  if (t.header && unitsFirst) {
    findings.push({
      level: 'notice', code: 'header-ignored',
      message: `${relPath}: the first row is a header (${t.header.length} labels); with layout units-by-bins its cells name bins, not units, so they were ignored.`,
      where: [relPath], count: t.header.length,
    });
  }
  return {
    path, units, bins, binMs: null, findings, hasMissing: false, precision: 'f64', reusableAfterClose: true,
    unitLabels: t.header && !unitsFirst ? t.header : undefined,
    async readUnits(unitStart, count, out, outCols, colOffset) {
      if (unitStart < 0 || count < 0 || unitStart + count > units || colOffset + bins > outCols) {
        throw new RangeError(`readUnits(${unitStart}, ${count}) outside ${units} units or block of ${outCols} columns`);
      }
      for (let u = 0; u < count; u++) {
        const o = u * outCols + colOffset;
        if (unitsFirst) out.set(t.data.subarray((unitStart + u) * bins, (unitStart + u + 1) * bins), o);
        else for (let b = 0; b < bins; b++) out[o + b] = t.data[b * units + unitStart + u];
      }
    },
    async close() {},
  };
}

/** Rows, columns and header of a table, checking row lengths but not parsing numbers (for `check`). */
export async function inspectTable(path: string, relPath: string, delim: string): Promise<{ rows: number; cols: number; header: string[] | null }> {
  let cols = -1;
  let rows = 0;
  let header: string[] | null = null;
  for await (const [line, text] of textLines(path, relPath)) {
    if (text.trimStart().startsWith('#') || text.trim() === '') continue;
    const cells = splitCells(text, delim);
    if (cols < 0) {
      cols = cells.length;
      if (cells.some((c) => cellNumber(c) === undefined)) { header = cells; continue; }
    } else if (cells.length !== cols) {
      throw inputError(relPath, `row ${line}, column ${Math.min(cells.length, cols) + 1}`, `row has ${cells.length} cells, expected ${cols}`);
    }
    rows++;
  }
  if (rows === 0) throw inputError(relPath, 'row 1', header ? 'table has a header but no data rows' : 'file is empty; expected a numeric table');
  return { rows, cols, header };
}
