/**
 * The header of a NumPy `.npy` file, parsed without evaluating anything.
 *
 * Format (NumPy Enhancement Proposal 1, "A simple file format for NumPy arrays"): the magic
 * `\x93NUMPY`, a major and minor version byte (1.0, 2.0 or 3.0), the header length (u16 LE in
 * 1.0, u32 LE in 2.0/3.0), then a Python dict literal (latin-1 in 1.0/2.0, UTF-8 in 3.0) with
 * exactly the keys `descr`, `fortran_order` and `shape`, padded with spaces and a newline. Data
 * follow at `headerBytes`. The dict is read by a strict tokenizer that accepts only strings,
 * `True`/`False`, non-negative integers, tuples and the one dict; anything else is an InputError.
 * Headers longer than 1 MiB are refused (numpy writes under 1 KiB).
 */
import { inputError, type ByteSource } from './byte-source.ts';
import { npyDType, NPY_DTYPES_TEXT, type DType } from './dtype.ts';

export interface NpyHeader {
  version: string;
  dtype: DType;
  fortranOrder: boolean;
  shape: number[];
  /** Byte offset where the data start (magic + lengths + dict). */
  headerBytes: number;
  /** Number of elements: product of the shape. */
  count: number;
}

const MAX_HEADER = 1 << 20;

type Tok = { t: 'str'; v: string } | { t: 'int'; v: number } | { t: 'bool'; v: boolean } | { t: 'p'; v: string };

function tokenize(text: string, fail: (m: string) => Error): Tok[] {
  const out: Tok[] = [];
  let i = 0;
  while (i < text.length) {
    const c = text[i];
    if (c === ' ' || c === '\n' || c === '\t' || c === '\r') { i++; continue; }
    if (c === '[') throw fail('structured dtypes (a list descr) are not supported');
    if ('{}():,'.includes(c)) { out.push({ t: 'p', v: c }); i++; continue; }
    if (c === "'" || c === '"') {
      const end = text.indexOf(c, i + 1);
      if (end < 0) throw fail(`unterminated string at character ${i}`);
      const s = text.slice(i + 1, end);
      if (s.includes('\\')) throw fail(`escape sequences are not allowed in header strings (character ${i})`);
      out.push({ t: 'str', v: s });
      i = end + 1;
      continue;
    }
    const m = /^(?:True|False|\d+L?)/.exec(text.slice(i, i + 40));
    if (!m) throw fail(`unexpected ${JSON.stringify(text.slice(i, i + 12))} at character ${i}`);
    if (m[0] === 'True' || m[0] === 'False') out.push({ t: 'bool', v: m[0] === 'True' });
    else {
      const n = Number(m[0].replace('L', ''));
      if (!Number.isSafeInteger(n)) throw fail(`dimension ${m[0]} is too large`);
      out.push({ t: 'int', v: n });
    }
    i += m[0].length;
  }
  return out;
}

/** Parse the dict literal; returns the three values or throws via `fail`. */
export function parseHeaderDict(text: string, fail: (m: string) => Error): { descr: string; fortran: boolean; shape: number[] } {
  const toks = tokenize(text, fail);
  let k = 0;
  const next = (): Tok => {
    if (k >= toks.length) throw fail('header dict ends early');
    return toks[k++];
  };
  const expect = (p: string) => {
    const t = next();
    if (t.t !== 'p' || t.v !== p) throw fail(`expected "${p}" in header dict`);
  };
  expect('{');
  const seen: Record<string, unknown> = {};
  for (;;) {
    let t = next();
    if (t.t === 'p' && t.v === '}') break;
    if (t.t !== 'str') throw fail('header dict keys must be strings');
    const key = t.v;
    if (Object.hasOwn(seen, key)) throw fail(`key '${key}' appears twice`);
    expect(':');
    t = next();
    if (t.t === 'p' && t.v === '(') {
      const dims: number[] = [];
      for (;;) {
        const d = next();
        if (d.t === 'p' && d.v === ')') break;
        if (d.t !== 'int') throw fail(`'${key}' must be a tuple of non-negative integers`);
        dims.push(d.v);
        const sep = next();
        if (sep.t === 'p' && sep.v === ')') break;
        if (!(sep.t === 'p' && sep.v === ',')) throw fail(`expected "," or ")" in '${key}'`);
      }
      seen[key] = dims;
    } else if (t.t === 'p') {
      throw fail(`unexpected "${t.v}" as the value of '${key}'`);
    } else {
      seen[key] = t.v;
    }
    const sep = next();
    if (sep.t === 'p' && sep.v === '}') break;
    if (!(sep.t === 'p' && sep.v === ',')) throw fail('expected "," or "}" in header dict');
  }
  if (k !== toks.length) throw fail('text after the header dict');
  const keys = Object.keys(seen).sort().join(',');
  if (keys !== 'descr,fortran_order,shape') throw fail(`header keys are {${keys}}; allowed exactly descr, fortran_order, shape`);
  if (typeof seen.descr !== 'string') throw fail("'descr' must be a string");
  if (typeof seen.fortran_order !== 'boolean') throw fail("'fortran_order' must be True or False");
  if (!Array.isArray(seen.shape)) throw fail("'shape' must be a tuple");
  return { descr: seen.descr, fortran: seen.fortran_order, shape: seen.shape as number[] };
}

/**
 * Read and check the header at the start of `src`. `relPath` names the file in errors and `base`
 * is the range's offset inside it (non-zero for `.npz` members), so byte offsets are the file's.
 */
export async function readNpyHeader(src: ByteSource, relPath: string, base = 0, what = ''): Promise<NpyHeader> {
  const fail = (where: number, m: string, hint?: string) => inputError(relPath, `${what}byte ${base + where}`, m, hint);
  if (src.size === 0) throw fail(0, 'file is empty; expected a .npy array');
  if (src.size < 10) throw fail(0, `only ${src.size} bytes; a .npy file starts with at least 10 header bytes`);
  const pre = new Uint8Array(12);
  await src.read(0, Math.min(12, src.size), pre);
  const magic = String.fromCharCode(...pre.subarray(0, 6));
  if (magic !== '\x93NUMPY') throw fail(0, 'not a .npy file: the magic string \\x93NUMPY is missing');
  const major = pre[6];
  const minor = pre[7];
  if (!(minor === 0 && (major === 1 || major === 2 || major === 3))) {
    throw fail(6, `format version ${major}.${minor}; supported 1.0, 2.0 and 3.0`);
  }
  const lenBytes = major === 1 ? 2 : 4;
  if (src.size < 8 + lenBytes) throw fail(8, 'file ends inside the header length');
  const dv = new DataView(pre.buffer);
  const len = major === 1 ? dv.getUint16(8, true) : dv.getUint32(8, true);
  const start = 8 + lenBytes;
  if (len > MAX_HEADER) throw fail(8, `header length ${len} bytes exceeds the ${MAX_HEADER}-byte limit`);
  if (start + len > src.size) throw fail(8, `header length ${len} runs past the end of the file (${src.size} bytes)`);
  const raw = new Uint8Array(len);
  await src.read(start, len, raw);
  const text = new TextDecoder(major === 3 ? 'utf-8' : 'latin1', { fatal: major === 3 }).decode(raw);
  const dict = parseHeaderDict(text, (m) => fail(start, `bad .npy header: ${m}`));
  if (dict.descr === '|O' || dict.descr === 'O') {
    throw fail(start, 'object arrays (descr |O) hold Python objects and cannot be read safely', 'save numeric arrays');
  }
  const dtype = npyDType(dict.descr);
  if (!dtype) throw fail(start, `dtype '${dict.descr}' is not supported; allowed ${NPY_DTYPES_TEXT}`);
  let count = 1;
  for (const d of dict.shape) {
    count *= d;
    if (!Number.isSafeInteger(count)) throw fail(start, `shape (${dict.shape.join(', ')}) has too many elements`);
  }
  const headerBytes = start + len;
  const expected = count * dtype.size;
  const have = src.size - headerBytes;
  if (have < expected) {
    throw fail(src.size, `truncated: data end at byte ${base + src.size} but shape (${dict.shape.join(', ')}) of ${dict.descr} needs ${expected} bytes from byte ${base + headerBytes}`);
  }
  if (have > expected) {
    throw fail(headerBytes + expected, `shape (${dict.shape.join(', ')}) of ${dict.descr} needs ${expected} data bytes but the file holds ${have}`);
  }
  return { version: `${major}.${minor}`, dtype, fortranOrder: dict.fortran, shape: dict.shape, headerBytes, count };
}
