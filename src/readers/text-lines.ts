/**
 * Lines of a UTF-8 text file, read in 1 MiB chunks through a file handle (never the whole file
 * at once). Handles `\n` and `\r\n`; a final line without a newline is yielded; a trailing empty
 * line after the last newline is not.
 *
 * Line length is bounded: a line longer than `maxLine` characters (default MAX_LINE, 64 Mi) is an
 * InputError naming the file and line, raised as soon as that many characters have been read
 * without a newline, so a file with no newlines costs one bounded read, not the whole file. A
 * line's pieces are kept as a list until its newline arrives and joined once, so the cost is
 * linear in the line's length (joining the carried-over text to every new chunk was quadratic:
 * a 300 MB file of one line took 90 s and 3.6 GB before its error).
 */
import { open } from 'node:fs/promises';
import { inputError } from './byte-source.ts';
import { offerRead } from './read-tap.ts';

const CHUNK = 1 << 20;
/**
 * Longest line accepted by default, in UTF-16 code units: 64 Mi, room for a CSV row of several
 * million numbers (a units-by-bins row holds one unit's every bin).
 */
export const MAX_LINE = 64 << 20;

function tooLong(relPath: string, line: number, maxLine: number, seen: number) {
  return inputError(
    relPath,
    `line ${line}`,
    `line is longer than ${maxLine.toLocaleString('en-US')} characters (${seen.toLocaleString('en-US')} read without a line break)`,
    'each row of a text table must end with a line break; store long recordings as .npy instead',
  );
}

/** Yields `[lineNumber (1-based), text]`. Stops early if the consumer breaks. */
export async function* textLines(path: string, relPath: string, maxBytes = Infinity, maxLine = MAX_LINE): AsyncGenerator<[number, string]> {
  const fh = await open(path, 'r');
  try {
    const dec = new TextDecoder('utf-8');
    const buf = new Uint8Array(CHUNK);
    let pending: string[] = []; // pieces of the current line read so far
    let pendingLength = 0;
    let line = 0;
    let pos = 0;
    for (;;) {
      const want = Math.min(CHUNK, maxBytes - pos);
      const { bytesRead } = want > 0 ? await fh.read(buf, 0, want, pos) : { bytesRead: 0 };
      if (bytesRead > 0) offerRead(path, pos, buf.subarray(0, bytesRead)); // read-through hashing (read-tap.ts)
      pos += bytesRead;
      const text = dec.decode(buf.subarray(0, bytesRead), { stream: bytesRead > 0 });
      const parts = text.split('\n');
      if (parts.length === 1 && bytesRead > 0) {
        pending.push(text);
        pendingLength += text.length;
        if (pendingLength > maxLine) throw tooLong(relPath, line + 1, maxLine, pendingLength);
        continue;
      }
      if (pending.length) {
        parts[0] = pending.join('') + parts[0];
        pending = [];
        pendingLength = 0;
      }
      if (bytesRead > 0) {
        const rest = parts.pop()!;
        pending.push(rest);
        pendingLength = rest.length;
      }
      for (let i = 0; i < parts.length; i++) {
        line++;
        const p = parts[i];
        if (p.length > maxLine) throw tooLong(relPath, line, maxLine, p.length);
        const l = p.endsWith('\r') ? p.slice(0, -1) : p;
        if (bytesRead === 0 && i === parts.length - 1 && l === '') break;
        yield [line, l];
      }
      if (pendingLength > maxLine) throw tooLong(relPath, line + 1, maxLine, pendingLength);
      if (bytesRead === 0) return;
    }
  } finally {
    await fh.close();
  }
}
