/**
 * An imaging pipeline's output folder (`format: imaging-folder`) as one activity file: units are
 * the chosen ROIs of every plane, joined along units; bins are frames (or means of frames).
 *
 * Files per plane (the folder itself, or `plane0/`, `plane1/`, … in number order; listed by
 * src/manifest/lab-folders.ts): `F.npy` (ROIs × frames fluorescence), `Fneu.npy` (neuropil, same
 * shape), `spks.npy` (deconvolved activity, same shape), `iscell.npy` (ROIs × 2: is-cell flag,
 * probability). The pipeline's settings file (`ops.npy`) is a Python pickle: it is never opened,
 * so the frame rate comes from the manifest (`imaging.frame_rate_hz`).
 *
 *   1. Per plane: open the trace file(s) (npy.ts, streamed, never read whole), check their shapes
 *      agree with each other and with iscell.npy (ROIs × 2), read iscell.npy (two numbers a ROI).
 *   2. Choose ROIs: `cells: flag` takes flag = 1, `probability` takes probability ≥
 *      `min_probability`, `all` every ROI. ROIs left out are counted (a notice), and those of them
 *      whose stored F (or spks) is all zero are counted too (their rows are read once, here).
 *   3. Frames: planes with different frame counts are joined over the first frames they share
 *      (a caution counts what was dropped).
 *   4. Values: `trace: F` is F; `F-neuropil` is F − k·Fneu computed in float64 from the stored
 *      float32 values (k = `neuropil_k`, 0.7 by default, common practice); `spks` is spks.
 *   5. Bins: frame i is at i / rate seconds (rate as written, exact, sample-bins.ts); bin b holds
 *      the frames in [b·w, (b+1)·w) and its value is their mean, as for NWB series. A bin_ms
 *      finer than the frame interval is an InputError naming the interval. When bin_ms equals
 *      the frame interval every bin is one frame and the values are the stored values.
 * Memory: the iscell arrays, the chosen ROI list and one scratch block of at most 8 MiB.
 */
import type { Finding, Numeric } from '../types.ts';
import type { ImagingSettings } from '../manifest/types.ts';
import { InputError } from '../errors.ts';
import { inputError } from './byte-source.ts';
import { openNpyActivity, openNpyFile, readNpyTensor } from './npy.ts';
import { sampleBinner } from './sample-bins.ts';
import { maxOf, minOf } from '../util/arrays.ts';
import { checkActivityShape } from './memory-budget.ts';
import type { ReadableActivityFile } from './activity-file.ts';

const SCRATCH_BYTES = 8 << 20;

interface Plane {
  /** Workspace-relative folder of the plane, with a trailing slash. */
  rel: string;
  /** Trace files: [F] / [F, Fneu] / [spks]. */
  trace: ReadableActivityFile[];
  rois: number;
  frames: number;
  /** Chosen ROIs, ascending. */
  chosen: number[];
}

/** The dataset's files grouped by plane folder (in the order listed). */
function planesOf(files: string[], relFiles: string[]): { rel: string; byName: Map<string, { path: string; rel: string }> }[] {
  const out: { rel: string; byName: Map<string, { path: string; rel: string }> }[] = [];
  relFiles.forEach((r, i) => {
    const cut = r.lastIndexOf('/') + 1;
    const dir = r.slice(0, cut);
    let p = out.find((x) => x.rel === dir);
    if (!p) out.push((p = { rel: dir, byName: new Map() }));
    p.byName.set(r.slice(cut), { path: files[i], rel: r });
  });
  return out;
}

const plural = (n: number, w: string) => `${n.toLocaleString('en-US')} ${w}${n === 1 ? '' : 's'}`;

async function readIsCell(m: { path: string; rel: string }, rois: number): Promise<Numeric> {
  const { src, header } = await openNpyFile(m.path, m.rel);
  try {
    const s = header.shape;
    if (s.length !== 2 || s[0] !== rois || s[1] !== 2) {
      throw inputError(m.rel, 'shape', `iscell.npy has shape (${s.join(', ')}); allowed: (${rois}, 2), one (flag, probability) row per ROI of F.npy`);
    }
    return await readNpyTensor(src, header, m.rel);
  } finally {
    await src.close();
  }
}

function choose(isCell: Numeric, rois: number, s: ImagingSettings, rel: string): number[] {
  const out: number[] = [];
  for (let r = 0; r < rois; r++) {
    const flag = isCell[2 * r];
    const prob = isCell[2 * r + 1];
    if (s.cells === 'flag' && flag !== 0 && flag !== 1) throw inputError(rel, `row ${r}, column 0`, `is-cell flag ${flag} is not allowed; 0 or 1`);
    if (s.cells === 'probability' && !(prob >= 0 && prob <= 1)) throw inputError(rel, `row ${r}, column 1`, `is-cell probability ${prob} is not allowed; a number from 0 to 1`);
    if (s.cells === 'all' || (s.cells === 'flag' ? flag === 1 : prob >= s.min_probability)) out.push(r);
  }
  return out;
}

/** Rows [first, first + count) of a plane's trace, as values (step 4), into `out` (count × frames of the plane). */
async function traceRows(p: Plane, s: ImagingSettings, first: number, count: number, out: Float64Array, tmp: Float64Array): Promise<void> {
  await p.trace[0].readUnits(first, count, out, p.frames, 0);
  if (s.trace === 'F-neuropil') {
    await p.trace[1].readUnits(first, count, tmp, p.frames, 0);
    const n = count * p.frames;
    for (let i = 0; i < n; i++) out[i] -= s.neuropil_k * tmp[i];
  }
}

/**
 * Open an imaging folder at `binMs`. With `headersOnly` (for `lacuna check`) the left-out ROIs'
 * rows are not read, so the all-zero count is not made; every other check is.
 */
export async function openImagingFolder(files: string[], relFiles: string[], s: ImagingSettings, binMs: number, headersOnly = false): Promise<ReadableActivityFile> {
  const findings: Finding[] = [];
  const planes: Plane[] = [];
  const names = s.trace === 'F' ? ['F.npy'] : s.trace === 'F-neuropil' ? ['F.npy', 'Fneu.npy'] : ['spks.npy'];
  try {
    // 1–2.
    let left = 0;
    let leftZero = 0;
    let all = 0;
    for (const g of planesOf(files, relFiles)) {
      const trace: ReadableActivityFile[] = [];
      const plane: Plane = { rel: g.rel, trace, rois: 0, frames: 0, chosen: [] };
      planes.push(plane);
      for (const n of names) {
        const m = g.byName.get(n);
        if (!m) throw new InputError(`trace ${s.trace} needs ${n}, which this plane folder does not have`, { file: `${g.rel}${n}`, where: 'imaging.trace', hint: `choose another trace (F, F-neuropil, spks) or add ${n}` });
        const f = await openNpyActivity(m.path, m.rel, 'units-by-bins');
        if (trace.length && (f.units !== trace[0].units || f.bins !== trace[0].bins)) {
          await f.close();
          throw inputError(m.rel, 'shape', `${n} has ${f.units} ROIs × ${f.bins} frames but ${names[0]} has ${trace[0].units} × ${trace[0].bins}; they must match`);
        }
        trace.push(f);
      }
      plane.rois = trace[0].units;
      plane.frames = trace[0].bins;
      const isCellFile = g.byName.get('iscell.npy')!;
      plane.chosen = choose(await readIsCell(isCellFile, plane.rois), plane.rois, s, isCellFile.rel);
      all += plane.rois;
      // Left-out ROIs whose stored trace (F, or spks) is all zero.
      const chosen = new Set(plane.chosen);
      const row = new Float64Array(plane.frames);
      for (let r = 0; r < plane.rois; r++) {
        if (chosen.has(r)) continue;
        left++;
        if (headersOnly) continue;
        await trace[0].readUnits(r, 1, row, plane.frames, 0);
        if (row.every((v) => v === 0)) leftZero++;
      }
    }
    const units = planes.reduce((n, p) => n + p.chosen.length, 0);
    const rule = s.cells === 'flag' ? 'is-cell flag 1' : s.cells === 'probability' ? `is-cell probability ≥ ${s.min_probability}` : 'every ROI';
    const traceText = s.trace === 'F' ? 'fluorescence F' : s.trace === 'spks' ? 'deconvolved activity (spks)' : `F − ${s.neuropil_k}·Fneu (fluorescence minus neuropil, in float64)`;
    findings.push({
      level: 'notice', code: 'imaging-selection',
      message: `Trace: ${traceText}; units: ${plural(units, 'ROI')} of ${all} with ${rule}${planes.length > 1 ? `, ${planes.length} planes joined along units` : ''}${left ? `; ${plural(left, 'ROI')} left out by that choice, ${leftZero} of them all zero in ${names[0]}` : ''}.`,
      where: planes.map((p) => p.rel), count: left,
    });
    if (units === 0) throw inputError(planes[0].rel, 'imaging.cells', `no ROI is chosen by ${rule}; no units can be formed`, 'set imaging.cells to all, or lower imaging.min_probability');
    // 3.
    const frames = minOf(planes.map((p) => p.frames));
    if (planes.some((p) => p.frames !== frames)) {
      const dropped = planes.filter((p) => p.frames > frames);
      findings.push({
        level: 'caution', code: 'imaging-plane-frames-differ',
        message: `Planes hold different numbers of frames (${planes.map((p) => `${p.rel} ${p.frames}`).join(', ')}); they were joined over the first ${frames} frames, so ${dropped.map((p) => `${p.frames - frames} of ${p.rel}`).join(', ')} were left out.`,
        where: dropped.map((p) => p.rel), count: dropped.reduce((n, p) => n + p.frames - frames, 0),
      });
    }
    // 5.
    const binner = sampleBinner(binMs, s.frame_rate_hz);
    const frameMs = 1000 / s.frame_rate_hz;
    if (binner.samplesPerBin < 1 - 1e-9) {
      throw new InputError(`bin_ms ${binMs} is finer than the frame interval ${frameMs.toPrecision(6)} ms (frame_rate_hz ${s.frame_rate_hz}); most bins would hold no frame`, {
        file: planes[0].rel, where: 'bin_ms', hint: `set bin_ms to ${Number(frameMs.toPrecision(12))} or a multiple of it`,
      });
    }
    checkActivityShape({ units, bins: binner.binOf(frames - 1) + 1, binMs, file: planes[0].rel, where: 'frames' });
    const binOfFrame = new Int32Array(frames);
    for (let i = 0; i < frames; i++) binOfFrame[i] = binner.binOf(i);
    const bins = binOfFrame[frames - 1] + 1;
    const perBin = new Float64Array(bins);
    for (let i = 0; i < frames; i++) perBin[binOfFrame[i]]++;
    const identity = bins === frames;
    // Global unit → (plane, ROI).
    const unitPlane = new Int32Array(units);
    const unitRoi = new Int32Array(units);
    const labels: string[] = [];
    let u = 0;
    planes.forEach((p, k) => {
      for (const r of p.chosen) {
        unitPlane[u] = k;
        unitRoi[u++] = r;
        labels.push(planes.length > 1 ? `plane${k}:${r}` : String(r));
      }
    });
    const maxFrames = maxOf(planes.map((p) => p.frames));
    const rowsPerRead = Math.max(1, Math.floor(SCRATCH_BYTES / 8 / maxFrames));
    let scratch: Float64Array | null = null;
    let tmp: Float64Array | null = null;
    const f32 = identity && s.trace !== 'F-neuropil' && planes.every((p) => p.trace[0].precision === 'f32');
    return {
      path: files[0], units, bins, binMs, findings, hasMissing: false, unitLabels: labels,
      precision: f32 ? 'f32' : 'f64', reusableAfterClose: true, contiguous: true,
      async readUnits(unitStart, count, out, outCols, colOffset) {
        if (unitStart < 0 || count < 0 || unitStart + count > units || colOffset + bins > outCols) {
          throw new RangeError(`readUnits(${unitStart}, ${count}) outside ${units} units or block of ${outCols} columns`);
        }
        scratch ??= new Float64Array(rowsPerRead * maxFrames);
        tmp ??= new Float64Array(s.trace === 'F-neuropil' ? rowsPerRead * maxFrames : 0);
        let k = 0;
        while (k < count) {
          // A run of consecutive ROIs of one plane, read together.
          const g = unitStart + k;
          const p = planes[unitPlane[g]];
          let run = 1;
          while (k + run < count && run < rowsPerRead && unitPlane[g + run] === unitPlane[g] && unitRoi[g + run] === unitRoi[g] + run) run++;
          await traceRows(p, s, unitRoi[g], run, scratch, tmp);
          for (let j = 0; j < run; j++) {
            const o = (k + j) * outCols + colOffset;
            const row = j * p.frames;
            if (identity) {
              for (let i = 0; i < frames; i++) out[o + i] = scratch[row + i];
            } else {
              out.fill(0, o, o + bins);
              for (let i = 0; i < frames; i++) out[o + binOfFrame[i]] += scratch[row + i];
              for (let b = 0; b < bins; b++) out[o + b] /= perBin[b];
            }
          }
          k += run;
        }
      },
      async close() {
        for (const p of planes) for (const f of p.trace) await f.close();
      },
    };
  } catch (err) {
    for (const p of planes) for (const f of p.trace) await f.close();
    throw err;
  }
}
