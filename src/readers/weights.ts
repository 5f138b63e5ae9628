/**
 * Weight datasets: one tensor per `.npy` file, per `.npz` member, per safetensors tensor, per
 * CSV/TSV file. Layer names: the file name without extension (`.npy`, CSV), the member name
 * without `.npy`, or the safetensors tensor name; when the dataset has several files, each name is
 * prefixed with its file name and `/`. Shapes come from headers before any data are read (CSV:
 * from one pass counting rows and cells). `tensors()` reads one tensor at a time into a new array
 * (the consumer may keep it); Fortran-order arrays are returned in C order.
 */
import { basename } from 'node:path';
import type { Finding, Numeric, Tensor } from '../types.ts';
import type { ResolvedDataset } from '../manifest/types.ts';
import { inputError } from './byte-source.ts';
import { openNpyFile, readNpyTensor } from './npy.ts';
import { npzEntries, openNpzMember } from './npz.ts';
import { readSafetensorsHeader, readSafetensor } from './safetensors.ts';
import { inspectTable, readNumericTable } from './csv.ts';
import { delimiterFor } from './table-text.ts';

export interface WeightsPlan {
  layers: { name: string; shape: number[]; dtype: string }[];
  findings: Finding[];
  /** Read layer i (in `layers` order). */
  read: ((() => Promise<Numeric>))[];
}

const stem = (p: string) => basename(p).replace(/\.(npy|npz|safetensors|csv|tsv|tab|txt)$/i, '');

/** Headers of every file of a weights dataset (no data read). */
export async function planWeights(ds: ResolvedDataset): Promise<WeightsPlan> {
  const plan: WeightsPlan = { layers: [], findings: [], read: [] };
  const many = ds.files.length > 1;
  for (let i = 0; i < ds.files.length; i++) {
    const path = ds.files[i];
    const rel = ds.relFiles[i];
    const prefix = many ? `${stem(rel)}/` : '';
    const add = (name: string, shape: number[], dtype: string, read: () => Promise<Numeric>) => {
      plan.layers.push({ name, shape, dtype });
      plan.read.push(read);
    };
    switch (ds.format) {
      case 'npy': {
        const { src, header } = await openNpyFile(path, rel);
        await src.close();
        add(stem(rel), header.shape, header.dtype.name, async () => {
          const f = await openNpyFile(path, rel);
          try { return await readNpyTensor(f.src, f.header, rel); } finally { await f.src.close(); }
        });
        break;
      }
      case 'npz': {
        for (const entry of await npzEntries(path, rel)) {
          const m = await openNpzMember(path, rel, entry);
          await m.src.close();
          add(prefix + m.name, m.header.shape, m.header.dtype.name, async () => {
            const again = await openNpzMember(path, rel, entry);
            try { return await readNpyTensor(again.src, again.header, rel); } finally { await again.src.close(); }
          });
        }
        break;
      }
      case 'safetensors': {
        const h = await readSafetensorsHeader(path, rel);
        if (!h.tensors.length) throw inputError(rel, 'header', 'file holds no tensors');
        for (const t of h.tensors) add(prefix + t.name, t.shape, t.dtype.name, () => readSafetensor(path, rel, h, t));
        break;
      }
      case 'csv':
      case 'tsv': {
        const delim = delimiterFor(ds.format, rel);
        const t = await inspectTable(path, rel, delim);
        if (t.header) {
          plan.findings.push({
            level: 'notice', code: 'header-ignored',
            message: `${rel}: the first row is a header (${t.header.length} labels); weight matrices have no unit labels, so it was ignored.`,
            where: [rel], count: t.header.length,
          });
        }
        add(stem(rel), [t.rows, t.cols], 'f8', async () => (await readNumericTable(path, rel, delim)).data);
        break;
      }
      default:
        throw inputError(rel, 'format', `format '${ds.format}' holds activity, not weights; weights are read from npy, npz, safetensors, csv or tsv`);
    }
  }
  const seen = new Set<string>();
  for (const l of plan.layers) {
    if (seen.has(l.name)) throw inputError(ds.relFiles[0] ?? ds.path, `layer '${l.name}'`, 'two layers have the same name');
    seen.add(l.name);
  }
  return plan;
}

/** The tensors of a plan, one at a time. */
export async function* readTensors(plan: WeightsPlan): AsyncGenerator<Tensor> {
  for (let i = 0; i < plan.layers.length; i++) {
    const data = await plan.read[i]();
    yield { name: plan.layers[i].name, shape: plan.layers[i].shape, data };
  }
}
