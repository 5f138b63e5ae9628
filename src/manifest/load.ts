/**
 * Loading manifests: from a file to a `ResolvedManifest`.
 *
 * 1. Read the bytes (at most 1 MiB), hash them (SHA-256), decode strict UTF-8.
 * 2. `parseManifestText`: front matter as data, nothing run (`parse.ts`).
 * 3. `collectManifest`: every field checked against the table, defaults filled (`validate.ts`).
 * 4. For each dataset whose path fields are sound: resolve its files inside the workspace
 *    (`paths.ts`), then its format (`format.ts`), then the format-specific fields.
 * 5. Every problem of steps 3–4 is thrown together as `InputErrors`.
 */
import { createHash } from 'node:crypto';
import { readFile, readdir, realpath, stat } from 'node:fs/promises';
import path from 'node:path';
import { InputError, InputErrors } from '../errors.ts';
import type { ResolvedDataset, ResolvedManifest } from './types.ts';
import { parseManifestText } from './parse.ts';
import { collectManifest } from './validate.ts';
import { isInside, resolveInsideWorkspace } from './paths.ts';
import { resolveFormat } from './format.ts';

export const MAX_MANIFEST_BYTES = 1024 * 1024;

const toPosix = (p: string) => p.split(path.sep).join('/');

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
  const bytes = await readFile(real);
  if (bytes.length > MAX_MANIFEST_BYTES) {
    throw new InputError(`manifest is ${bytes.length} bytes; allowed: at most ${MAX_MANIFEST_BYTES} bytes (1 MiB)`, { file: relFile });
  }
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
      const r = await resolveInsideWorkspace(rootAbs, manifestDir, d.path, { file: relFile, where: `${at}.path`, pattern: d.files, lineOf });
      const format = resolveFormat(d.format, r.relFiles, { file: relFile, where: `${at}.format`, line: lineOf(`${at}.format`) ?? lineOf(`${at}.path`) });
      const wrongFor = (field: 'member' | 'series' | 'recording_end_s', needs: string) =>
        problems.push(new InputError(`found ${field}: ${JSON.stringify(d[field])} for a ${format} dataset; allowed: ${field} only with format ${needs}`, {
          file: relFile, where: `${at}.${field}`, line: lineOf(`${at}.${field}`),
        }));
      if (d.member !== null && format !== 'npz') wrongFor('member', 'npz');
      if (d.series !== null && format !== 'nwb') wrongFor('series', 'nwb');
      if ((d.recording_end_s ?? null) !== null && format !== 'nwb') wrongFor('recording_end_s', 'nwb');
      if (value.kind === 'weights' && (format === 'spikes' || format === 'nwb')) {
        problems.push(new InputError(`found ${format} files with kind weights; allowed: npy, npz, csv, tsv, safetensors`, { file: relFile, where: `${at}.path`, line: lineOf(`${at}.path`) }));
      }
      datasets.push({
        id: d.id, path: d.path, files: r.files, relFiles: r.relFiles, format,
        month: d.month, group: d.group, layout: d.layout, series: d.series, member: d.member,
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
