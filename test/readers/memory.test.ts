/**
 * Bounded memory while streaming (not a timed test). A 200 MiB float32 `.npy` (200 units ×
 * 262,144 bins, header from the project's `npyHeader`, data appended in 4 MiB chunks so the test
 * itself never holds the array) is streamed with maxBlockBytes = 8 MiB. The reader should need
 * one 8 MiB block + one 4 MiB scratch buffer (npy.ts) + a 1 MiB hashing buffer; we allow 64 MiB of
 * RSS growth — about 5× that, for V8 heap growth and garbage not yet collected — which is still under
 * a third of the file, so reading the whole file into memory would fail the check. The sum of
 * every value is checked against the sum computed while writing (integers, exact in float64).
 */
import { describe, it, expect, afterAll } from 'vitest';
import { openSync, writeSync, closeSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { npyHeader } from '../../src/readers/npy-write.ts';
import { openDataset } from '../../src/readers/index.ts';
import { dataset, tempDir } from './helpers.ts';

const tmp = tempDir('lacuna-memory-');
afterAll(tmp.cleanup);

describe('bounded memory', () => {
  it('streams a 200 MiB .npy in 8 MiB blocks with RSS growth well below the file size', async () => {
    const units = 200;
    const bins = 262_144;
    const file = join(tmp.dir, 'big.npy');
    const fd = openSync(file, 'w');
    let expected = 0;
    try {
      writeSync(fd, npyHeader('<f4', [units, bins]));
      const chunk = new Float32Array(1 << 20); // 4 MiB = 4 units
      for (let u = 0; u < units; u += 4) {
        for (let i = 0; i < chunk.length; i++) {
          chunk[i] = ((u * 7 + i) % 1000) - 500;
          expected += chunk[i];
        }
        writeSync(fd, new Uint8Array(chunk.buffer));
      }
    } finally {
      closeSync(fd);
    }
    const before = process.memoryUsage().rss;
    let peak = before;
    let sum = 0;
    let blocks = 0;
    const src = await openDataset(dataset(tmp.dir, [file], 'npy'), { kind: 'activity', binMs: 10, workspaceRoot: tmp.dir, maxBlockBytes: 8 << 20 });
    if (src.kind !== 'activity') throw new Error('kind');
    for await (const b of src.blocks()) {
      for (let i = 0; i < b.data.length; i++) sum += b.data[i];
      blocks++;
      peak = Math.max(peak, process.memoryUsage().rss);
    }
    rmSync(file);
    expect(src.files[0].bytes).toBe(128 + units * bins * 4);
    expect(blocks).toBe(25); // 8 units of 1 MiB per block
    expect(sum).toBe(expected);
    console.info(`[memory] RSS growth while streaming 200 MiB: ${((peak - before) / 2 ** 20).toFixed(1)} MiB`);
    expect(peak - before).toBeLessThan(64 << 20);
  });
});
