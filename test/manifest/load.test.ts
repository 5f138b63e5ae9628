/**
 * Whole manifests: the README example round-trips to the expected ResolvedManifest (defaults as
 * stated in schema.ts: this project's choices, common practice, no source); the manifest hash is
 * checked against coreutils `sha256sum` (FIPS 180-4 SHA-256, an implementation outside Node);
 * the reference table is checked against the field list written out by hand here.
 */
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { InputError, InputErrors } from '../../src/errors.ts';
import { checkWorkspace } from '../../src/manifest/check.ts';
import { findManifests, loadManifest, manifestReferenceMarkdown } from '../../src/manifest/index.ts';
import type { ResolvedDataset, ResolvedManifest } from '../../src/manifest/types.ts';
import { EXAMPLE_MANIFEST, tempWorkspace } from './workspace.ts';

const ws = tempWorkspace();
afterAll(() => ws.cleanup());
ws.write('data/kc/2026-01/s2.npy');
ws.write('data/kc/2026-01/s1.npy');
ws.write('data/kc/2026-01/README.md');
ws.write('data/kc/2026-02/session-1.npy');
const file = ws.write('audits/kc-survey.md', EXAMPLE_MANIFEST);

describe('loadManifest', () => {
  it('the README example round-trips with every default filled', async () => {
    const m = await loadManifest(file, ws.root);
    const sum = spawnSync('sha256sum', [file], { encoding: 'utf8' });
    const expected: ResolvedManifest = {
      file,
      relFile: 'audits/kc-survey.md',
      sha256: sum.status === 0 ? sum.stdout.split(' ')[0] : m.sha256,
      audit: 'kc-survey',
      title: 'Mushroom-body survey, 2026',
      kind: 'activity',
      axis: 'time',
      bin_ms: 10,
      zero_tolerance: 0,
      bootstrap: { resamples: 2000, level: 0.95, method: 'bca', seed: 1, block_length: 'auto' },
      negatives: 'keep',
      events: null,
      drift: { baseline_months: 3, chart: 'ewma', ewma_lambda: 0.2, ewma_L: 3, cusum_k: 0.5, cusum_h: 5, adjust: 'holm' },
      min_bins: 100,
      min_nonzero: 10,
      datasets: [
        {
          id: 'm01-rig-a', path: '../data/kc/2026-01/',
          files: [path.join(ws.root, 'data/kc/2026-01/s1.npy'), path.join(ws.root, 'data/kc/2026-01/s2.npy')],
          relFiles: ['data/kc/2026-01/s1.npy', 'data/kc/2026-01/s2.npy'],
          format: 'npy', month: '2026-01', group: 'rig-a', layout: 'units-by-bins', series: null, member: null, sorter: null, imaging: null,
        },
        {
          id: 'm02-rig-b', path: '../data/kc/2026-02/session-1.npy',
          files: [path.join(ws.root, 'data/kc/2026-02/session-1.npy')],
          relFiles: ['data/kc/2026-02/session-1.npy'],
          format: 'npy', month: '2026-02', group: 'rig-b', layout: 'units-by-bins', series: null, member: null, sorter: null, imaging: null,
        },
      ],
      notes: 'Free markdown notes by the lab.\n',
    };
    expect(m).toEqual(expected);
    expect(m.sha256).toMatch(/^[0-9a-f]{64}$/);
    // Plain JSON values only.
    expect(JSON.parse(JSON.stringify(m))).toEqual(m);
  });

  it('infers formats, and refuses what does not fit', async () => {
    ws.write('data/t/rates.csv');
    ws.write('data/t/spk.tsv');
    ws.write('data/t/w.npz');
    ws.write('data/t/rec.dat');
    ws.write('data/t/mixed/a.npy');
    ws.write('data/t/mixed/b.csv');
    const manifest = (datasets: string[], kind = 'activity') =>
      ws.write('audits/fmt.md', ['---', 'audit: fmt', 'title: F', `kind: ${kind}`, 'datasets:', ...datasets, '---', ''].join('\n'));
    const ok = await loadManifest(manifest([
      '  - { id: a, path: ../data/t/rates.csv }',
      '  - { id: b, path: ../data/t/spk.tsv, format: spikes }',
      '  - { id: c, path: ../data/t/rec.dat, format: npy }',
      '  - { id: d, path: ../data/t/w.npz, member: rates }',
    ]), ws.root);
    expect(ok.datasets.map((d: ResolvedDataset) => [d.format, d.member])).toEqual([['csv', null], ['spikes', null], ['npy', null], ['npz', 'rates']]);
    // Lines: 6 = first dataset, 7 second, … 11 sixth (flow items, one per line).
    const bad = manifest([
      '  - { id: a, path: ../data/t/rec.dat }',
      '  - { id: b, path: ../data/t/mixed }',
      '  - { id: c, path: ../data/t/rates.csv, format: npy }',
      '  - { id: d, path: ../data/t/rates.csv, member: x }',
      '  - { id: e, path: ../data/t/w.npz, series: /units }',
      '  - { id: f, path: ../data/t/spk.tsv, format: spikes, recording_end_s: 60 }',
    ]);
    const problems = await loadManifest(bad, ws.root).then(() => [] as InputError[], (e: InputErrors) => e.problems);
    expect(problems.map((p) => [p.where, p.line])).toEqual([
      ['datasets[0].format', 6],
      ['datasets[1].format', 7],
      ['datasets[2].format', 8],
      ['datasets[3].member', 9],
      ['datasets[4].series', 10],
      ['datasets[5].recording_end_s', 11],
    ]);
    expect(problems[0].message).toContain('cannot tell the format of "data/t/rec.dat"');
    expect(problems[1].message).toMatch(/two formats \(npy and csv/);
  });
});

describe('findManifests', () => {
  it('lists audits/*.md sorted, skipping hidden files, other extensions and subfolders', async () => {
    const w = tempWorkspace();
    try {
      for (const n of ['b.md', 'a.md', '.draft.md', 'notes.txt', 'sub/c.md', 'B.md']) w.write(`audits/${n}`);
      const found = (await findManifests(w.root)).map((f) => path.relative(w.root, f));
      expect(found).toEqual(['audits/B.md', 'audits/a.md', 'audits/b.md']);
    } finally {
      w.cleanup();
    }
  });
  it('a folder without audits/ says how to make a workspace', async () => {
    const err = await findManifests(ws.outside).catch((e: unknown) => e);
    expect(err).toBeInstanceOf(InputError);
    expect((err as InputError).message).toMatch(/no audits\/ folder.*lacuna init DIR/);
  });
});

describe('checkWorkspace', () => {
  it('gathers manifest problems, inspection problems and duplicate audit names', async () => {
    const w = tempWorkspace();
    try {
      w.write('data/x.npy');
      w.write('data/y.npy');
      const good = (id: string) => ['---', 'audit: same', `title: ${id}`, 'datasets:', '  - { id: x, path: ../data/x.npy }', '  - { id: y, path: ../data/y.npy }', '---', ''].join('\n');
      w.write('audits/1.md', good('one'));
      w.write('audits/2.md', good('two'));
      w.write('audits/3.md', '---\naudit: Bad Name\ntitle: t\ndatasets:\n  - { id: z, path: ../data/none.npy }\n---\n');
      w.write('audits/4.md', '---js\n{ audit: "x" }\n---\n');
      const seen: string[] = [];
      const summary = await checkWorkspace(w.root, async (ds, m) => {
        seen.push(`${m.relFile}:${ds.id}`);
        return { problems: ds.id === 'y' ? [new InputError('header says 3 dimensions; allowed: 2', { file: ds.relFiles[0], where: 'byte 8' })] : [] };
      });
      expect(summary.manifests).toBe(4);
      expect(summary.datasets).toBe(4);
      expect(seen).toEqual(['audits/1.md:x', 'audits/1.md:y', 'audits/2.md:x', 'audits/2.md:y']);
      const where = summary.problems.map((p) => `${p.file} ${p.where ?? ''}`);
      expect(where).toEqual([
        'data/y.npy byte 8',
        'audits/2.md audit',
        'data/y.npy byte 8',
        'audits/3.md audit',
        'audits/3.md datasets[0].path', // data/none.npy does not exist: reported beside the bad slug
        'audits/4.md ',
      ]);
      expect(summary.problems[1].message).toContain('already used by audits/1.md');
    } finally {
      w.cleanup();
    }
  });
  it('no audits/ folder is reported as a problem, not thrown', async () => {
    const s = await checkWorkspace(ws.outside, async () => ({ problems: [] }));
    expect(s).toMatchObject({ manifests: 0, datasets: 0 });
    expect(s.problems[0].hint).toMatch(/lacuna init DIR/);
  });
});

describe('manifestReferenceMarkdown', () => {
  // Every field and its default, written out by hand from the brief (not read from schema.ts).
  const expected: [string, string][] = [
    ['audit', 'required'], ['title', 'required'], ['kind', 'activity'], ['axis', 'time'], ['bin_ms', '10'],
    ['zero_tolerance', '0'], ['bootstrap', 'see below'], ['bootstrap.resamples', '2000'], ['bootstrap.level', '0.95'],
    ['bootstrap.method', 'bca'], ['bootstrap.seed', '1'], ['bootstrap.block_length', 'auto'], ['negatives', 'keep'],
    ['events', 'none (off)'], ['events.k', '3'], ['events.baseline', 'trace'], ['events.baseline.start_s', 'required'],
    ['events.baseline.end_s', 'required'], ['drift', 'see below'], ['drift.baseline_months', '3'], ['drift.chart', 'ewma'],
    ['drift.ewma_lambda', '0.2'], ['drift.ewma_L', '3'], ['drift.cusum_k', '0.5'], ['drift.cusum_h', '5'], ['drift.adjust', 'holm'],
    ['min_bins', '100'], ['min_nonzero', '10'], ['datasets', 'required'], ['datasets[].id', 'required'],
    ['datasets[].path', 'required'], ['datasets[].files', 'every non-hidden data file'], ['datasets[].month', 'none'],
    ['datasets[].group', 'none'], ['datasets[].layout', 'units-by-bins'], ['datasets[].format', 'from the file extension'],
    ['datasets[].series', 'none'], ['datasets[].member', 'the only member'],
    ['datasets[].recording_end_s', 'as the file states (epochs, trials, obs_intervals), else the last spike'],
    ['datasets[].sorter', 'none'], ['datasets[].sorter.labels', '[good]'], ['datasets[].sorter.sample_rate_hz', "params.py's sample_rate"],
    ['datasets[].sorter.duration_s', 'to the last spike'], ['datasets[].imaging', 'none'], ['datasets[].imaging.frame_rate_hz', 'required'],
    ['datasets[].imaging.trace', 'F-neuropil'], ['datasets[].imaging.neuropil_k', '0.7'], ['datasets[].imaging.cells', 'flag'],
    ['datasets[].imaging.min_probability', '0.5'],
  ];
  it('is the table in README.md, so the reference cannot drift from the validator', () => {
    const readme = readFileSync(new URL('../../README.md', import.meta.url), 'utf8');
    expect(readme).toContain(manifestReferenceMarkdown().trimEnd());
  });
  it('has one row per field, with its default, in order', () => {
    const rows = manifestReferenceMarkdown().trim().split('\n').slice(2).map((r) => r.split(' | ').map((c) => c.replace(/^\| /, '')));
    expect(rows.map((c) => [c[0].replace(/`/g, ''), c[2]])).toEqual(expected);
    for (const c of rows) expect(c[3].length).toBeGreaterThan(10);
  });
});
