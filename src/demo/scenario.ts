/**
 * The built-in demo scenario: a fictional lab, fictional animals, data made by a seeded script.
 *
 * The Ostrander lab (fictional) records Kenyon cells in the mushroom body of the fictional
 * hawkmoth *Sphinx imaginaria* on two rigs from January to June 2026. In April (month 4) the
 * amplifier of rig B is swapped and its noise floor rises: spurious threshold crossings add
 * background spikes to every unit, so density rises and sparseness falls on rig B only.
 * A few data problems are planted so the findings have something to find: a silent unit, a
 * duplicated unit, dropped samples (NaN), a unit clipped at a ceiling.
 *
 * A second audit holds two-photon imaging of the same structure (synthetic ΔF/F with a known
 * event rate); in April the indicator's brightness drops, so events shrink toward the noise.
 * A third audit holds the weight matrices of a fictional pruned network at three pruning stages.
 *
 * Everything is a pure function of the seed: the same seed writes byte-identical files.
 */
import { mkdirSync, existsSync } from 'node:fs';
import { join } from 'node:path';
import { createRandom } from '../stats/random.ts';
import { writeNpy } from '../readers/npy-write.ts';
import { gamma, poisson, type Uniform } from './sample.ts';
import { atomicWrite, writeImagingPipelineDemo, writeSorterDemo } from './lab-folders.ts';

export const DEMO_SEED = 20260101;
const MONTHS = ['2026-01', '2026-02', '2026-03', '2026-04', '2026-05', '2026-06'];
const BIN_MS = 10;
const SECONDS = 60;

/** Kenyon-cell-like counts: low background, sparse odour-evoked responses, units × bins. */
function kenyonCounts(rng: Uniform, units: number, noiseHz: number): Float32Array {
  const bins = (SECONDS * 1000) / BIN_MS;
  const dt = BIN_MS / 1000;
  const odourOnsets = Array.from({ length: 10 }, (_, i) => 2 + i * 5.5); // 1-s presentations
  const out = new Float32Array(units * bins);
  for (let u = 0; u < units; u++) {
    const base = gamma(rng, 0.6, 0.5) + noiseHz;
    const responds = odourOnsets.map(() => (rng.next() < 0.12 ? gamma(rng, 2, 12) : 0));
    for (let b = 0; b < bins; b++) {
      const t = b * dt;
      let rate = base;
      for (let o = 0; o < odourOnsets.length; o++) {
        if (responds[o] > 0 && t >= odourOnsets[o] && t < odourOnsets[o] + 1) rate += responds[o];
      }
      out[u * bins + b] = poisson(rng, rate * dt);
    }
  }
  return out;
}

/** Synthetic ΔF/F, bins × ROIs (time first, as imaging software stores it). */
function deltaFOverF(rng: Uniform, rois: number, frames: number, eventRate: number, brightness: number): Float32Array {
  const out = new Float32Array(frames * rois);
  const decay = Math.exp(-1 / 8); // indicator decay, ~0.8 s at 10 Hz
  for (let r = 0; r < rois; r++) {
    let level = 0;
    for (let f = 0; f < frames; f++) {
      level *= decay;
      if (rng.next() < eventRate) level += brightness * gamma(rng, 3, 0.4);
      out[f * rois + r] = level + 0.05 * rng.normal() - 0.01; // baseline slightly below zero
    }
  }
  return out;
}

function writeSafetensors(path: string, tensors: { name: string; shape: number[]; data: Float32Array }[]): void {
  const header: Record<string, unknown> = { __metadata__: { scenario: 'lacuna demo (fictional network)' } };
  let offset = 0;
  for (const t of tensors) {
    header[t.name] = { dtype: 'F32', shape: t.shape, data_offsets: [offset, offset + t.data.byteLength] };
    offset += t.data.byteLength;
  }
  let json = JSON.stringify(header);
  json = json.padEnd(Math.ceil(json.length / 8) * 8, ' ');
  const len = Buffer.alloc(8);
  len.writeBigUInt64LE(BigInt(json.length));
  const parts = [len, Buffer.from(json, 'utf8'), ...tensors.map((t) => Buffer.from(t.data.buffer, t.data.byteOffset, t.data.byteLength))];
  atomicWrite(path, Buffer.concat(parts));
}

/** A magnitude-pruned layer: Gaussian weights, the smallest `pruned` fraction set to zero. */
function prunedLayer(rng: Uniform, rows: number, cols: number, pruned: number): Float32Array {
  const w = new Float32Array(rows * cols);
  for (let i = 0; i < w.length; i++) w[i] = rng.normal() / Math.sqrt(cols);
  if (pruned > 0) {
    const mags = Float32Array.from(w, Math.abs).sort();
    const cut = mags[Math.min(mags.length - 1, Math.floor(pruned * mags.length))];
    for (let i = 0; i < w.length; i++) if (Math.abs(w[i]) < cut) w[i] = 0;
  }
  return w;
}

export interface DemoSummary {
  files: string[];
  manifests: string[];
}

/**
 * Write the demo workspace into `dir` (created if needed): `audits/*.md` and `data/…`.
 * With `overwriteManifests: false`, manifests already present are left alone.
 */
export function makeDemo(dir: string, options: { seed?: number; overwriteManifests?: boolean } = {}): DemoSummary {
  const seed = options.seed ?? DEMO_SEED;
  const files: string[] = [];
  const put = (rel: string) => {
    const p = join(dir, rel);
    mkdirSync(join(p, '..'), { recursive: true });
    files.push(rel);
    return p;
  };

  // 1. Electrophysiology: six months, two rigs.
  const rng = createRandom(seed);
  const units = 48;
  const bins = (SECONDS * 1000) / BIN_MS;
  MONTHS.forEach((month, m) => {
    for (const rig of ['rig-a', 'rig-b'] as const) {
      const noiseHz = rig === 'rig-b' && m >= 3 ? 1.5 : 0.05; // amplifier swap on rig B in April
      const counts = kenyonCounts(rng, units, noiseHz);
      if (month === '2026-02' && rig === 'rig-a') {
        counts.fill(0, 5 * bins, 6 * bins); // unit 5 silent (lost from the sort)
        counts.copyWithin(12 * bins, 11 * bins, 12 * bins); // unit 12 duplicates unit 11
      }
      if (month === '2026-03' && rig === 'rig-b') for (let b = 2000; b < 2040; b++) counts[7 * bins + b] = NaN; // dropped samples
      if (month === '2026-05' && rig === 'rig-a') {
        for (let b = 0; b < bins; b += 7) counts[20 * bins + b] = 3; // unit 20 stuck at a ceiling
        for (let b = 0; b < bins; b++) counts[20 * bins + b] = Math.min(3, counts[20 * bins + b]);
      }
      const base = `data/kc/${month}/${rig}`;
      if (month === '2026-06' && rig === 'rig-a') {
        // One session exported as a spike-time table, to show that format.
        const lines = ['# duration_s: 60', 'unit,time'];
        for (let u = 0; u < units; u++) {
          for (let b = 0; b < bins; b++) {
            const c = counts[u * bins + b];
            for (let k = 0; k < c; k++) lines.push(`ku${String(u).padStart(2, '0')},${((b + (k + 0.5) / (c + 1)) * BIN_MS / 1000).toFixed(5)}`);
          }
        }
        atomicWrite(put(`${base}-spikes.csv`), lines.join('\n') + '\n');
      } else if (month === '2026-05' && rig === 'rig-b') {
        // This session is kept as the spike sorter's output folder (curated labels, 30 kHz samples).
        writeSorterDemo(put, `${base}-sort`, counts, units, bins, BIN_MS, seed + 3);
      } else if (month === '2026-01' && rig === 'rig-b') {
        // This rig's January export is time-major (bins × units).
        const t = new Float32Array(units * bins);
        for (let u = 0; u < units; u++) for (let b = 0; b < bins; b++) t[b * units + u] = counts[u * bins + b];
        writeNpy(put(`${base}-time-major.npy`), t, [bins, units]);
      } else {
        writeNpy(put(`${base}.npy`), counts, [units, bins]);
      }
    }
  });

  // 2. Imaging: ΔF/F at 10 Hz, 40 ROIs, 200 s per month; brightness drops in April.
  const rngImg = createRandom(seed + 1);
  MONTHS.forEach((month, m) => {
    const trace = deltaFOverF(rngImg, 40, 2000, 0.01, m >= 3 ? 0.45 : 1);
    writeNpy(put(`data/imaging/${month}.npy`), trace, [2000, 40]);
  });

  // In June the imaging rig also keeps its segmentation pipeline's output folder (two planes).
  writeImagingPipelineDemo(put, 'data/imaging/2026-06-pipeline', seed + 4);

  // 3. Weights: a fictional odour-classifier network, dense and after 50% and 90% magnitude pruning.
  const rngW = createRandom(seed + 2);
  for (const [stage, pruned] of [['dense', 0], ['pruned-50', 0.5], ['pruned-90', 0.9]] as const) {
    writeSafetensors(put(`data/weights/${stage}.safetensors`), [
      { name: 'glomeruli_to_kc', shape: [64, 48], data: prunedLayer(rngW, 64, 48, pruned) },
      { name: 'kc_recurrent', shape: [48, 48], data: prunedLayer(rngW, 48, 48, pruned) },
      { name: 'kc_to_output', shape: [48, 8], data: prunedLayer(rngW, 48, 8, pruned) },
    ]);
  }

  // 4. Manifests.
  const manifests: string[] = [];
  for (const [name, text] of Object.entries(DEMO_MANIFESTS)) {
    const p = join(dir, 'audits', name);
    mkdirSync(join(dir, 'audits'), { recursive: true });
    if (options.overwriteManifests === false && existsSync(p)) continue;
    atomicWrite(p, text);
    manifests.push(`audits/${name}`);
  }
  return { files, manifests };
}

function kcDatasets(): string {
  return MONTHS.flatMap((month, m) =>
    (['rig-a', 'rig-b'] as const).map((rig) => {
      const id = `m${String(m + 1).padStart(2, '0')}-${rig}`;
      const base = `../data/kc/${month}/${rig}`;
      if (month === '2026-06' && rig === 'rig-a') return `  - { id: ${id}, path: ${base}-spikes.csv, format: spikes, month: ${month}, group: ${rig} }`;
      if (month === '2026-01' && rig === 'rig-b') return `  - { id: ${id}, path: ${base}-time-major.npy, layout: bins-by-units, month: ${month}, group: ${rig} }`;
      if (month === '2026-05' && rig === 'rig-b') return `  - { id: ${id}, path: ${base}-sort, month: ${month}, group: ${rig}, sorter: { labels: [good], duration_s: ${SECONDS} } }`;
      return `  - { id: ${id}, path: ${base}.npy, month: ${month}, group: ${rig} }`;
    }),
  ).join('\n');
}

export const DEMO_MANIFESTS: Record<string, string> = {
  'kc-survey.md': `---
audit: kc-survey
title: Kenyon-cell survey, Sphinx imaginaria, 2026 (demo)
kind: activity
axis: time
bin_ms: ${BIN_MS}
zero_tolerance: 0
bootstrap: { resamples: 2000, level: 0.95, method: bca, seed: 1 }
drift: { baseline_months: 3, chart: ewma }
datasets:
${kcDatasets()}
---
Demo scenario (fictional). The Ostrander lab records Kenyon cells in the mushroom body of the
hawkmoth *Sphinx imaginaria* on two rigs, ten 1-s odour presentations per 60-s session.

- **April:** the amplifier on rig B was replaced. Watch the drift page for rig B.
- The June session of rig A was exported as a spike-time table.
- The May session of rig B is read straight from the spike sorter's output folder: only the
  clusters curated as good are units; multi-unit and noise clusters are counted and left out.
`,
  'kc-imaging.md': `---
audit: kc-imaging
title: Kenyon-cell calcium imaging, 2026 (demo)
kind: activity
axis: time
bin_ms: 100
negatives: rectify
events: { k: 3, baseline: trace }
bootstrap: { resamples: 2000, level: 0.95, method: bca, seed: 7 }
datasets:
${MONTHS.map((month, m) => `  - { id: img-${String(m + 1).padStart(2, '0')}, path: ../data/imaging/${month}.npy, layout: bins-by-units, month: ${month}, group: plane-1 }`).join('\n')}
  - { id: img-06-pipeline, path: ../data/imaging/2026-06-pipeline, month: 2026-06, group: pipeline, imaging: { frame_rate_hz: 10, trace: spks, cells: flag } }
---
Demo scenario (fictional). Synthetic ΔF/F traces of 40 regions of interest at 10 Hz with a
planted event rate of 0.01 per frame. From April the indicator is dimmer: events shrink toward
the noise, so fewer cross the event threshold.

In June the lab also kept the segmentation pipeline's own output folder (two planes; its
deconvolved activity of the ROIs the pipeline flagged as cells). Deconvolved activity is not ΔF/F,
so it is its own group and is not pooled with the exported traces.
`,
  'pruned-net.md': `---
audit: pruned-net
title: Pruned odour-classifier network (demo)
kind: weights
datasets:
  - { id: dense, path: ../data/weights/dense.safetensors, group: dense }
  - { id: pruned-50, path: ../data/weights/pruned-50.safetensors, group: pruned }
  - { id: pruned-90, path: ../data/weights/pruned-90.safetensors, group: pruned }
---
Demo scenario (fictional). A three-layer network after magnitude pruning of 0%, 50% and 90% of
the weights of every layer.
`,
};
