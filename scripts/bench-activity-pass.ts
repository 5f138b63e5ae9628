/**
 * Throughput of the fused activity pass on seeded Poisson spike counts.
 *
 *   node --import tsx scripts/bench-activity-pass.ts [units=2000] [bins=50000] [blockUnits=50] [seed=1]
 *
 * Counts are float32, generated block by block into one reused buffer (generation is not
 * timed; first touch of fresh memory is slow on these machines). Rates vary by unit between
 * 0.02 and 4 spikes a bin. Prints the whole pass's throughput and, on the same blocks, each row
 * loop on its own (scan; hash; moments + per-bin sums + Gini histogram; Gini from the histogram).
 */
import os from 'node:os';
import { performance } from 'node:perf_hooks';
import { createActivityPass, finishActivityPass } from '../src/metrics/activity-pass.ts';
import { rowMoments, newRowMoments, newRowScan, scanRow } from '../src/metrics/activity-pass-row.ts';
import { accumulateBins, newBlockRows } from '../src/metrics/activity-pass-bins.ts';
import { hashRow, scanHashHistFloat32 } from '../src/metrics/activity-pass-hash.ts';
import { COUNTING_RANGE_LIMIT, giniFromHistogram, newGiniScratch, rowGini, zeroedHistogram } from '../src/metrics/activity-pass-gini.ts';

const [units, bins, blockUnits, seed] = [2000, 50000, 50, 1].map((d, i) => Number(process.argv[2 + i] ?? d));

/** mulberry32 (a small public-domain 32-bit generator); seeded, reproducible. */
function mulberry32(s: number): () => number {
  let a = s >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = Math.imul(a ^ (a >>> 15), 1 | a);
    t = (t + Math.imul(t ^ (t >>> 7), 61 | t)) ^ t;
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Poisson(λ) by Knuth's product of uniforms (fine for small λ). */
function fillBlock(buf: Float32Array, rows: number, rand: () => number): void {
  for (let r = 0; r < rows; r++) {
    const lambda = 0.02 + 3.98 * rand();
    const L = Math.exp(-lambda);
    for (let j = 0; j < bins; j++) {
      let k = 0;
      let p = rand();
      while (p > L) {
        k++;
        p *= rand();
      }
      buf[r * bins + j] = k;
    }
  }
}

const rand = mulberry32(seed);
const buf = new Float32Array(blockUnits * bins);
buf.fill(0);
const pass = createActivityPass({ units, bins }, { zeroTolerance: 0, negatives: 'rectify', events: null, minNonzero: 10 });
const parts = { scan: 0, hash: 0, 'scan+hash': 0, moments: 0, gini: 0, bins: 0 };
// Poisson counts are integers with a small range: the moments loop also fills the Gini histogram.
const scan = newRowScan();
const mom = newRowMoments();
const gs = newGiniScratch(bins);
const acc = { partialDefined: new Int32Array(bins), sum: new Float64Array(bins), sumSq: new Float64Array(bins), active: new Int32Array(bins), refusedDefined: new Int32Array(bins) };
const words = new Uint32Array(buf.buffer);
const hash = new Uint32Array(2);
const scanHist = new Int32Array(COUNTING_RANGE_LIMIT + 1);
let whole = 0;
let wholeCpu = 0;
let genMs = 0;
for (let u0 = 0; u0 < units; u0 += blockUnits) {
  const rows = Math.min(blockUnits, units - u0);
  const g0 = performance.now();
  fillBlock(buf, rows, rand);
  const t0 = performance.now();
  genMs += t0 - g0;
  const c0 = process.cpuUsage();
  pass.addBlock({ unitStart: u0, units: rows, bins, data: rows === blockUnits ? buf : buf.subarray(0, rows * bins) });
  const c1 = process.cpuUsage(c0);
  whole += performance.now() - t0;
  wholeCpu += (c1.user + c1.system) / 1000;
  // The row loops one by one, on the same (cached-from-memory) block.
  for (let r = 0; r < rows; r++) {
    const off = r * bins;
    let t = performance.now();
    scanRow(buf, undefined, off, bins, scan);
    parts.scan += performance.now() - t;
    t = performance.now();
    hashRow(words, off, bins, undefined, off, bins, hash);
    parts.hash += performance.now() - t;
    t = performance.now();
    if (scanHashHistFloat32(buf, words, off, bins, scan, hash, scanHist) === 1) scanHist.fill(0, 0, scan.max + 1);
    parts['scan+hash'] += performance.now() - t;
    t = performance.now();
    const hist = zeroedHistogram(gs, scan.max, bins);
    rowMoments(buf, undefined, off, bins, true, scan.sum / scan.n, scan.max, 0, scan.sum / scan.n, 0, hist, mom);
    parts.moments += performance.now() - t;
    t = performance.now();
    if (mom.histOk) giniFromHistogram(hist, scan.max, scan.n, scan.sumAbs);
    else rowGini(buf, undefined, off, bins, scan.n, scan.sumAbs, 0, 0, scan.max, gs);
    parts.gini += performance.now() - t;
  }
  const blockRows = newBlockRows(rows); // mode 0, no shift, clean: the common case
  blockRows.clean.fill(1);
  const tb = performance.now();
  accumulateBins(buf, undefined, rows, bins, blockRows, 0, acc);
  parts.bins += performance.now() - tb;
}
const t1 = performance.now();
const result = finishActivityPass(pass.state());
const finishMs = performance.now() - t1;

const bytes = units * bins * 4;
const gbps = (ms: number) => (bytes / 1e9 / (ms / 1000)).toFixed(2);
console.log(`activity pass: ${units} units × ${bins} bins float32 (${(bytes / 2 ** 20).toFixed(0)} MiB), blocks of ${blockUnits} units, seed ${seed}`);
console.log(`  generation (not timed below): ${(genMs / 1000).toFixed(1)} s`);
console.log(`  whole pass (addBlock):        ${whole.toFixed(0)} ms  → ${gbps(whole)} GB/s wall`);
console.log(`                                ${wholeCpu.toFixed(0)} ms CPU → ${gbps(wholeCpu)} GB/s per CPU-second (less sensitive to other load)`);
console.log(`  load average at the end: ${os.loadavg().map((x) => x.toFixed(1)).join(' ')} on ${os.cpus().length} cores`);
console.log(`  finish:                       ${finishMs.toFixed(1)} ms`);
for (const [k, ms] of Object.entries(parts)) console.log(`  ${k.padEnd(8)} alone:               ${ms.toFixed(0)} ms  → ${gbps(ms)} GB/s`);
const momentPart = parts['scan+hash'] + parts.moments + parts.bins;
console.log(`  moments + sparseness (fused scan+hash, moments+histogram, tiled per-bin sums): ${gbps(momentPart)} GB/s`);
const finite = Array.from(result.unit.kurtosis).filter(Number.isFinite);
console.log(`  check: ${finite.length} units with kurtosis; median population S ${median(Array.from(result.bin.populationSparseness)).toFixed(4)}`);

function median(v: number[]): number {
  const s = v.filter(Number.isFinite).sort((a, b) => a - b);
  return s.length ? s[s.length >> 1] : NaN;
}
