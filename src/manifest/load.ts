/**
 * Loading manifests: from a file to a `ResolvedManifest`.
 *
 * 1. Read the bytes (at most 1 MiB, by `stat` before reading: read-bounded.ts), hash them (SHA-256), decode strict UTF-8.
 * 2. `parseManifestText`: front matter as data, nothing run (`parse.ts`).
 * 3. `collectManifest`: every field checked against the table, defaults filled (`validate.ts`).
 * 4. For each dataset whose path fields are sound: resolve its files inside the workspace
 *    (`paths.ts`), then its format (`format.ts`), then the format-specific fields.
 * 5. Every problem of steps 3–4 is thrown together as `InputErrors`.
 */
import { createHash } from 'node:crypto';
import { readdir, realpath, stat } from 'node:fs/promises';
import path from 'node:path';
import { InputError, InputErrors } from '../errors.ts';
import type { ResolvedDataset, ResolvedManifest } from './types.ts';
import { parseManifestText } from './parse.ts';
import { readManifestBytes } from './read-bounded.ts';
import { collectManifest } from './validate.ts';
import { isInside, resolveInsideWorkspace, toPosix } from './paths.ts';
import { resolveFormat } from './format.ts';
import { resolveLabFolder } from './lab-folders.ts';

export const MAX_MANIFEST_BYTES = 1024 * 1024;


/**
 * Read, validate and resolve one manifest. Throws `InputError` (file unreadable, not UTF-8,
 * no valid front matter) or `InputErrors` (every field and path problem found).
 */
export async function loadManifest(file: string, workspaceRoot: string): Promise<ResolvedManifest> {
  const abs = path.resolve(file);
  const rootAbs = path.resolve(workspaceRoot);
  const relFile = toPosix(path.relative(rootAbs, abs));
  // 1.
  const real = await realpath(abs).catch((err: unknown) => {
    throw new InputError('manifest not found', { file: relFile, cause: err });
  });
  if (!isInside(await realpath(rootAbs), real)) {
    throw new InputError(`manifest leads outside the workspace (to ${real}); allowed: manifests inside the workspace folder`, { file: relFile });
  }
  const bytes = await readManifestBytes(real, relFile, MAX_MANIFEST_BYTES); // size checked before reading
  const sha256 = createHash('sha256').update(bytes).digest('hex');
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
  } catch (err) {
    throw new InputError('manifest is not valid UTF-8 text', { file: relFile, cause: err });
  }
  // 2–3.
  const { data, body, lineOf } = parseManifestText(text, relFile);
  const { value, problems } = collectManifest(data, { file: relFile, lineOf });
  // 4.
  const manifestDir = path.dirname(abs);
  const datasets: ResolvedDataset[] = [];
  for (const [i, d] of value.datasets.entries()) {
    const at = `datasets[${i}]`;
    const sound = (field: string) => !problems.some((p) => p.where === `${at}.${field}`);
    if (!d.path || !sound('path') || !sound('files') || !sound('format')) continue;
    try {
      const pathCtx = { file: relFile, where: `${at}.path`, pattern: d.files, lineOf };
      const lab = await resolveLabFolder(rootAbs, manifestDir, d.path, d.format, pathCtx);
      const r = lab ?? await resolveInsideWorkspace(rootAbs, manifestDir, d.path, pathCtx);
      const format = lab ? lab.format : resolveFormat(d.format, r.relFiles, { file: relFile, where: `${at}.format`, line: lineOf(`${at}.format`) ?? lineOf(`${at}.path`) });
      const wrongFor = (field: 'member' | 'series' | 'recording_end_s' | 'sorter' | 'imaging', needs: string) =>
        problems.push(new InputError(`found ${field === 'sorter' || field === 'imaging' ? `${field} settings` : `${field}: ${JSON.stringify(d[field])}`} for a ${format} dataset; allowed: ${field} only with format ${needs}`, {
          file: relFile, where: `${at}.${field}`, line: lineOf(`${at}.${field}`),
        }));
      if (d.member !== null && format !== 'npz') wrongFor('member', 'npz');
      if (d.series !== null && format !== 'nwb') wrongFor('series', 'nwb');
      if ((d.recording_end_s ?? null) !== null && format !== 'nwb') wrongFor('recording_end_s', 'nwb');
      if (d.sorter !== null && format !== 'sorter-folder') wrongFor('sorter', 'sorter-folder');
      if (d.imaging !== null && format !== 'imaging-folder') wrongFor('imaging', 'imaging-folder');
      if (format === 'imaging-folder' && d.imaging === null) {
        problems.push(new InputError('found an imaging-pipeline folder without imaging: { frame_rate_hz }; allowed: an imaging folder with its frame rate stated in the manifest', {
          file: relFile, where: `${at}.imaging`, line: lineOf(`${at}.path`),
          hint: "the pipeline keeps the rate in a pickled settings file, which Lacuna never loads: add imaging: { frame_rate_hz: 30 } with your rate",
        }));
      }
      if (value.kind === 'weights' && (format === 'sorter-folder' || format === 'imaging-folder')) {
        problems.push(new InputError(`found a ${format} with kind weights; allowed: npy, npz, csv, tsv, safetensors`, { file: relFile, where: `${at}.path`, line: lineOf(`${at}.path`) }));
      }
      if (value.kind === 'weights' && (format === 'spikes' || format === 'nwb')) {
        problems.push(new InputError(`found ${format} files with kind weights; allowed: npy, npz, csv, tsv, safetensors`, { file: relFile, where: `${at}.path`, line: lineOf(`${at}.path`) }));
      }
      datasets.push({
        id: d.id, path: d.path, files: r.files, relFiles: r.relFiles, format,
        month: d.month, group: d.group, layout: d.layout, series: d.series, member: d.member,
        sorter: format === 'sorter-folder' ? (d.sorter ?? { labels: ['good'], sample_rate_hz: null, duration_s: null }) : null,
        imaging: format === 'imaging-folder' ? d.imaging : null,
        ...((d.recording_end_s ?? null) !== null ? { recording_end_s: d.recording_end_s } : {}),
      });
    } catch (err) {
      if (!(err instanceof InputError)) throw err;
      problems.push(err);
    }
  }
  // 5.
  if (problems.length > 0) throw new InputErrors(problems.sort((a, b) => (a.line ?? Infinity) - (b.line ?? Infinity)));
  const { datasets: _validated, ...settings } = value;
  return { file: abs, relFile, sha256, ...settings, datasets, notes: body };
}

/**
 * The manifests of a workspace: `audits/*.md` (not hidden, not in subfolders), sorted by code
 * point, as absolute paths. Throws an `InputError` when there is no `audits/` folder.
 */
export async function findManifests(workspaceRoot: string): Promise<string[]> {
  const dir = path.join(path.resolve(workspaceRoot), 'audits');
  let names: string[];
  try {
    names = await readdir(dir);
  } catch (err) {
    throw new InputError(`no audits/ folder here (${toPosix(dir)}); allowed: a workspace folder holding audits/*.md manifests`, {
      file: toPosix(path.resolve(workspaceRoot)),
      hint: 'make one with `lacuna init DIR`',
      cause: err,
    });
  }
  const out: string[] = [];
  for (const n of names) {
    if (n.startsWith('.') || !n.endsWith('.md')) continue;
    const full = path.join(dir, n);
    if (await stat(full).then((s) => s.isFile(), () => true)) out.push(full); // broken links are reported by loadManifest
  }
  return out.sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
}
