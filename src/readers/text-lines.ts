/**
 * Lines of a UTF-8 text file, read in 1 MiB chunks through a file handle (never the whole file
 * at once). Handles `\n` and `\r\n`; a final line without a newline is yielded; a trailing empty
 * line after the last newline is not. A line longer than 256 MiB is an InputError (no sensible
 * table has one, and it bounds memory on a file with no newlines).
 */
import { open } from 'node:fs/promises';
import { inputError } from './byte-source.ts';

const CHUNK = 1 << 20;
export const MAX_LINE = 256 << 20;

/** Yields `[lineNumber (1-based), text]`. Stops early if the consumer breaks. */
export async function* textLines(path: string, relPath: string, maxBytes = Infinity): AsyncGenerator<[number, string]> {
  const fh = await open(path, 'r');
  try {
    const dec = new TextDecoder('utf-8');
    const buf = new Uint8Array(CHUNK);
    let rest = '';
    let line = 0;
    let pos = 0;
    for (;;) {
      const want = Math.min(CHUNK, maxBytes - pos);
      const { bytesRead } = want > 0 ? await fh.read(buf, 0, want, pos) : { bytesRead: 0 };
      pos += bytesRead;
      const text = rest + dec.decode(buf.subarray(0, bytesRead), { stream: bytesRead > 0 });
      const parts = text.split('\n');
      rest = bytesRead > 0 ? parts.pop()! : '';
      if (rest.length > MAX_LINE) throw inputError(relPath, `line ${line + 1}`, `line is longer than ${MAX_LINE} characters`);
      for (let i = 0; i < parts.length; i++) {
        line++;
        const p = parts[i];
        const l = p.endsWith('\r') ? p.slice(0, -1) : p;
        if (bytesRead === 0 && i === parts.length - 1 && l === '') break;
        yield [line, l];
      }
      if (bytesRead === 0) return;
    }
  } finally {
    await fh.close();
  }
}
