/**
 * Header check of a spike-time table for `lacuna check`: reads only the first 1 MiB, and reports
 * a missing `unit`/`time` column or a bad `# duration_s:` line, or one that makes more bins than
 * the build allows (spikes.ts has the format).
 */
import { inputError } from './byte-source.ts';
import { cellNumber, splitCells } from './table-text.ts';
import { textLines } from './text-lines.ts';
import { binsToCover } from './nwb-time.ts';
import { checkActivityShape } from './memory-budget.ts';

const MAX_BINS = 2 ** 31 - 1;

/**
 * Bins that cover a stated duration at `binMs`: ⌈X / w⌉ (edge tolerance as in nwb-time.ts); an
 * InputError when that passes 2^31 − 1 or the memory budget (memory-budget.ts). Shared by the build (spikes.ts) and `lacuna check`, so
 * both refuse with the same words.
 */
export function durationBins(d: number, binMs: number, relPath: string, line: number): number {
  const bins = binsToCover((d * 1000) / binMs);
  if (bins > MAX_BINS) throw inputError(relPath, `row ${line}`, `duration_s ${d} at ${binMs} ms makes more than ${MAX_BINS} bins`);
  checkActivityShape({ units: 0, bins, binMs, file: relPath, where: `row ${line}` });
  return bins;
}

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

/** The error for a header row without 'unit' and 'time' columns (each cell quoted, cut at 80 characters); check and build share it. */
export function badHeader(cells: string[], relPath: string, line: number) {
  return inputError(relPath, `row ${line}`, `header must name a 'unit' and a 'time' column; found ${cells.slice(0, 10).map((c) => JSON.stringify(c.length > 80 ? `${c.slice(0, 80)}…` : c)).join(', ')}`);
}

export async function inspectSpikeHeader(path: string, relPath: string, delim: string, binMs?: number): Promise<{ columns: string[]; durationS: number | null }> {
  let durationS: number | null = null;
  for await (const [line, text] of textLines(path, relPath, 1 << 20)) {
    if (text.trimStart().startsWith('#')) {
      const d = durationComment(text, relPath, line);
      if (d !== null && binMs !== undefined) durationBins(d, binMs, relPath, line);
      durationS = d ?? durationS;
      continue;
    }
    if (text.trim() === '') continue;
    const columns = splitCells(text, delim);
    const lower = columns.map((c) => c.toLowerCase());
    if (!lower.includes('unit') || !lower.includes('time')) {
      throw badHeader(columns, relPath, line);
    }
    return { columns, durationS };
  }
  throw inputError(relPath, 'row 1', "file is empty; expected a header naming 'unit' and 'time' columns");
}
