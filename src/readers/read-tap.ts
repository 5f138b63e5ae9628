/**
 * Read-through hashing: the SHA-256 of an input file computed from the reads its dataset's readers
 * make anyway, so a new input is read once, not once to hash it and again to measure it.
 *
 * A task that must learn a file's hash registers a tap for it (`tapFiles`) before it opens the
 * dataset. The readers' low-level reads (`fileRange` in byte-source.ts, `textLines`, the DEFLATE
 * source) offer every piece they read, at its offset in the file, before anything converts it in
 * place (`offerRead`). SHA-256 (FIPS 180-4) is sequential, so a tap hashes bytes in file order
 * only: a piece that starts at or before the end of the prefix hashed so far and runs past it
 * extends the prefix; a piece that starts a little after it (at most GAP_FILL bytes: a zip member's
local header name, a safetensors header) first has the gap read by the tap itself; any other piece
is ignored. `finish()` reads what the readers did not
 * deliver in order (a header or tail a reader skipped, an HDF5 file read in the library's own
 * order, the second half of a file split over two lanes) and returns the digest of the whole
 * file, with how many bytes it had to read itself (`reread`): 0 means every byte was read once.
 *
 * Taps are per thread (a worker lane has its own registry) and live for one task. A tap trusts
 * the bytes it is offered: every offer is a read of that very file at that offset, whoever made
 * it, so a second reader of the same file cannot make the digest wrong, only redundant. Whether
 * the file changed meanwhile is the file guard's job (file-guard.ts); `finish()` also refuses a
 * file whose length is not the length the build planned for.
 */
import { createHash, type Hash } from 'node:crypto';
import { closeSync, openSync, readSync } from 'node:fs';
import { open } from 'node:fs/promises';
import { resolve } from 'node:path';
import { InputError } from '../errors.ts';

/** A file's identity when the build planned to hash it (its size is given apart). */
export interface FileStamp {
  mtimeMs: number;
  ctimeMs: number;
  ino: number;
}

/** A file's digest from a tap, and how many of its bytes the tap read itself. */
export interface TappedHash {
  sha256: string;
  bytes: number;
  reread: number;
}

/** Largest gap before an offered piece that a tap reads itself to keep hashing in order. */
export const GAP_FILL = 64 << 10;

class HashTap {
  private readonly hash: Hash = createHash('sha256');
  private cursor = 0;
  private filled = 0;

  constructor(
    private readonly path: string,
    private readonly relPath: string,
    private readonly size: number,
    private readonly stamp?: FileStamp,
  ) {}

  offer(position: number, bytes: Uint8Array): void {
    const end = position + bytes.length;
    if (position > this.cursor && position - this.cursor <= GAP_FILL && bytes.length > 0) this.fillTo(position);
    if (position > this.cursor || end <= this.cursor) return;
    this.hash.update(position === this.cursor ? bytes : bytes.subarray(this.cursor - position));
    this.cursor = end;
  }

  /**
   * Read and hash [cursor, to) now (synchronously: an offer must not yield). The descriptor is
   * closed at once: a dataset of thousands of files must not hold one open per file.
   */
  private fillTo(to: number): void {
    let fd: number | null = null;
    try {
      fd = openSync(this.path, 'r');
      const gap = new Uint8Array(to - this.cursor);
      let got = 0;
      while (got < gap.length) {
        const n = readSync(fd, gap, got, gap.length - got, this.cursor + got);
        if (n === 0) return; // shorter than the readers think: finish() says so
        got += n;
      }
      this.hash.update(gap);
      this.filled += gap.length;
      this.cursor = to;
    } catch {
      // leave the gap: finish() reads from the cursor, and fails there if the file is gone
    } finally {
      if (fd !== null) closeSync(fd);
    }
  }

  /** Hash the rest of the file from where the readers' in-order reads stopped. */
  async finish(): Promise<TappedHash> {
    const start = this.cursor;
    if (start > this.size) throw this.changed(`planned as ${this.size} bytes, ${start} were read`);
    const fh = await open(this.path, 'r');
    try {
      if (this.stamp) {
        // The bytes hashed and measured are those planned: same file, not modified since.
        const st = await fh.stat();
        if (st.ino !== this.stamp.ino) throw this.changed('replaced by another file');
        if (st.mtimeMs !== this.stamp.mtimeMs || st.ctimeMs !== this.stamp.ctimeMs) throw this.changed('modified since the build planned to read it');
      }
      const buf = new Uint8Array(Math.max(1, Math.min(4 << 20, this.size - start)));
      for (let pos = start; ; ) {
        const { bytesRead } = await fh.read(buf, 0, buf.length, pos);
        if (bytesRead === 0) break;
        if (pos + bytesRead > this.size) throw this.changed(`planned as ${this.size} bytes, found more`);
        this.hash.update(buf.subarray(0, bytesRead));
        pos += bytesRead;
        this.cursor = pos;
      }
    } finally {
      await fh.close();
    }
    if (this.cursor !== this.size) throw this.changed(`planned as ${this.size} bytes, found ${this.cursor}`);
    return { sha256: this.hash.digest('hex'), bytes: this.size, reread: this.size - start + this.filled };
  }

  private changed(what: string): InputError {
    return new InputError(`changed while it was being read (${what}); run the build again`, { file: this.relPath, where: 'file' });
  }
}

const taps = new Map<string, HashTap>();

/**
 * Offer bytes just read from `path` at `position` (the file's own offset) to its tap, if the
 * current task registered one. Call it before the bytes are converted in place.
 */
export function offerRead(path: string, position: number, bytes: Uint8Array): void {
  if (taps.size === 0) return;
  (taps.get(path) ?? taps.get(resolve(path)))?.offer(position, bytes);
}

/** A set of taps registered for one task; `finish` unregisters them and returns the digests. */
export interface TapSet {
  /** Digests in the order the files were given; unregisters the taps. */
  finish(): Promise<TappedHash[]>;
  /** Unregister without hashing (the task failed). */
  drop(): void;
}

/**
 * Register a tap for each file (absolute path, workspace-relative path, planned size and, when
 * given, the identity it had when planned: `finish()` refuses a file that no longer has it).
 */
export function tapFiles(files: { path: string; relPath: string; size: number; stamp?: FileStamp }[]): TapSet {
  const mine: [string, HashTap][] = files.map((f) => [resolve(f.path), new HashTap(resolve(f.path), f.relPath, f.size, f.stamp)]);
  for (const [key, tap] of mine) taps.set(key, tap);
  const drop = () => {
    for (const [key, tap] of mine) if (taps.get(key) === tap) taps.delete(key);
  };
  return {
    async finish() {
      try {
        const out: TappedHash[] = [];
        for (const [, tap] of mine) out.push(await tap.finish());
        return out;
      } finally {
        drop();
      }
    },
    drop,
  };
}
