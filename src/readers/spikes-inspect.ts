/**
 * Header check of a spike-time table for `lacuna check`: reads only the first 1 MiB, and reports
 * a missing `unit`/`time` column or a bad `# duration_s:` line (spikes.ts has the format).
 */
import { inputError } from './byte-source.ts';
import { cellNumber, splitCells } from './table-text.ts';
import { textLines } from './text-lines.ts';

/**
 * The duration in a `# duration_s: X` comment line, null for any other comment; an InputError
 * when X is not a finite number of seconds > 0.
 */
export function durationComment(text: string, relPath: string, line: number): number | null {
  const m = /^\s*#\s*duration_s\s*:\s*(\S*)\s*$/.exec(text);
  if (!m) return null;
  const d = cellNumber(m[1]);
  if (d === undefined || !Number.isFinite(d) || d <= 0) throw inputError(relPath, `row ${line}`, `duration_s is ${JSON.stringify(m[1])}; allowed a finite number of seconds > 0`);
  return d;
}

export async function inspectSpikeHeader(path: string, relPath: string, delim: string): Promise<{ columns: string[]; durationS: number | null }> {
  let durationS: number | null = null;
  for await (const [line, text] of textLines(path, relPath, 1 << 20)) {
    if (text.trimStart().startsWith('#')) {
      durationS = durationComment(text, relPath, line) ?? durationS;
      continue;
    }
    if (text.trim() === '') continue;
    const columns = splitCells(text, delim);
    const lower = columns.map((c) => c.toLowerCase());
    if (!lower.includes('unit') || !lower.includes('time')) {
      throw inputError(relPath, `row ${line}`, `header must name a 'unit' and a 'time' column; found ${columns.slice(0, 10).map((c) => JSON.stringify(c.length > 80 ? `${c.slice(0, 80)}…` : c)).join(', ')}`);
    }
    return { columns, durationS };
  }
  throw inputError(relPath, 'row 1', "file is empty; expected a header naming 'unit' and 'time' columns");
}
