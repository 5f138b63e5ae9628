/**
 * Header check of a spike-time table for `lacuna check`: reads only the first 1 MiB, and reports
 * a missing `unit`/`time` column or a bad `# duration_s:` line (spikes.ts has the format).
 */
import { inputError } from './byte-source.ts';
import { cellNumber, splitCells } from './table-text.ts';
import { textLines } from './text-lines.ts';

export async function inspectSpikeHeader(path: string, relPath: string, delim: string): Promise<{ columns: string[]; durationS: number | null }> {
  let durationS: number | null = null;
  for await (const [line, text] of textLines(path, relPath, 1 << 20)) {
    if (text.trimStart().startsWith('#')) {
      const m = /^\s*#\s*duration_s\s*:\s*(\S*)\s*$/.exec(text);
      if (m) {
        const d = cellNumber(m[1]);
        if (d === undefined || !Number.isFinite(d) || d <= 0) throw inputError(relPath, `row ${line}`, `duration_s is ${JSON.stringify(m[1])}; allowed a finite number of seconds > 0`);
        durationS = d;
      }
      continue;
    }
    if (text.trim() === '') continue;
    const columns = splitCells(text, delim);
    const lower = columns.map((c) => c.toLowerCase());
    if (!lower.includes('unit') || !lower.includes('time')) {
      throw inputError(relPath, `row ${line}`, `header must name a 'unit' and a 'time' column; found ${columns.slice(0, 10).map((c) => JSON.stringify(c)).join(', ')}`);
    }
    return { columns, durationS };
  }
  throw inputError(relPath, 'row 1', "file is empty; expected a header naming 'unit' and 'time' columns");
}
