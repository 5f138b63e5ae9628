/**
 * Spike-time tables binned into counts. Source: small cases worked by hand from the definition in
 * src/readers/spikes.ts (bin b covers [b·w, (b+1)·w), spike at t counts in bin ⌊t/w⌋).
 */
import { describe, it, expect, afterAll } from 'vitest';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { openDataset } from '../../src/readers/index.ts';
import { naturalCompare } from '../../src/readers/spikes.ts';
import { inspectDataset } from '../../src/readers/index.ts';
import { dataset, readAll, tempDir, errorOf } from './helpers.ts';

const tmp = tempDir();
afterAll(tmp.cleanup);
function file(name: string, text: string): string {
  writeFileSync(join(tmp.dir, name), text);
  return join(tmp.dir, name);
}
const openAt = (f: string, binMs: number) => openDataset(dataset(tmp.dir, [f], 'spikes'), { kind: 'activity', binMs, workspaceRoot: tmp.dir });

describe('spike-time tables', () => {
  it('a header without unit and time quotes at most 80 characters of a cell, and check says the same as build', async () => {
    // A 100,000-character first cell (a file with no newline, say): the message must stay short.
    const f = file('wide-header.csv', `${'x'.repeat(100_000)},other\n1,2\n`);
    const built = await errorOf(() => openAt(f, 10));
    expect(built.message).toContain("header must name a 'unit' and a 'time' column");
    expect(built.message.length).toBeLessThan(400);
    const { problems } = await inspectDataset(dataset(tmp.dir, [f], 'spikes'), { kind: 'activity', binMs: 10 });
    expect(problems.map((p) => p.message)).toEqual([built.message]);
  });


  it('bins a hand-worked case', async () => {
    // bin_ms = 100 → w = 0.1 s. Spikes (unit, t):
    //   u10: 0.05 → bin 0; 0.3 → ⌊3.0⌋ = 3 (decimal 0.3 must not fall into bin 2); 0.31 → 3
    //   u2 : 0.0 → 0; 0.1 → 1; 0.19 → 1; 0.42 → 4
    // max t = 0.42 → ⌊4.2⌋ + 1 = 5 bins. Natural order of labels: u2 before u10.
    //   u2  = [1, 2, 0, 0, 1]
    //   u10 = [1, 0, 0, 2, 0]
    const f = file('s.csv', 'time,extra,unit\n0.05,x,u10\n0.0,y,u2\n0.3,z,u10\n0.1,,u2\n0.19,,u2\n0.31,,u10\n0.42,,u2\n');
    const src = await openAt(f, 100);
    if (src.kind !== 'activity') throw new Error('kind');
    expect([src.units, src.bins, src.binMs, src.unitLabels]).toEqual([2, 5, 100, ['u2', 'u10']]);
    expect(Array.from(await readAll(src))).toEqual([1, 2, 0, 0, 1, 1, 0, 0, 2, 0]);
    expect(src.findings.map((x) => x.code)).toEqual(['duration-from-last-spike']);
  });

  it('uses a `# duration_s:` line for the number of bins', async () => {
    // duration 0.75 s at 250 ms → ⌈3⌉ = 3 bins; spikes at 0.1 (bin 0) and 0.6 (bin 2); TSV, header in other case.
    const f = file('d.tsv', '# duration_s: 0.75\nUnit\tTime\n7\t0.1\n7\t0.6\n');
    const src = await openAt(f, 250);
    if (src.kind !== 'activity') throw new Error('kind');
    expect([src.units, src.bins, src.findings.length]).toEqual([1, 3, 0]);
    expect(Array.from(await readAll(src))).toEqual([1, 0, 1]);
    // 0.7 s at 250 ms → ⌈2.8⌉ = 3 bins, the last one 200 ms long: a notice.
    const g = file('p.csv', '# duration_s: 0.7\nunit,time\na,0.69\n');
    const p = await openAt(g, 250);
    expect(p.findings.map((x) => x.code)).toEqual(['partial-last-bin']);
    expect(Array.from(await readAll(p))).toEqual([0, 0, 1]);
    // A spike at or after the duration is an error naming the row.
    const h = file('late.csv', '# duration_s: 1\nunit,time\na,0.5\na,1.0\n');
    expect((await errorOf(() => openAt(h, 100))).where).toBe('row 4, column 2');
  });

  it('refuses negative, non-finite and non-numeric times, naming the row', async () => {
    for (const [bad, row] of [['-0.1', 3], ['nan', 3], ['inf', 3], ['soon', 3]] as const) {
      const f = file('bad.csv', `unit,time\na,0.2\nb,${bad}\n`);
      const e = await errorOf(() => openAt(f, 10));
      expect([e.name, e.file, e.where]).toEqual(['InputError', 'bad.csv', `row ${row}, column 2`]);
    }
    expect((await errorOf(() => openAt(file('nohead.csv', 'a,b\n1,2\n'), 10))).message).toMatch(/'unit' and a 'time' column/);
    expect((await errorOf(() => openAt(file('nospikes.csv', 'unit,time\n'), 10))).message).toMatch(/no spikes/);
  });

  it('orders labels naturally', () => {
    // Natural order (common practice, no single source): digit runs compare by value.
    expect(['a10', 'a9', '10', '2', 'b', 'a09x'].sort(naturalCompare)).toEqual(['2', '10', 'a9', 'a09x', 'a10', 'b']);
  });
});

describe('spike-table check (headers only)', () => {
  it('reports a bad header and a bad duration line as problems, and names no shape', async () => {
    const { inspectDataset } = await import('../../src/readers/index.ts');
    const files = [file('i1.csv', 'unit,time\na,0.1\n'), file('i2.csv', 'neuron,t\n1,2\n'), file('i3.csv', '# duration_s: -1\nunit,time\n')];
    const r = await inspectDataset(dataset(tmp.dir, files, 'spikes'), { kind: 'activity', binMs: 10 });
    expect(r.files.map((f) => [f.path, f.shape])).toEqual([['i1.csv', null]]);
    expect(r.problems.map((p) => [p.file, p.where])).toEqual([['i2.csv', 'row 1'], ['i3.csv', 'row 1']]);
  });
});
