/**
 * SHA-256 (FIPS 180-4) of a file, streamed in 1 MiB reads through one reused buffer: memory stays
 * constant whatever the file size.
 */
import { createHash } from 'node:crypto';
import { open } from 'node:fs/promises';

export async function hashFile(path: string): Promise<{ sha256: string; bytes: number }> {
  const fh = await open(path, 'r');
  try {
    const h = createHash('sha256');
    const buf = new Uint8Array(1 << 20);
    let bytes = 0;
    for (;;) {
      const { bytesRead } = await fh.read(buf, 0, buf.length, bytes);
      if (bytesRead === 0) break;
      h.update(buf.subarray(0, bytesRead));
      bytes += bytesRead;
    }
    return { sha256: h.digest('hex'), bytes };
  } finally {
    await fh.close();
  }
}
