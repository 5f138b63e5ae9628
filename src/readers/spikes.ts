/**
 * Spike-time tables (CSV or TSV) binned into a units × bins matrix of spike counts.
 *
 * The header row names a `unit` column and a `time` column (seconds), in any order and any case;
 * other columns are ignored. Bin b covers [b·w, (b+1)·w) with w = bin_ms / 1000 s, so a spike at
 * time t counts in bin ⌊t / w⌋. Number of bins: ⌊max t / w⌋ + 1, unless a comment line
 * `# duration_s: X` comes before the header, in which case ⌈X / w⌉ bins cover [0, X) and a spike
 * at or after X is an InputError (a last bin shorter than w gives a `notice` finding). Without the
 * comment a `notice` finding says the recording's end was taken from the last spike (trailing
 * silence is not seen). A time within a few ulps of a bin edge (`binOf` in nwb-time.ts) counts in
 * the bin the edge starts, so decimal times such as 0.3 s with 100 ms bins land in bin 3, not in
 * bin 2 through binary rounding, while a spike 0.5 µs before an edge stays before it. Negative, NaN, infinite or non-numeric times are InputErrors naming the row.
 *
 * Units are the distinct labels of the unit column, sorted naturally ("2" before "10", "a9"
 * before "a10"); a unit with no spikes cannot appear (the table does not name it). Counts are
 * integers ≥ 0; float32 blocks hold them exactly while the table has fewer than 2^24 spikes
 * (else float64). Memory: 12 bytes per spike, never units × bins.
 */
import type { Finding } from '../types.ts';
import { inputError } from './byte-source.ts';
import { cellNumber, splitCells } from './table-text.ts';
import { textLines } from './text-lines.ts';
import { badHeader, durationBins, durationComment } from './spikes-inspect.ts';
import { checkActivityShape, maxBinsFor } from './memory-budget.ts';
import type { ReadableActivityFile } from './activity-file.ts';
import { spikeCountsFile } from './spike-counts.ts';
import { binOf as binOfQuotient, EDGE_TOLERANCE } from './nwb-time.ts';

const MAX_BINS = 2 ** 31 - 1;

/** Compare labels naturally: runs of digits by numeric value, other text by code unit. */
export function naturalCompare(a: string, b: string): number {
  const ta = a.match(/\d+|\D+/g) ?? [];
  const tb = b.match(/\d+|\D+/g) ?? [];
  for (let i = 0; i < Math.min(ta.length, tb.length); i++) {
    const x = ta[i];
    const y = tb[i];
    if (x === y) continue;
    const dx = /^\d/.test(x);
    const dy = /^\d/.test(y);
    if (dx && dy) {
      const sx = x.replace(/^0+(?=\d)/, '');
      const sy = y.replace(/^0+(?=\d)/, '');
      if (sx.length !== sy.length) return sx.length - sy.length;
      if (sx !== sy) return sx < sy ? -1 : 1;
      continue;
    }
    return x < y ? -1 : 1;
  }
  if (ta.length !== tb.length) return ta.length - tb.length;
  return a < b ? -1 : a > b ? 1 : 0;
}

function binOf(t: number, binMs: number): number {
  return binOfQuotient((t * 1000) / binMs);
}

/** Read and bin a spike table at `binMs`. */
export async function openSpikeTable(path: string, relPath: string, delim: string, binMs: number): Promise<ReadableActivityFile> {
  if (!(binMs > 0) || !Number.isFinite(binMs)) throw inputError(relPath, 'bin_ms', `bin_ms is ${binMs}; spike tables need a bin width > 0`);
  const binS = binMs / 1000;
  let duration: number | null = null;
  let nbinsFixed: number | null = null;
  let unitCol = -1;
  let timeCol = -1;
  let width = 0;
  const labelIndex = new Map<string, number>();
  let spikeUnit = new Int32Array(1024);
  let spikeBin = new Int32Array(1024);
  let n = 0;
  let maxBin = -1;
  let maxBinRow = 0;
  const binLimit = maxBinsFor(0); // memory budget: refuse at the row that passes it
  for await (const [line, text] of textLines(path, relPath)) {
    if (text.trimStart().startsWith('#')) {
      const d = unitCol < 0 ? durationComment(text, relPath, line) : null;
      if (d !== null) {
        duration = d;
        nbinsFixed = durationBins(d, binMs, relPath, line);
      }
      continue;
    }
    if (text.trim() === '') continue;
    const cells = splitCells(text, delim);
    if (unitCol < 0) {
      const lower = cells.map((c) => c.toLowerCase());
      unitCol = lower.indexOf('unit');
      timeCol = lower.indexOf('time');
      if (unitCol < 0 || timeCol < 0) {
        throw badHeader(cells, relPath, line);
      }
      width = cells.length;
      continue;
    }
    if (cells.length !== width) {
      throw inputError(relPath, `row ${line}, column ${Math.min(cells.length, width) + 1}`, `row has ${cells.length} cells, expected ${width} as in the header`);
    }
    const label = cells[unitCol];
    if (label === '') throw inputError(relPath, `row ${line}, column ${unitCol + 1}`, 'unit cell is empty');
    const t = cellNumber(cells[timeCol]);
    if (t === undefined || !Number.isFinite(t) || t < 0) {
      throw inputError(relPath, `row ${line}, column ${timeCol + 1}`, `time ${JSON.stringify(cells[timeCol].slice(0, 40))} is not allowed; spike times are finite numbers of seconds ≥ 0`);
    }
    const b = binOf(t, binMs);
    if (nbinsFixed !== null && b >= nbinsFixed) {
      throw inputError(relPath, `row ${line}, column ${timeCol + 1}`, `time ${t} s is at or after the stated duration_s ${duration}`);
    }
    if (b >= MAX_BINS) throw inputError(relPath, `row ${line}, column ${timeCol + 1}`, `time ${t} s at ${binMs} ms bins makes more than ${MAX_BINS} bins`);
    if (b >= binLimit) checkActivityShape({ units: 0, bins: b + 1, binMs, file: relPath, where: `row ${line}, column ${timeCol + 1}` });
    let u = labelIndex.get(label);
    if (u === undefined) labelIndex.set(label, (u = labelIndex.size));
    if (n === spikeUnit.length) {
      const su = new Int32Array(2 * n); su.set(spikeUnit); spikeUnit = su;
      const sb = new Int32Array(2 * n); sb.set(spikeBin); spikeBin = sb;
    }
    spikeUnit[n] = u;
    spikeBin[n] = b;
    n++;
    if (b > maxBin) {
      maxBin = b;
      maxBinRow = line;
    }
  }
  if (unitCol < 0) throw inputError(relPath, 'row 1', "file is empty; expected a header naming 'unit' and 'time' columns");
  if (n === 0) throw inputError(relPath, 'row 2', 'spike table has a header but no spikes; no units can be formed');

  // Natural order of labels, then a counting sort of spikes by (sorted) unit.
  const labels = [...labelIndex.keys()].sort(naturalCompare);
  const rank = new Int32Array(labels.length);
  labels.forEach((l, i) => { rank[labelIndex.get(l)!] = i; });
  const start = new Int32Array(labels.length + 1);
  for (let i = 0; i < n; i++) start[rank[spikeUnit[i]] + 1]++;
  for (let u = 0; u < labels.length; u++) start[u + 1] += start[u];
  const fill = start.slice(0, labels.length);
  const sortedBins = new Int32Array(n);
  for (let i = 0; i < n; i++) sortedBins[fill[rank[spikeUnit[i]]]++] = spikeBin[i];

  const bins = nbinsFixed ?? maxBin + 1;
  const findings: Finding[] = [];
  if (duration === null) {
    findings.push({
      level: 'notice', code: 'duration-from-last-spike',
      message: `${relPath}: no '# duration_s:' line, so the recording was taken to end in the bin of the last spike (${bins} bins of ${binMs} ms); silence after it is not counted.`,
      where: [relPath], count: 1,
    });
  } else if (Math.abs((duration * 1000) / binMs - bins) > EDGE_TOLERANCE * Math.max(1, bins)) {
    findings.push({
      level: 'notice', code: 'partial-last-bin',
      message: `${relPath}: duration ${duration} s is not a whole number of ${binMs} ms bins; the last bin covers only ${((duration - (bins - 1) * binS) * 1000).toPrecision(4)} ms.`,
      where: [relPath, `bin ${bins - 1}`], count: 1,
    });
  }
  const units = labels.length;
  checkActivityShape({ units, bins, binMs, file: relPath, where: `row ${maxBinRow}` });
  return spikeCountsFile({ path, bins, binMs, findings, unitLabels: labels, start, spikeBins: sortedBins });
}
