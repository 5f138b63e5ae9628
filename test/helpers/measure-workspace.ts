/**
 * Measure every dataset of a workspace's manifests the way a build does (load, hash, compute),
 * without rendering a report: for tests that compare measures with an outside computation.
 */
import { findManifests, loadManifest } from '../../src/manifest/load.ts';
import { hashFile } from '../../src/readers/index.ts';
import { computeDataset } from '../../src/audit/dataset.ts';
import type { DatasetResult } from '../../src/types.ts';

export async function measureWorkspace(ws: string): Promise<DatasetResult[]> {
  const out: DatasetResult[] = [];
  for (const file of await findManifests(ws)) {
    const m = await loadManifest(file, ws);
    for (let i = 0; i < m.datasets.length; i++) {
      const ds = m.datasets[i];
      const files = [];
      for (let k = 0; k < ds.files.length; k++) files.push({ path: ds.relFiles[k], ...(await hashFile(ds.files[k])) });
      out.push(await computeDataset({ workspace: ws, manifest: m, datasetIndex: i, files }));
    }
  }
  return out;
}
