/**
 * A deflated `.npz` member (RFC 1951 DEFLATE) as a byte source, inflated with fflate's streaming
 * `Inflate` as it is read.
 *
 * Access is sequential: reading at or after the current position inflates forward (discarding
 * what is skipped); reading before it restarts the stream from the member's first byte. So a
 * strided activity layout costs one full inflation per block (see npy.ts).
 *
 * Zip-bomb guards, all InputErrors: compressed input is pushed 16 KiB at a time, and DEFLATE
 * cannot expand more than 1032:1 (RFC 1951: a 258-byte match in at most 2 bits), so one push
 * yields at most ~16.5 MiB; the inflated byte count is checked against the size the zip directory
 * declares after every push (more is refused at once, less at the end); and a declared size above
 * 1032 × the compressed size is refused before inflating, as no DEFLATE stream can produce it.
 */
import { open, type FileHandle } from 'node:fs/promises';
import { Inflate } from 'fflate';
import { inputError, readExactly, type ByteSource } from './byte-source.ts';
import type { ZipEntry } from './zip.ts';
import { offerRead } from './read-tap.ts';

const PUSH = 16 << 10;
export const MAX_DEFLATE_RATIO = 1032;

export function inflatedSource(path: string, relPath: string, entry: ZipEntry): ByteSource {
  const where = `member '${entry.name}', byte ${entry.dataStart}`;
  if (entry.uncompressedSize > MAX_DEFLATE_RATIO * Math.max(1, entry.compressedSize) + 64) {
    throw inputError(relPath, where, `member declares ${entry.uncompressedSize} bytes from ${entry.compressedSize} compressed bytes, more than DEFLATE can produce (ratio ${MAX_DEFLATE_RATIO}:1): refusing a likely zip bomb`);
  }
  let fh: FileHandle | null = null;
  let inf: Inflate | null = null;
  let queue: Uint8Array[] = [];
  let queueStart = 0; // inflated offset of queue[0][0]
  let emitted = 0;
  let fed = 0;
  let done = false;
  const inbuf = new Uint8Array(PUSH);

  function reset(): void {
    queue = [];
    queueStart = 0;
    emitted = 0;
    fed = 0;
    done = false;
    inf = new Inflate((chunk, final) => {
      emitted += chunk.length;
      if (emitted > entry.uncompressedSize) {
        throw inputError(relPath, where, `member inflates to more than the ${entry.uncompressedSize} bytes its zip header declares: refusing a likely zip bomb`);
      }
      if (chunk.length) queue.push(chunk);
      if (final) done = true;
    });
  }

  async function pump(): Promise<void> {
    if (done || fed >= entry.compressedSize) {
      throw inputError(relPath, where, `compressed data end after ${emitted} inflated bytes; the zip header declares ${entry.uncompressedSize}`);
    }
    fh ??= await open(path, 'r');
    const n = Math.min(PUSH, entry.compressedSize - fed);
    await readExactly(fh, entry.dataStart + fed, n, inbuf, relPath);
    offerRead(path, entry.dataStart + fed, inbuf.subarray(0, n)); // read-through hashing (read-tap.ts)
    fed += n;
    try {
      inf!.push(inbuf.slice(0, n), fed >= entry.compressedSize);
    } catch (err) {
      inf = null;
      if (err instanceof Error && err.name === 'InputError') throw err;
      throw inputError(relPath, where, `damaged DEFLATE data near compressed byte ${entry.dataStart + fed - n}: ${(err as Error).message}`);
    }
    if (done && emitted !== entry.uncompressedSize) {
      throw inputError(relPath, where, `member inflates to ${emitted} bytes but its zip header declares ${entry.uncompressedSize}`);
    }
  }

  return {
    size: entry.uncompressedSize,
    async read(offset, length, into) {
      if (offset < 0 || offset + length > entry.uncompressedSize) {
        throw inputError(relPath, where, `read of ${length} bytes at inflated byte ${offset} runs past the member's ${entry.uncompressedSize} bytes`);
      }
      if (!inf || offset < queueStart) reset();
      let filled = 0;
      while (filled < length) {
        const want = offset + filled;
        // Drop chunks wholly before the wanted byte.
        while (queue.length && queueStart + queue[0].length <= want) {
          queueStart += queue[0].length;
          queue.shift();
        }
        if (!queue.length) {
          await pump();
          continue;
        }
        const c = queue[0];
        const from = want - queueStart;
        const n = Math.min(c.length - from, length - filled);
        into.set(c.subarray(from, from + n), filled);
        filled += n;
      }
    },
    async close() {
      const h = fh;
      fh = null;
      inf = null;
      queue = [];
      if (h) await h.close();
    },
  };
}
