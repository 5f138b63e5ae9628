/**
 * The label tables of a spike sorter's output folder: tab-separated files `cluster_*.tsv` whose
 * header names `cluster_id` and one label column (`group` in a curated table, `KSLabel` in the
 * sorter's own), one row per cluster: `17\tgood`.
 *
 * Which label a cluster gets: the curated table `cluster_group.tsv` where it lists the cluster,
 * else the sorter's `cluster_KSLabel.tsv`. Labels are compared case-insensitively and kept as
 * written (lower-cased) for the report. A cluster id that is not a whole number ≥ 0, a row with
 * the wrong number of cells, or a cluster listed twice in one table is an InputError naming the
 * table and the row. At most 16 MiB per table (a million clusters would need under 16 MiB).
 */
import { stat } from 'node:fs/promises';
import { inputError } from './byte-source.ts';
import { textLines } from './text-lines.ts';

export const MAX_LABEL_TABLE_BYTES = 16 << 20;
/** Label tables read, most trusted first. */
export const LABEL_TABLES = ['cluster_group.tsv', 'cluster_KSLabel.tsv'] as const;

export interface LabelTable {
  relPath: string;
  column: string;
  labels: Map<number, string>;
}

/** Read one label table. */
export async function readLabelTable(path: string, relPath: string): Promise<LabelTable> {
  const { size } = await stat(path);
  if (size > MAX_LABEL_TABLE_BYTES) throw inputError(relPath, 'size', `label table is ${size} bytes; allowed: at most ${MAX_LABEL_TABLE_BYTES} bytes`);
  const labels = new Map<number, string>();
  let idCol = -1;
  let labelCol = -1;
  let column = '';
  let width = 0;
  for await (const [line, text] of textLines(path, relPath, MAX_LABEL_TABLE_BYTES)) {
    if (text.trim() === '') continue;
    const cells = text.split('\t').map((c) => c.trim());
    if (idCol < 0) {
      idCol = cells.indexOf('cluster_id');
      const others = cells.map((_, i) => i).filter((i) => i !== idCol);
      if (idCol < 0 || others.length !== 1) {
        throw inputError(relPath, `row ${line}`, `header must name 'cluster_id' and one label column, tab-separated; found ${cells.slice(0, 6).map((c) => JSON.stringify(c.length > 80 ? `${c.slice(0, 80)}…` : c)).join(', ')}`);
      }
      labelCol = others[0];
      column = cells[labelCol];
      width = cells.length;
      continue;
    }
    if (cells.length !== width) throw inputError(relPath, `row ${line}`, `row has ${cells.length} cells, expected ${width} as in the header`);
    const idText = cells[idCol];
    if (!/^\d{1,10}$/.test(idText) || Number(idText) > 2 ** 31 - 1) {
      throw inputError(relPath, `row ${line}, column ${idCol + 1}`, `cluster_id ${JSON.stringify(idText.slice(0, 40))} is not allowed; cluster ids are whole numbers from 0 to 2147483647`);
    }
    const label = cells[labelCol].toLowerCase();
    if (label === '' || label.length > 64 || /[\u0000-\u001f\u007f-\u009f]/.test(label)) {
      throw inputError(relPath, `row ${line}, column ${labelCol + 1}`, `label ${JSON.stringify(label.slice(0, 40))} is not allowed; a label is one word or phrase of 1–64 printable characters`);
    }
    const id = Number(idText);
    if (labels.has(id)) throw inputError(relPath, `row ${line}`, `cluster ${id} is listed twice`);
    labels.set(id, label);
  }
  if (idCol < 0) throw inputError(relPath, 'row 1', "label table is empty; expected a header naming 'cluster_id' and a label column");
  return { relPath, column, labels };
}

/** The label of each cluster from the tables, most trusted first (see the file comment). */
export function mergeLabels(tables: LabelTable[]): Map<number, string> {
  const out = new Map<number, string>();
  for (const t of [...tables].reverse()) for (const [id, l] of t.labels) out.set(id, l);
  return out;
}
