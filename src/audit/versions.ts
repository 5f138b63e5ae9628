/**
 * The durable record of an audit's versions.
 *
 * Each version is one file, `<workspace>/records/<audit>/<version>.json`, holding its
 * `VersionEntry` and its full `AuditResult` (results and provenance). A lab commits this folder
 * to git: the pages of every version can be regenerated from it after the output folder is
 * deleted. Records are immutable: a record is written to a temporary file and then hard-linked
 * into place, which fails rather than overwrite when the name already exists, so an
 * interrupted or concurrent build can never damage an earlier version.
 *
 * A build reuses the latest version when its inputs hash (manifest hash, every input's SHA-256,
 * the parameters and the tool version) is unchanged; otherwise it writes the next version.
 */
import { createHash } from 'node:crypto';
import { existsSync, linkSync, mkdirSync, readdirSync, readFileSync, rmSync, unlinkSync } from 'node:fs';
import { join } from 'node:path';
import { InputError } from '../errors.ts';
import type { AuditResult, FileProvenance, VersionEntry } from '../types.ts';
import { fsyncDir, refuseSymlink, writeNewFileSynced } from './state-files.ts';

export const RECORD_FORMAT = 'lacuna-record/1';

export interface VersionRecord {
  format: typeof RECORD_FORMAT;
  entry: VersionEntry;
  result: AuditResult;
}

const VERSION_RE = /^v(\d{3,})$/;

export function recordsDir(workspace: string, audit: string): string {
  return join(workspace, 'records', audit);
}

/** Canonical JSON: object keys sorted, so equal values hash equally. */
export function canonicalJson(value: unknown): string {
  return JSON.stringify(value, (_k, v) =>
    v && typeof v === 'object' && !Array.isArray(v)
      ? Object.fromEntries(Object.entries(v as Record<string, unknown>).sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0)))
      : v,
  );
}

export function inputsHash(parts: {
  manifestSha256: string;
  inputs: FileProvenance[];
  parameters: Record<string, unknown>;
  toolVersion: string;
}): string {
  const inputs = [...parts.inputs].map((f) => [f.path, f.sha256, f.bytes]).sort();
  return createHash('sha256')
    .update(canonicalJson({ m: parts.manifestSha256, i: inputs, p: parts.parameters, t: parts.toolVersion }))
    .digest('hex');
}

/** Every version of an audit, oldest first. */
export function listVersions(workspace: string, audit: string): VersionEntry[] {
  return listRecords(workspace, audit).map((r) => r.record.entry);
}

/** Every record of an audit, oldest first, with the SHA-256 of its file (each file read once). */
export function listRecords(workspace: string, audit: string): { record: VersionRecord; sha256: string }[] {
  const dir = recordsDir(workspace, audit);
  if (!existsSync(dir)) return [];
  return readdirSync(dir)
    .filter((f) => f.endsWith('.json') && VERSION_RE.test(f.slice(0, -5)))
    .sort((a, b) => versionNumber(a.slice(0, -5)) - versionNumber(b.slice(0, -5)))
    .map((f) => {
      const file = join(dir, f);
      const text = readRecordText(file);
      const record = parseRecord(file, text);
      if (record.entry.version !== f.slice(0, -5)) {
        throw new InputError(`the record names version "${String(record.entry.version)}" but its file is ${f}`, { file, where: 'entry.version', hint: 'restore it from git' });
      }
      return { record, sha256: createHash('sha256').update(text).digest('hex') };
    });
}

export function versionNumber(version: string): number {
  const m = VERSION_RE.exec(version);
  if (!m) throw new InputError(`not a version name: "${version}"`, { hint: 'versions are named v001, v002, …' });
  return Number(m[1]);
}

export function nextVersionName(existing: VersionEntry[]): string {
  const last = existing.length ? versionNumber(existing[existing.length - 1].version) : 0;
  return `v${String(last + 1).padStart(3, '0')}`;
}

export function readRecord(workspace: string, audit: string, version: string): VersionRecord {
  const file = join(recordsDir(workspace, audit), `${version}.json`);
  if (!existsSync(file)) {
    const known = listVersions(workspace, audit).map((v) => v.version);
    throw new InputError(`audit "${audit}" has no version ${version}`, {
      hint: known.length ? `known versions: ${known.join(', ')}` : 'it has no versions yet: run `lacuna build` first',
    });
  }
  return readRecordFile(file);
}

function readRecordText(file: string): string {
  refuseSymlink(file, join(file, '..', '..', '..'), 'version record');
  return readFileSync(file, 'utf8');
}

function readRecordFile(file: string): VersionRecord {
  return parseRecord(file, readRecordText(file));
}

function parseRecord(file: string, text: string): VersionRecord {
  let rec: VersionRecord;
  try {
    rec = JSON.parse(text) as VersionRecord;
  } catch (cause) {
    throw new InputError('version record is not valid JSON', { file, cause, hint: 'restore it from git' });
  }
  if (rec.format !== RECORD_FORMAT || !rec.entry || !rec.result) {
    throw new InputError(`not a Lacuna version record (format "${String(rec.format)}")`, { file, hint: 'restore it from git' });
  }
  return rec;
}

/**
 * Write a new version record. Fails (and changes nothing) if a record of that name exists.
 * The record's bytes and its folder entry are fsynced before it counts as written.
 */
export function writeRecord(workspace: string, record: VersionRecord): string {
  const dir = recordsDir(workspace, record.result.audit);
  mkdirSync(dir, { recursive: true });
  const file = join(dir, `${record.entry.version}.json`);
  const tmp = join(dir, `.${record.entry.version}.json.tmp-${process.pid}`);
  rmSync(tmp, { force: true }); // a leftover of a killed process with our pid
  writeNewFileSynced(tmp, JSON.stringify(record, null, 1) + '\n');
  try {
    linkSync(tmp, file); // EEXIST rather than overwrite
  } finally {
    unlinkSync(tmp);
  }
  fsyncDir(dir);
  return file;
}

/** One line on what changed between two records, for the version list. */
export function describeChange(prev: AuditResult | null, next: AuditResult): string {
  if (!prev) return 'first version';
  const before = new Map(prev.inputs.map((f) => [f.path, f.sha256]));
  const after = new Map(next.inputs.map((f) => [f.path, f.sha256]));
  const added = [...after.keys()].filter((p) => !before.has(p));
  const removed = [...before.keys()].filter((p) => !after.has(p));
  const changed = [...after.keys()].filter((p) => before.has(p) && before.get(p) !== after.get(p));
  const parts: string[] = [];
  if (added.length) parts.push(`${added.length} input${added.length > 1 ? 's' : ''} added`);
  if (removed.length) parts.push(`${removed.length} removed`);
  if (changed.length) parts.push(`${changed.length} changed (${changed.slice(0, 3).join(', ')}${changed.length > 3 ? ', …' : ''})`);
  if (prev.manifest.sha256 !== next.manifest.sha256) parts.push('manifest edited');
  if (canonicalJson(prev.parameters) !== canonicalJson(next.parameters)) parts.push('parameters changed');
  if (prev.tool.version !== next.tool.version) parts.push(`tool ${prev.tool.version} → ${next.tool.version}`);
  return parts.length ? parts.join('; ') : 'rebuilt with identical inputs';
}
