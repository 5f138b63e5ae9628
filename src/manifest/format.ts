/**
 * A dataset's format: as written (`format:`), or inferred from its files' extensions.
 * `.csv` and `.tsv` are tables unless the manifest says `format: spikes` (rows of unit, time).
 */
import { InputError } from '../errors.ts';
import type { DataFormat } from './types.ts';

const BY_EXTENSION: Record<string, DataFormat> = {
  '.npy': 'npy',
  '.npz': 'npz',
  '.csv': 'csv',
  '.tsv': 'tsv',
  '.nwb': 'nwb',
  '.safetensors': 'safetensors',
};

/** The format a file name's extension (case-insensitive) stands for, or null. */
export function formatFromExtension(name: string): DataFormat | null {
  const m = /\.[A-Za-z0-9]+$/.exec(name);
  return m ? (BY_EXTENSION[m[0].toLowerCase()] ?? null) : null;
}

/** Formats a file with this extension may be read as, when `format:` is written. */
function fits(written: DataFormat, ext: DataFormat | null): boolean {
  if (ext === null) return true; // an unknown extension: trust the manifest
  if (written === 'spikes') return ext === 'csv' || ext === 'tsv';
  return written === ext;
}

/**
 * The dataset's format. With `written` null every file must have the same known extension;
 * with `written` set no file may have a known extension of another format.
 * Throws an `InputError` at `where` (the dataset's `format` field) naming the file.
 */
export function resolveFormat(
  written: DataFormat | null,
  relFiles: string[],
  at: { file: string; where: string; line?: number },
): DataFormat {
  const fail = (message: string, hint?: string): never => {
    throw new InputError(message, { file: at.file, where: at.where, line: at.line, hint });
  };
  const known = Object.keys(BY_EXTENSION).join(' ');
  if (written !== null) {
    for (const f of relFiles) {
      const ext = formatFromExtension(f);
      if (!fits(written, ext)) fail(`found format ${written} for ${JSON.stringify(f)}, whose extension says ${ext}; allowed: a format that fits every file`);
    }
    return written;
  }
  let inferred: DataFormat | null = null;
  for (const f of relFiles) {
    const ext = formatFromExtension(f);
    if (ext === null) fail(`cannot tell the format of ${JSON.stringify(f)} from its extension; allowed extensions: ${known}`, 'set format: in the dataset');
    if (inferred !== null && ext !== inferred) fail(`found files of two formats (${inferred} and ${ext}, e.g. ${JSON.stringify(f)}); allowed: one format per dataset`, 'narrow the folder with files: "*.npy"');
    inferred = ext;
  }
  if (inferred === null) fail('found no files to infer a format from');
  return inferred as DataFormat;
}
