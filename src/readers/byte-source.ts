/**
 * Random-access byte sources the binary readers share: a byte range of a file on disk (a whole
 * `.npy`, a stored `.npz` member, a safetensors data section). Reads go through one
 * `fs.promises` file handle, opened on first use and released by `close()` (the source stays
 * usable: the next read opens the file again), so an idle dataset holds no descriptors.
 */
import { open, type FileHandle } from 'node:fs/promises';
import { InputError } from '../errors.ts';
import { offerRead } from './read-tap.ts';

export interface ByteSource {
  /** Bytes available, counted from the start of the range. */
  size: number;
  /** Fill `into[0, length)` with bytes `[offset, offset + length)` of the range. */
  read(offset: number, length: number, into: Uint8Array): Promise<void>;
  close(): Promise<void>;
}

/** Read exactly `length` bytes at absolute `position` of an open file, or throw an InputError. */
export async function readExactly(fh: FileHandle, position: number, length: number, into: Uint8Array, relPath: string): Promise<void> {
  let done = 0;
  while (done < length) {
    const { bytesRead } = await fh.read(into, done, length - done, position + done);
    if (bytesRead === 0) {
      throw new InputError(`file ends at byte ${position + done}, expected ${length} bytes from byte ${position}`, {
        file: relPath,
        where: `byte ${position + done}`,
      });
    }
    done += bytesRead;
  }
}

/** Bytes `[base, base + size)` of the file at `path`. */
export function fileRange(path: string, relPath: string, base: number, size: number): ByteSource {
  let fh: FileHandle | null = null;
  return {
    size,
    async read(offset, length, into) {
      if (offset < 0 || offset + length > size) {
        throw new InputError(`read of ${length} bytes at byte ${base + offset} runs past the end of the data (${base + size})`, {
          file: relPath,
          where: `byte ${base + offset}`,
        });
      }
      fh ??= await open(path, 'r');
      await readExactly(fh, base + offset, length, into, relPath);
      offerRead(path, base + offset, length === into.length ? into : into.subarray(0, length)); // read-through hashing (read-tap.ts)
    },
    async close() {
      const h = fh;
      fh = null;
      if (h) await h.close();
    },
  };
}

/** Shorthand for the errors every reader raises. */
export function inputError(relPath: string, where: string, message: string, hint?: string): InputError {
  return new InputError(message, { file: relPath, where, hint });
}
