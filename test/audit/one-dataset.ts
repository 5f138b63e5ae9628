/**
 * Compute one dataset the way a build does (manifest → reader → measures), from a matrix written
 * as .npy into a fresh workspace. For tests that check a dataset's measures against numpy.
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { writeNpy } from '../../src/readers/npy-write.ts';
import { loadManifest } from '../../src/manifest/load.ts';
import { openDataset } from '../../src/readers/index.ts';
import { computeActivity } from '../../src/audit/activity.ts';
import { computeWeights } from '../../src/audit/weights.ts';
import type { ActivitySource, DatasetResult, WeightsSource } from '../../src/types.ts';

/** `extra`: more front-matter lines (e.g. `negatives: rectify`). */
export async function activityDataset(values: Float64Array, shape: [number, number], extra = ''): Promise<Omit<DatasetResult, 'cacheKey'>> {
  const ws = mkdtempSync(join(tmpdir(), 'lacuna-one-'));
  try {
    mkdirSync(join(ws, 'audits'));
    mkdirSync(join(ws, 'data'));
    writeNpy(join(ws, 'data', 'm.npy'), values, shape);
    writeFileSync(join(ws, 'audits', 'a.md'), `---
audit: one
title: one dataset
bin_ms: 10
min_bins: 10
bootstrap: { resamples: 100, level: 0.9, method: percentile, seed: 1 }
${extra}
datasets:
  - { id: d1, path: ../data/m.npy }
---
`);
    const m = await loadManifest(join(ws, 'audits', 'a.md'), ws);
    const src = await openDataset(m.datasets[0], { kind: 'activity', binMs: m.bin_ms, workspaceRoot: ws });
    return await computeActivity(m.datasets[0], m, src as ActivitySource, () => {});
  } finally {
    rmSync(ws, { recursive: true, force: true });
  }
}

/** A `kind: weights` dataset from a file that `write(path)` creates (e.g. safetensors written by numpy). */
export async function weightsDataset(fileName: string, write: (path: string) => void, extra = ''): Promise<Omit<DatasetResult, 'cacheKey'>> {
  const ws = mkdtempSync(join(tmpdir(), 'lacuna-one-'));
  try {
    mkdirSync(join(ws, 'audits'));
    mkdirSync(join(ws, 'data'));
    write(join(ws, 'data', fileName));
    writeFileSync(join(ws, 'audits', 'a.md'), `---
audit: one
title: one weights dataset
kind: weights
${extra}
datasets:
  - { id: w1, path: ../data/${fileName} }
---
`);
    const m = await loadManifest(join(ws, 'audits', 'a.md'), ws);
    const src = await openDataset(m.datasets[0], { kind: 'weights', binMs: m.bin_ms, workspaceRoot: ws });
    return await computeWeights(m.datasets[0], m, src as WeightsSource, () => {});
  } finally {
    rmSync(ws, { recursive: true, force: true });
  }
}
