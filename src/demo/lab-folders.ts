/**
 * The demo scenario's lab output folders (fictional, seeded): in May, rig B's session is kept
 * as the spike sorter's output folder instead of an exported matrix; in June the imaging rig
 * also keeps its segmentation pipeline's output folder (two planes).
 *
 * Both draw from their own generator, so the rest of the scenario's data do not change, and the
 * sorter folder holds exactly the spike counts the scenario drew for that session (each spike
 * placed at a random sample inside its 10 ms bin), so its measures are those of the matrix.
 */
import { writeFileSync, renameSync } from 'node:fs';
import { createRandom } from '../stats/random.ts';
import { writeNpy } from '../readers/npy-write.ts';
import { gamma, poisson } from './sample.ts';

const RATE_HZ = 30_000;

/** Write a demo file through a temporary name, so a killed run never leaves half a file. */
export function atomicWrite(path: string, text: Buffer | string): void {
  const tmp = `${path}.tmp-${process.pid}`;
  writeFileSync(tmp, text);
  renameSync(tmp, path);
}

/**
 * A sorter folder holding `counts` (units × bins at `binMs`) as spikes of curated clusters, plus
 * multi-unit and noise clusters the curation left out. `put(rel)` makes the folder and returns the path.
 */
export function writeSorterDemo(put: (rel: string) => string, folder: string, counts: Float32Array, units: number, bins: number, binMs: number, seed: number): void {
  const rng = createRandom(seed);
  const perBin = (RATE_HZ * binMs) / 1000;
  const clusterOf = (u: number) => 3 + 2 * u + (u % 5 === 0 ? 1 : 0); // ids left sparse by curation, as sorters leave them
  const spikes: [number, number][] = [];
  for (let u = 0; u < units; u++) {
    for (let b = 0; b < bins; b++) {
      for (let k = 0; k < counts[u * bins + b]; k++) spikes.push([b * perBin + Math.floor(rng.next() * perBin), clusterOf(u)]);
    }
  }
  const extra: [number, string, number][] = [[201, 'mua', 6], [203, 'mua', 9], [207, 'mua', 4], [211, 'noise', 40], [212, 'noise', 25]];
  for (const [id, , hz] of extra) {
    const n = poisson(rng, hz * (bins * binMs) / 1000);
    for (let i = 0; i < n; i++) spikes.push([Math.floor(rng.next() * bins * perBin), id]);
  }
  spikes.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
  writeNpy(put(`${folder}/spike_times.npy`), BigUint64Array.from(spikes, (s) => BigInt(s[0])), [spikes.length]);
  writeNpy(put(`${folder}/spike_clusters.npy`), Int32Array.from(spikes, (s) => s[1]), [spikes.length]);
  atomicWrite(put(`${folder}/params.py`), [
    "dat_path = 'ostrander-rigb-2026-05.bin'", 'n_channels_dat = 64', "dtype = 'int16'", 'offset = 0',
    `sample_rate = ${RATE_HZ.toFixed(1)}`, 'hp_filtered = False', '',
  ].join('\n'));
  const group = ['cluster_id\tgroup', ...Array.from({ length: units }, (_, u) => `${clusterOf(u)}\tgood`), ...extra.map(([id, l]) => `${id}\t${l}`)];
  atomicWrite(put(`${folder}/cluster_group.tsv`), group.join('\n') + '\n');
  const ks = ['cluster_id\tKSLabel', ...Array.from({ length: units }, (_, u) => `${clusterOf(u)}\t${u % 9 === 4 ? 'mua' : 'good'}`), ...extra.map(([id]) => `${id}\tmua`)];
  atomicWrite(put(`${folder}/cluster_KSLabel.tsv`), ks.join('\n') + '\n');
}

/**
 * An imaging pipeline's output folder: `planes` planes of ROIs × frames at 10 Hz. F is a cell's
 * fluorescence plus 0.7 of the surrounding neuropil; Fneu is that neuropil; spks the event
 * amplitudes; a few ROIs per plane are not cells (flag 0), two of them empty (all zero).
 */
export function writeImagingPipelineDemo(put: (rel: string) => string, folder: string, seed: number, planes = 2, rois = 24, frames = 2000): void {
  const rng = createRandom(seed);
  const decay = Math.exp(-1 / 8);
  for (let p = 0; p < planes; p++) {
    const F = new Float32Array(rois * frames);
    const Fneu = new Float32Array(rois * frames);
    const spks = new Float32Array(rois * frames);
    const iscell = new Float64Array(rois * 2);
    for (let r = 0; r < rois; r++) {
      const cell = r % 6 !== 5;
      const empty = !cell && r % 12 === 11;
      const prob = cell ? 0.7 + 0.3 * rng.next() : 0.05 + 0.4 * rng.next();
      iscell[2 * r] = cell ? 1 : 0;
      iscell[2 * r + 1] = prob;
      if (empty) continue;
      const baseline = 250 + 100 * rng.next();
      let level = 0;
      let neuropil = 180;
      for (let f = 0; f < frames; f++) {
        level *= decay;
        const event = cell && rng.next() < 0.01 ? gamma(rng, 3, 0.4) : 0;
        level += event;
        neuropil += 0.05 * (180 - neuropil) + 2 * rng.normal();
        const i = r * frames + f;
        Fneu[i] = neuropil + 3 * rng.normal();
        F[i] = baseline * (1 + level) + 0.7 * neuropil + 4 * rng.normal();
        spks[i] = event * baseline;
      }
    }
    const dir = `${folder}/plane${p}`;
    writeNpy(put(`${dir}/F.npy`), F, [rois, frames]);
    writeNpy(put(`${dir}/Fneu.npy`), Fneu, [rois, frames]);
    writeNpy(put(`${dir}/spks.npy`), spks, [rois, frames]);
    writeNpy(put(`${dir}/iscell.npy`), iscell, [rois, 2]);
  }
}
