/**
 * A spike sorter's `params.py`, read as text and never run.
 *
 * The file is Python source; sorters write plain assignments such as `sample_rate = 30000.0` and
 * `dat_path = 'raw.bin'`. Only lines of the form `name = number`, `name = 'text'` (or "text") are
 * understood; every other line is skipped without being interpreted. A line that assigns a name
 * Lacuna needs (`sample_rate`) in any other form — an expression, a call, a name — is an
 * InputError naming the line, because its value could only be known by running it.
 * Size: at most 1 MiB (a sorter writes a few hundred bytes).
 */
import { stat } from 'node:fs/promises';
import { inputError } from './byte-source.ts';
import { textLines } from './text-lines.ts';

export const MAX_PARAMS_BYTES = 1 << 20;

const ASSIGN = /^([A-Za-z_][A-Za-z0-9_]*)\s*=\s*(.*?)\s*(?:#.*)?$/;
const NUMBER = /^[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?$/;
const STRING = /^(?:'([^'\\]*)'|"([^"\\]*)")$/;

export type ParamValue = number | string;

export interface SorterParams {
  values: Map<string, { value: ParamValue; line: number }>;
}

/** Read the plain assignments of `params.py`; `needed` names must be plain numbers when present. */
export async function readSorterParams(path: string, relPath: string, needed: readonly string[]): Promise<SorterParams> {
  const { size } = await stat(path);
  if (size > MAX_PARAMS_BYTES) throw inputError(relPath, 'size', `params.py is ${size} bytes; allowed: at most ${MAX_PARAMS_BYTES} bytes`);
  const values = new Map<string, { value: ParamValue; line: number }>();
  for await (const [line, raw] of textLines(path, relPath, MAX_PARAMS_BYTES)) {
    const m = ASSIGN.exec(raw);
    if (!m || raw.startsWith(' ') || raw.startsWith('\t')) {
      // Not a top-level assignment: refuse only when it seems to set a needed name.
      const named = needed.find((n) => new RegExp(`(^|[^A-Za-z0-9_])${n}\\s*(=|:)`).test(raw));
      if (named) throw notPlain(relPath, line, named, raw);
      continue;
    }
    const [, name, rhs] = m;
    if (NUMBER.test(rhs)) values.set(name, { value: Number(rhs), line });
    else if (STRING.test(rhs)) {
      const s = STRING.exec(rhs)!;
      values.set(name, { value: s[1] ?? s[2], line });
    } else if (needed.includes(name)) throw notPlain(relPath, line, name, raw);
  }
  return { values };
}

function notPlain(relPath: string, line: number, name: string, raw: string) {
  const shown = JSON.stringify(raw.length > 80 ? `${raw.slice(0, 80)}…` : raw);
  return inputError(relPath, `line ${line}`, `${name} is set by ${shown}, which is not a plain number; params.py is never run, so only lines like "${name} = 30000.0" are read`, `write the number on that line, or give it in the manifest (sorter: { sample_rate_hz: … })`);
}
