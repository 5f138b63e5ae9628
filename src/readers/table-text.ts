/**
 * Cells of delimited text tables (RFC 4180 CSV, and tab-separated values): splitting a line into
 * cells, and the numeric reading of one cell shared by the matrix and spike-table readers.
 */

/**
 * Split one line at `delim`. Cells may be wrapped in double quotes (a doubled quote inside is one
 * quote); quoted cells cannot span lines. Cells are trimmed of surrounding spaces.
 */
export function splitCells(line: string, delim: string): string[] {
  if (!line.includes('"')) return line.split(delim).map((c) => c.trim());
  const out: string[] = [];
  let i = 0;
  for (;;) {
    while (line[i] === ' ') i++;
    if (line[i] === '"') {
      let s = '';
      i++;
      for (;;) {
        const q = line.indexOf('"', i);
        if (q < 0) { s += line.slice(i); i = line.length; break; }
        s += line.slice(i, q);
        if (line[q + 1] === '"') { s += '"'; i = q + 2; } else { i = q + 1; break; }
      }
      const next = line.indexOf(delim, i);
      s += (next < 0 ? line.slice(i) : line.slice(i, next)).trim();
      out.push(s.trim());
      if (next < 0) return out;
      i = next + 1;
    } else {
      const next = line.indexOf(delim, i);
      out.push((next < 0 ? line.slice(i) : line.slice(i, next)).trim());
      if (next < 0) return out;
      i = next + 1;
    }
  }
}

const DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const NAN = /^[+-]?nan$/i;
const INF = /^([+-]?)inf(?:inity)?$/i;

/**
 * The number in a cell, or undefined when the cell is not numeric. Decimal notation with optional
 * exponent; `NaN`/`nan` and the empty cell read as NaN (kept, and counted by the audit);
 * `inf`, `-inf`, `Infinity` as ±Infinity (also counted as non-finite later). Hexadecimal and other
 * forms JavaScript's `Number()` would accept are not numbers here.
 */
export function cellNumber(cell: string): number | undefined {
  if (cell === '' || NAN.test(cell)) return NaN;
  if (DECIMAL.test(cell)) return Number(cell);
  const m = INF.exec(cell);
  if (m) return m[1] === '-' ? -Infinity : Infinity;
  return undefined;
}

/** Delimiter for a format or file name: tab for `tsv` or `.tsv`/`.tab`, else comma. */
export function delimiterFor(format: string, path: string): string {
  return format === 'tsv' || /\.(tsv|tab)$/i.test(path) ? '\t' : ',';
}
