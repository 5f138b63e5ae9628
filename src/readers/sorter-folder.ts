/**
 * A spike sorter's output folder (`format: sorter-folder`) as one activity file: units are the
 * curated clusters, bins are spike counts.
 *
 * Files (src/manifest/lab-folders.ts lists them): `spike_times.npy` — each spike's sample index,
 * an integer array (uint64 as most sorters write it, or any integer dtype), shape (n,) or (n, 1);
 * `spike_clusters.npy` — each spike's cluster, same length (or `spike_templates.npy` when there is
 * no clusters file, the sorter's templates before curation); `params.py` — `sample_rate`, read as
 * text and never run (sorter-params.ts), unless the manifest gives `sorter.sample_rate_hz`;
 * `cluster_group.tsv` / `cluster_KSLabel.tsv` — labels (sorter-labels.ts).
 *
 *   1. Sample rate, label tables, array headers (dtype integer, the two lengths equal).
 *   2. First pass over both arrays in chunks of 1 Mi spikes: check every sample index is a whole
 *      number in [0, 2^53) and every cluster id in [0, 2^31); count spikes per cluster; note the
 *      last sample and whether the times ever decrease.
 *   3. Units: clusters whose label is in `sorter.labels`, by ascending cluster id (every cluster
 *      with spikes when the folder has no label table). Findings say how many clusters each label
 *      had and which were taken, and flag clusters with spikes but no label, labelled clusters
 *      with no spikes, and unsorted times.
 *   4. Bins: exact integer/rational sample arithmetic (sample-bins.ts). The recording ends at
 *      `sorter.duration_s` (a spike at or after it is an InputError) or, without it, in the bin of
 *      the last spike of any cluster (a notice says so).
 *   5. Second pass: each taken spike's bin into one Int32Array grouped by unit (4 bytes per taken
 *      spike, never units × bins); `readUnits` counts them into the block.
 * Cost: two sequential reads of both arrays (12 bytes per spike with uint64 times and int32
 * clusters); memory 4 bytes per taken spike plus one chunk buffer.
 */
import type { Finding } from '../types.ts';
import type { SorterSettings } from '../manifest/types.ts';
import { inputError, type ByteSource } from './byte-source.ts';
import { decodeInto, type DType } from './dtype.ts';
import type { NpyHeader } from './npy-header.ts';
import { openNpyFile } from './npy.ts';
import { readSorterParams } from './sorter-params.ts';
import { LABEL_TABLES, mergeLabels, readLabelTable, type LabelTable } from './sorter-labels.ts';
import { sampleBinner, type SampleBinner } from './sample-bins.ts';
import { checkActivityShape } from './memory-budget.ts';
import type { ReadableActivityFile } from './activity-file.ts';
import { spikeCountsFile } from './spike-counts.ts';

const CHUNK = 1 << 20;
const MAX_BINS = 2 ** 31 - 1;
const MAX_SAMPLE = 2 ** 53;

/** The folder's files by name (absolute and workspace-relative). */
export interface FolderMembers {
  get(name: string): { path: string; rel: string } | undefined;
  /** The folder, workspace-relative, for messages. */
  rel: string;
}

/** Index a dataset's member files by base name (one folder). */
export function membersOf(files: string[], relFiles: string[]): FolderMembers {
  const byName = new Map<string, { path: string; rel: string }>();
  files.forEach((f, i) => byName.set(relFiles[i].slice(relFiles[i].lastIndexOf('/') + 1), { path: f, rel: relFiles[i] }));
  const r0 = relFiles[0] ?? '';
  return { get: (n) => byName.get(n), rel: r0.slice(0, r0.lastIndexOf('/') + 1) || './' };
}

interface IntArray {
  src: ByteSource;
  h: NpyHeader;
  rel: string;
  n: number;
}

async function openIntArray(m: { path: string; rel: string }, what: string): Promise<IntArray> {
  const { src, header: h } = await openNpyFile(m.path, m.rel);
  try {
    if (h.dtype.kind !== 'i' && h.dtype.kind !== 'u') {
      throw inputError(m.rel, 'descr', `${what} has dtype ${h.dtype.name}; allowed: an integer dtype (sample indices and cluster ids are whole numbers)`);
    }
    const s = h.shape;
    if (!(s.length === 1 || (s.length === 2 && s[1] === 1))) {
      throw inputError(m.rel, 'shape', `${what} has shape (${s.join(', ')}); allowed: (n,) or (n, 1), one entry per spike`);
    }
    return { src, h, rel: m.rel, n: s[0] };
  } catch (err) {
    await src.close();
    throw err;
  }
}

/** Decode elements [start, start + count) of a 1-D integer array into `out` (float64). */
async function readChunk(a: IntArray, start: number, count: number, raw: Uint8Array, out: Float64Array): Promise<void> {
  const es = a.h.dtype.size;
  await a.src.read(a.h.headerBytes + start * es, count * es, raw);
  decodeInto(raw, 0, count, es, a.h.dtype as DType, out, 0);
}

/** Visit both arrays chunk by chunk: `fn(times, clusters, count, firstIndex)`. */
async function forEachChunk(t: IntArray, c: IntArray, fn: (times: Float64Array, clusters: Float64Array, count: number, first: number) => void): Promise<void> {
  const raw = new Uint8Array(CHUNK * 8);
  const times = new Float64Array(CHUNK);
  const clusters = new Float64Array(CHUNK);
  for (let i = 0; i < t.n; i += CHUNK) {
    const k = Math.min(CHUNK, t.n - i);
    await readChunk(t, i, k, raw, times);
    await readChunk(c, i, k, raw, clusters);
    fn(times, clusters, k, i);
  }
}

function sampleRate(settings: SorterSettings, params: Awaited<ReturnType<typeof readSorterParams>> | null, rel: string, findings: Finding[]): number {
  const fromFile = params?.values.get('sample_rate');
  if (fromFile !== undefined && typeof fromFile.value !== 'number') {
    throw inputError(rel, `line ${fromFile.line}`, 'sample_rate is text, not a number');
  }
  const fileRate = fromFile?.value as number | undefined;
  if (settings.sample_rate_hz !== null) {
    if (fileRate !== undefined && fileRate !== settings.sample_rate_hz) {
      findings.push({
        level: 'notice', code: 'sample-rate-from-manifest',
        message: `The manifest's sample rate ${settings.sample_rate_hz} Hz was used; ${rel} says ${fileRate} Hz.`,
        where: [`${rel}:${fromFile!.line}`], count: 1,
      });
    }
    return settings.sample_rate_hz;
  }
  if (fileRate === undefined) {
    throw inputError(rel, 'sample_rate', `no sample rate: ${params ? 'params.py has no plain "sample_rate = …" line' : 'the folder has no params.py'}`, 'give it in the manifest: sorter: { sample_rate_hz: 30000 }');
  }
  if (!(fileRate > 0) || !Number.isFinite(fileRate) || fileRate > 1e7) {
    throw inputError(rel, `line ${fromFile!.line}`, `sample_rate ${fileRate} is not allowed; a rate in Hz above 0 and at most 10,000,000`);
  }
  return fileRate;
}

const plural = (n: number, w: string) => `${n.toLocaleString('en-US')} ${w}${n === 1 ? '' : 's'}`;

interface SorterHeaders {
  mem: FolderMembers;
  rate: number;
  tables: LabelTable[];
  t: IntArray;
  c: IntArray;
  findings: Finding[];
}

/**
 * Step 1: sample rate, label tables and the two arrays' headers (no spike is read). The arrays'
 * byte sources are open on return; the caller closes them.
 */
async function sorterHeaders(files: string[], relFiles: string[], settings: SorterSettings): Promise<SorterHeaders> {
  const mem = membersOf(files, relFiles);
  const findings: Finding[] = [];
  const paramsFile = mem.get('params.py');
  const params = paramsFile ? await readSorterParams(paramsFile.path, paramsFile.rel, ['sample_rate']) : null;
  const rate = sampleRate(settings, params, paramsFile?.rel ?? mem.rel, findings);
  const tables: LabelTable[] = [];
  for (const name of LABEL_TABLES) {
    const m = mem.get(name);
    if (m) tables.push(await readLabelTable(m.path, m.rel));
  }
  const timesFile = mem.get('spike_times.npy')!;
  const clustersFile = mem.get('spike_clusters.npy') ?? mem.get('spike_templates.npy')!;
  const t = await openIntArray(timesFile, 'spike_times.npy');
  let c: IntArray;
  try {
    c = await openIntArray(clustersFile, clustersFile.rel.endsWith('spike_clusters.npy') ? 'spike_clusters.npy' : 'spike_templates.npy');
  } catch (err) {
    await t.src.close();
    throw err;
  }
  const h: SorterHeaders = { mem, rate, tables, t, c, findings };
  try {
    if (c.n !== t.n) {
      throw inputError(c.rel, 'shape', `${c.rel} has ${c.n} entries but ${t.rel} has ${t.n}; there must be one cluster per spike`);
    }
    if (t.n === 0) throw inputError(t.rel, 'shape', 'no spikes; no units can be formed');
  } catch (err) {
    await closeArrays(h);
    throw err;
  }
  return h;
}

async function closeArrays(h: SorterHeaders): Promise<void> {
  await h.t.src.close();
  await h.c.src.close();
}

/** What `lacuna check` can say of a sorter folder from its headers alone (no spike is read). */
export async function inspectSorterFolder(files: string[], relFiles: string[], settings: SorterSettings, binMs: number): Promise<{ spikes: number; dtype: string; rate: number }> {
  const h = await sorterHeaders(files, relFiles, settings);
  await closeArrays(h);
  const binner = sampleBinner(binMs, h.rate);
  if (settings.duration_s !== null) checkActivityShape({ units: 0, bins: binner.binsFor(settings.duration_s), binMs, file: h.t.rel, where: 'sorter.duration_s' });
  return { spikes: h.t.n, dtype: h.t.h.dtype.name, rate: h.rate };
}

/** Open a sorter folder at `binMs`. */
export async function openSorterFolder(files: string[], relFiles: string[], settings: SorterSettings, binMs: number): Promise<ReadableActivityFile> {
  const h = await sorterHeaders(files, relFiles, settings);
  const { mem, rate, tables, t, c, findings } = h;
  const binner: SampleBinner = sampleBinner(binMs, rate);
  try {
    if (!mem.get('spike_clusters.npy')) {
      findings.push({ level: 'caution', code: 'sorter-templates-as-units', message: `No spike_clusters.npy: units are the sorter's templates (${c.rel}), before any curation merged or split them.`, where: [c.rel], count: 1 });
    }
    // 2.
    const counts = new Map<number, number>();
    let lastSample = -1;
    let decreases = 0;
    let firstDecrease = -1;
    let prev = -Infinity;
    await forEachChunk(t, c, (times, clusters, k, first) => {
      for (let j = 0; j < k; j++) {
        const s = times[j];
        if (!(s >= 0) || s >= MAX_SAMPLE) throw inputError(t.rel, `element ${first + j}`, `sample index ${s} is not allowed; spike times are sample indices from 0 to 2^53 − 1`);
        const id = clusters[j];
        if (!(id >= 0) || id > 2 ** 31 - 1) throw inputError(c.rel, `element ${first + j}`, `cluster id ${id} is not allowed; cluster ids are whole numbers from 0 to 2147483647`);
        counts.set(id, (counts.get(id) ?? 0) + 1);
        if (s < prev) {
          if (decreases === 0) firstDecrease = first + j;
          decreases++;
        }
        prev = s;
        if (s > lastSample) lastSample = s;
      }
    });
    if (decreases > 0) {
      findings.push({
        level: 'caution', code: 'spike-times-unsorted',
        message: `${t.rel}: spike times decrease ${plural(decreases, 'time')} (first at element ${firstDecrease}); sorters write them in time order, so the folder may have been joined or edited by hand. Counts per bin do not depend on the order.`,
        where: [`${t.rel}[${firstDecrease}]`], count: decreases,
      });
    }
    // 3.
    const taken = new Set(settings.labels.map((l) => l.toLowerCase()));
    const labelOf = mergeLabels(tables);
    const tableNames = tables.map((x) => x.relPath).join(' and ');
    let unitIds: number[];
    if (tables.length === 0) {
      unitIds = [...counts.keys()].sort((a, b) => a - b);
      findings.push({ level: 'caution', code: 'sorter-no-labels', message: `The folder has no label table (${LABEL_TABLES.join(', ')}): every cluster with spikes (${plural(unitIds.length, 'cluster')}) was taken as a unit, noise and multi-unit clusters included.`, where: [mem.rel], count: unitIds.length });
    } else {
      const perLabel = new Map<string, number>();
      for (const l of labelOf.values()) perLabel.set(l, (perLabel.get(l) ?? 0) + 1);
      unitIds = [...labelOf.entries()].filter(([id, l]) => taken.has(l) && counts.has(id)).map(([id]) => id).sort((a, b) => a - b);
      const words = [...perLabel.entries()].sort((a, b) => b[1] - a[1]).map(([l, n]) => `${l} ${n}${taken.has(l) ? ' (taken)' : ''}`);
      findings.push({ level: 'notice', code: 'sorter-labels', message: `Clusters by label in ${tableNames}: ${words.join(', ')}; units are the clusters labelled ${[...taken].join(' or ')}.`, where: tables.map((x) => x.relPath), count: unitIds.length });
      const unmentioned = [...perLabel.keys()].filter((l) => !taken.has(l) && !['mua', 'noise'].includes(l));
      if (unmentioned.length) {
        findings.push({ level: 'notice', code: 'sorter-labels-not-taken', message: `Labels the manifest does not name were left out: ${unmentioned.map((l) => `${l} (${perLabel.get(l)})`).join(', ')}; add them to sorter.labels to take them.`, where: unmentioned, count: unmentioned.reduce((s, l) => s + perLabel.get(l)!, 0) });
      }
      const unlabelled = [...counts.keys()].filter((id) => !labelOf.has(id)).sort((a, b) => a - b);
      if (unlabelled.length) {
        const spikes = unlabelled.reduce((s, id) => s + counts.get(id)!, 0);
        findings.push({ level: 'caution', code: 'sorter-unlabelled-clusters', message: `${plural(unlabelled.length, 'cluster')} with spikes (${plural(spikes, 'spike')}) have no label in ${tableNames} and were left out; the label table may be older than the clusters.`, where: unlabelled.slice(0, 20).map((id) => `cluster ${id}`), count: unlabelled.length });
      }
      const empty = [...labelOf.keys()].filter((id) => taken.has(labelOf.get(id)!) && !counts.has(id)).sort((a, b) => a - b);
      if (empty.length) {
        findings.push({ level: 'caution', code: 'sorter-labelled-without-spikes', message: `${plural(empty.length, 'cluster')} labelled ${[...taken].join(' or ')} in ${tableNames} have no spike in ${c.rel} and were left out: the files disagree on which units exist.`, where: empty.slice(0, 20).map((id) => `cluster ${id}`), count: empty.length });
      }
    }
    if (unitIds.length === 0) {
      throw inputError(tableNames || c.rel, 'labels', `no cluster with spikes is labelled ${[...taken].join(' or ')}; no units can be formed`, 'set sorter.labels to labels the table uses');
    }
    // 4.
    let bins: number;
    if (settings.duration_s !== null) {
      bins = binner.binsFor(settings.duration_s);
      if (binner.atOrAfter(lastSample, settings.duration_s)) {
        throw inputError(t.rel, 'last spike', `a spike at sample ${lastSample} (${(lastSample / rate).toFixed(6)} s) is at or after the manifest's duration_s ${settings.duration_s}`);
      }
    } else {
      bins = binner.binOf(lastSample) + 1;
      findings.push({ level: 'notice', code: 'duration-from-last-spike', message: `No sorter.duration_s in the manifest, so the recording was taken to end in the bin of the last spike (${plural(bins, 'bin')} of ${binMs} ms); silence after it is not counted.`, where: [t.rel], count: 1 });
    }
    if (bins > MAX_BINS) throw inputError(t.rel, 'last spike', `${bins} bins of ${binMs} ms; allowed: at most ${MAX_BINS}`, 'use a larger bin_ms');
    checkActivityShape({ units: unitIds.length, bins, binMs, file: t.rel, where: settings.duration_s !== null ? 'sorter.duration_s' : 'last spike' });
    // 5.
    const row = new Map<number, number>();
    unitIds.forEach((id, u) => row.set(id, u));
    const start = new Float64Array(unitIds.length + 1);
    for (let u = 0; u < unitIds.length; u++) start[u + 1] = start[u] + counts.get(unitIds[u])!;
    const fill = start.slice(0, unitIds.length);
    const spikeBins = new Int32Array(start[unitIds.length]);
    await forEachChunk(t, c, (times, clusters, k) => {
      for (let j = 0; j < k; j++) {
        const u = row.get(clusters[j]);
        if (u !== undefined) spikeBins[fill[u]++] = binner.binOf(times[j]);
      }
    });
    return spikeCountsFile({ path: files[0], bins, binMs, findings, unitLabels: unitIds.map(String), start, spikeBins });
  } finally {
    await closeArrays(h);
  }
}
