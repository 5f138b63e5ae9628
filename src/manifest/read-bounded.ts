/**
 * Read a manifest's bytes without ever holding more than the allowed size: the size is taken by
 * `fstat` on the open file before any byte is read, and the read itself stops one byte past the
 * limit (so a file that grows between the two is refused too). A manifest that is a 3 GiB file
 * costs one `stat`, not a 3 GiB read. Not a regular file (a folder, a FIFO, a device) is refused
 * before reading, since a FIFO would block and a device may never end.
 */
import { open } from 'node:fs/promises';
import { InputError } from '../errors.ts';

function tooBig(relFile: string, bytes: number | string, max: number): InputError {
  return new InputError(`manifest is ${bytes} bytes; allowed: at most ${max} bytes (${max / 1024 / 1024} MiB)`, {
    file: relFile,
    where: 'file size',
    hint: 'a manifest lists datasets; keep data in the data files it points to',
  });
}

/** The whole file at `real` (already resolved inside the workspace), at most `max` bytes. */
export async function readManifestBytes(real: string, relFile: string, max: number): Promise<Buffer> {
  const fh = await open(real, 'r').catch((err: unknown) => {
    throw new InputError('manifest cannot be opened', { file: relFile, cause: err });
  });
  try {
    const s = await fh.stat();
    if (!s.isFile()) throw new InputError('manifest is not a regular file', { file: relFile, where: 'file type' });
    if (s.size > max) throw tooBig(relFile, s.size, max);
    const buf = Buffer.alloc(max + 1);
    let got = 0;
    for (;;) {
      const { bytesRead } = await fh.read(buf, got, buf.length - got, got);
      if (bytesRead === 0) break;
      got += bytesRead;
      if (got > max) throw tooBig(relFile, `more than ${max}`, max);
    }
    return buf.subarray(0, got);
  } finally {
    await fh.close();
  }
}
