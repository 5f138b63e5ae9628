/**
 * A full build of a small fixture workspace: the numbers in the version record equal the
 * reference measures (src/metrics, each checked against published values in test/metrics) on
 * the same data; versions are reused or made as the inputs say; old versions are never touched;
 * manifest text cannot inject markup.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { mkdtempSync, mkdirSync, writeFileSync, readFileSync, readdirSync, statSync, existsSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative } from 'node:path';
import { writeNpy } from '../../src/readers/npy-write.ts';
import { createRandom } from '../../src/stats/random.ts';
import { buildWorkspace } from '../../src/audit/build.ts';
import { listVersions, readRecord } from '../../src/audit/versions.ts';
import { createProgress } from '../../src/cli/progress.ts';
import { causeChain } from '../../src/errors.ts';
import {
  populationSparseness,
  lifetimeSparseness,
  excessKurtosis,
  density,
  hoyerSparseness,
  giniIndex,
  activityRatio,
} from '../../src/metrics/index.ts';

const UNITS = 12;
const BINS = 400;
const quiet = createProgress({ quiet: true });

function matrixFor(seed: number): Float32Array {
  const rng = createRandom(seed);
  const a = new Float32Array(UNITS * BINS);
  for (let i = 0; i < a.length; i++) a[i] = rng.next() < 0.15 ? 1 + rng.int(4) : 0;
  return a;
}

function manifest(title: string, notes: string): string {
  return `---
audit: fixture
title: "${title}"
bin_ms: 10
min_bins: 50
bootstrap: { resamples: 200, level: 0.9, method: percentile, seed: 3 }
datasets:
  - { id: d1, path: ../data/m1.npy, month: 2026-01 }
  - { id: d2, path: ../data/m2.npy, month: 2026-02 }
  - { id: d3, path: ../data/m3.npy, month: 2026-03 }
---
${notes}
`;
}

const made: string[] = [];
afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});

function makeWorkspace(title = 'Fixture audit', notes = 'Plain notes.'): string {
  const ws = mkdtempSync(join(tmpdir(), 'lacuna-build-'));
  made.push(ws);
  mkdirSync(join(ws, 'audits'));
  mkdirSync(join(ws, 'data'));
  for (const m of [1, 2, 3]) writeNpy(join(ws, 'data', `m${m}.npy`), matrixFor(100 + m), [UNITS, BINS]);
  writeFileSync(join(ws, 'audits', 'fixture.md'), manifest(title, notes));
  return ws;
}

function snapshot(dir: string): Map<string, string> {
  const out = new Map<string, string>();
  const walk = (d: string) => {
    for (const f of readdirSync(d)) {
      const p = join(d, f);
      if (statSync(p).isDirectory()) walk(p);
      else out.set(relative(dir, p), readFileSync(p).toString('base64'));
    }
  };
  walk(dir);
  return out;
}

const rows = (a: Float32Array) => Array.from({ length: UNITS }, (_, u) => Array.from(a.subarray(u * BINS, (u + 1) * BINS)));
const mean = (xs: (number | null)[]) => {
  const d = xs.filter((x): x is number => x !== null);
  return d.reduce((s, x) => s + x, 0) / d.length;
};
const median = (xs: (number | null)[]) => {
  const d = xs.filter((x): x is number => x !== null).sort((a, b) => a - b);
  const h = d.length / 2;
  return d.length % 2 ? d[Math.floor(h)] : (d[h - 1] + d[h]) / 2;
};

describe('lacuna build on a fixture workspace', () => {
  let ws: string;
  let out: string;
  beforeAll(async () => {
    ws = makeWorkspace();
    out = join(ws, '_site');
    await buildWorkspace({ workspace: ws, out, progress: quiet, workers: '1' });
  });

  it('records measures equal to the reference functions on the same data', () => {
    const rec = readRecord(ws, 'fixture', 'v001').result;
    expect(rec.datasets.map((d) => d.id)).toEqual(['d1', 'd2', 'd3']);
    for (const [i, d] of rec.datasets.entries()) {
      const a = matrixFor(101 + i);
      const m = { rows: UNITS, cols: BINS, data: Float64Array.from(a) };
      const r = rows(a);
      const close = (got: number | null | undefined, want: number | null) => expect(got).toBeCloseTo(want as number, 12);
      // Reference functions: src/metrics, checked against reference-values.md in test/metrics.
      close(d.measures.population_sparseness!.estimate, populationSparseness(m).mean);
      close(d.measures.lifetime_sparseness!.estimate, lifetimeSparseness(m).mean);
      close(d.measures.kurtosis!.estimate, median(r.map((x) => excessKurtosis(x))));
      close(d.measures.density!.estimate, density(a));
      close(d.measures.hoyer!.estimate, mean(r.map((x) => hoyerSparseness(x))));
      close(d.measures.gini!.estimate, mean(r.map((x) => giniIndex(x))));
      close(d.measures.activity_ratio!.estimate, mean(r.map((x) => activityRatio(x))));
      const iv = d.measures.population_sparseness!;
      expect(iv.intervalRecord).toMatchObject({ method: 'percentile', level: 0.9, resamples: 200, seed: 3, resampling: 'blocks-of-bins' });
      expect(iv.interval![0]).toBeLessThanOrEqual(iv.estimate!);
      expect(iv.interval![1]).toBeGreaterThanOrEqual(iv.estimate!);
      expect(d.measures.lifetime_sparseness!.intervalRecord!.resampling).toBe('units');
    }
    expect(rec.drift).not.toBeNull();
    expect(rec.drift!.months).toEqual(['2026-01', '2026-02', '2026-03']);
  });

  it('writes the report with every download, and results.json equal to the record', () => {
    const dir = join(out, 'fixture', 'v001');
    for (const f of ['index.html', 'results.json', 'summary.csv', 'summary.md', 'summary.tex', 'references.bib', 'methods.md']) {
      expect(existsSync(join(dir, f)), f).toBe(true);
    }
    const json = JSON.parse(readFileSync(join(dir, 'results.json'), 'utf8'));
    expect(json).toEqual(JSON.parse(JSON.stringify(readRecord(ws, 'fixture', 'v001').result)));
    expect(existsSync(join(out, 'index.html'))).toBe(true);
    expect(existsSync(join(out, 'fixture', 'index.html'))).toBe(true);
  });

  it('reuses the version for unchanged inputs; one changed byte makes a new one and leaves the old one byte-identical', async () => {
    const before = snapshot(join(out, 'fixture', 'v001'));
    await buildWorkspace({ workspace: ws, out, progress: quiet, workers: '1' });
    expect(listVersions(ws, 'fixture').map((v) => v.version)).toEqual(['v001']);

    const file = join(ws, 'data', 'm2.npy');
    const bytes = readFileSync(file);
    bytes[bytes.length - 1] ^= 0x01; // last float32's lowest mantissa bit
    writeFileSync(file, bytes);
    await buildWorkspace({ workspace: ws, out, progress: quiet, workers: '1' });
    const versions = listVersions(ws, 'fixture');
    expect(versions.map((v) => v.version)).toEqual(['v001', 'v002']);
    expect(versions[1].changes).toContain('data/m2.npy');
    expect(snapshot(join(out, 'fixture', 'v001'))).toEqual(before);
    expect(existsSync(join(out, 'fixture', 'v002', 'compare.html'))).toBe(true);
  });

  it('regenerates every version page from the records after the output folder is deleted', async () => {
    rmSync(out, { recursive: true, force: true });
    await buildWorkspace({ workspace: ws, out, progress: quiet, workers: '1' });
    for (const v of listVersions(ws, 'fixture')) expect(existsSync(join(out, 'fixture', v.version, 'index.html'))).toBe(true);
  });
});

describe('manifest text in the report', () => {
  it('renders <script> in the title and notes as inert text', async () => {
    const ws = makeWorkspace('<script>alert(1)</script>', 'Notes <script>alert(2)</script> and [x](javascript:alert(3))');
    const out = join(ws, '_site');
    await buildWorkspace({ workspace: ws, out, progress: quiet, workers: '1' });
    for (const page of [join(out, 'fixture', 'v001', 'index.html'), join(out, 'index.html'), join(out, 'fixture', 'index.html')]) {
      const html = readFileSync(page, 'utf8');
      expect(html).not.toMatch(/<script>alert/);
      expect(html).not.toMatch(/href="javascript:/i);
    }
    expect(readFileSync(join(out, 'fixture', 'v001', 'index.html'), 'utf8')).toContain('&lt;script&gt;alert(1)&lt;/script&gt;');
  });
});

describe('one dataset split across worker threads', () => {
  it('gives the same result as one thread (pass states over unit ranges merge exactly)', async () => {
    const one = makeWorkspace();
    const two = makeWorkspace();
    await buildWorkspace({ workspace: one, out: join(one, '_site'), progress: quiet, workers: '1' });
    // One dataset, two lanes (this thread and one worker), splitMinBytes 0: split by unit ranges.
    for (const f of ['m2.npy', 'm3.npy']) rmSync(join(two, 'data', f));
    writeFileSync(join(two, 'audits', 'fixture.md'), readFileSync(join(two, 'audits', 'fixture.md'), 'utf8').replace(/\n  - \{ id: d2.*\n  - \{ id: d3.*/, ''));
    const s = await buildWorkspace({ workspace: two, out: join(two, '_site'), progress: quiet, workers: '2', splitMinBytes: 0 });
    expect(s.split).toBe(1);
    const a = readRecord(one, 'fixture', 'v001').result.datasets[0];
    const b = readRecord(two, 'fixture', 'v001').result.datasets[0];
    expect(b.id).toBe('d1');
    // Same data, same seed: identical numbers, findings and chart data.
    expect(b.measures).toEqual(a.measures);
    expect(b.findings).toEqual(a.findings);
    expect(b.chartData).toEqual(a.chartData);
  });
});

describe('a build that fails part-way', () => {
  it('leaves the earlier version, its pages and the records exactly as they were', async () => {
    const ws = makeWorkspace();
    const out = join(ws, '_site');
    await buildWorkspace({ workspace: ws, out, progress: quiet, workers: '1' });
    const pagesBefore = snapshot(out);
    const recordsBefore = snapshot(join(ws, 'records'));
    // Change one dataset and truncate another: the build stops on the bad file, after reading others.
    const m1 = join(ws, 'data', 'm1.npy');
    const b1 = readFileSync(m1);
    b1[b1.length - 1] ^= 0x01;
    writeFileSync(m1, b1);
    const m3 = join(ws, 'data', 'm3.npy');
    writeFileSync(m3, readFileSync(m3).subarray(0, 300));
    const err = await buildWorkspace({ workspace: ws, out, progress: quiet, workers: '1' }).then(() => null, (e: unknown) => e);
    // The error names the dataset, and its cause the file and the place (printed as a chain by the CLI).
    expect(causeChain(err).join('\n')).toMatch(/d3[\s\S]*data\/m3\.npy/);
    expect(listVersions(ws, 'fixture').map((v) => v.version)).toEqual(['v001']);
    expect(snapshot(join(ws, 'records'))).toEqual(recordsBefore);
    expect(snapshot(out)).toEqual(pagesBefore);
  });
});
