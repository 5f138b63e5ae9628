/**
 * Mutations of a valid file for the readers' property tests: truncation, flipped bytes, a 4-byte
 * field overwritten, a run of ASCII digits replaced (shape numbers, offsets, sizes, times), or
 * random bytes instead of the file (common practice for parser fuzzing, no single source).
 */
import fc from 'fast-check';

export type Mutation = { t: 'cut'; at: number } | { t: 'flip'; at: [number, number][] } | { t: 'u32'; at: number; v: number } | { t: 'digits'; at: number; s: string } | { t: 'random'; bytes: Uint8Array };
export const mutation: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ t: fc.constant('cut' as const), at: fc.nat() }),
  fc.record({ t: fc.constant('flip' as const), at: fc.array(fc.tuple(fc.nat(), fc.integer({ min: 1, max: 255 })), { minLength: 1, maxLength: 6 }) }),
  fc.record({ t: fc.constant('u32' as const), at: fc.nat(), v: fc.oneof(fc.nat(), fc.constantFrom(0, 0xffffffff, 0x7fffffff, 0x10000)) }),
  fc.record({ t: fc.constant('digits' as const), at: fc.nat(), s: fc.stringMatching(/^[0-9]{1,12}$/) }),
  fc.record({ t: fc.constant('random' as const), bytes: fc.uint8Array({ maxLength: 400 }) }),
);

export function mutate(seed: Buffer, m: Mutation): Buffer {
  const b = Buffer.from(seed);
  switch (m.t) {
    case 'cut': return b.subarray(0, m.at % (b.length + 1));
    case 'flip': for (const [i, x] of m.at) b[i % b.length] ^= x; return b;
    case 'u32': { const i = m.at % Math.max(1, b.length - 3); if (b.length >= 4) b.writeUInt32LE(m.v >>> 0, i); return b; }
    case 'digits': {
      // Replace the k-th run of ASCII digits (shape numbers, offsets, sizes, times) with new digits.
      const text = b.toString('latin1');
      const runs = [...text.matchAll(/[0-9]+/g)];
      if (!runs.length) return b;
      const r = runs[m.at % runs.length];
      return Buffer.from(text.slice(0, r.index) + m.s + text.slice(r.index! + r[0].length), 'latin1');
    }
    case 'random': return Buffer.from(m.bytes);
  }
}

