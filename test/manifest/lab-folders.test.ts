/**
 * Manifests of lab output folders (sorter-folder, imaging-folder): the new fields validate as the
 * README's manifest reference says, a folder is recognised from its file names, its member files
 * stay inside the workspace, and settings that do not fit the format are named. Expected values
 * are the README's words (common practice for the labels, no source).
 */
import { afterEach, describe, expect, it } from 'vitest';
import { InputErrors } from '../../src/errors.ts';
import { loadManifest } from '../../src/manifest/load.ts';
import { tempWorkspace, type TempWorkspace } from './workspace.ts';

let ws: TempWorkspace | null = null;
afterEach(() => ws?.cleanup());

function manifest(datasets: string): string {
  return `---\naudit: lab\ntitle: Lab folders\ndatasets:\n${datasets}\n---\n`;
}

async function problemsOf(w: TempWorkspace): Promise<string[]> {
  const err = await loadManifest(`${w.root}/audits/lab.md`, w.root).catch((e: unknown) => e);
  expect(err).toBeInstanceOf(InputErrors);
  return (err as InputErrors).problems.map((p) => `${p.where}: ${p.message}`);
}

describe('lab output folders in a manifest', () => {
  it('recognises a sorter folder, lists only the files it reads, and reads `labels: good` as [good]', async () => {
    ws = tempWorkspace();
    for (const f of ['spike_times.npy', 'spike_clusters.npy', 'params.py', 'cluster_group.tsv', 'cluster_Amplitude.tsv', 'templates.npy', 'amplitudes.npy']) ws.write(`data/sort/${f}`);
    ws.write('audits/lab.md', manifest('  - { id: s, path: ../data/sort, sorter: { labels: good } }'));
    const m = await loadManifest(`${ws.root}/audits/lab.md`, ws.root);
    expect(m.datasets[0].format).toBe('sorter-folder');
    expect(m.datasets[0].relFiles).toEqual(['data/sort/spike_times.npy', 'data/sort/spike_clusters.npy', 'data/sort/params.py', 'data/sort/cluster_group.tsv']);
    expect(m.datasets[0].sorter).toEqual({ labels: ['good'], sample_rate_hz: null, duration_s: null });
    expect(m.datasets[0].imaging).toBeNull();
  });

  it('gives a sorter folder its default labels when the manifest has no sorter settings', async () => {
    ws = tempWorkspace();
    for (const f of ['spike_times.npy', 'spike_templates.npy']) ws.write(`data/sort/${f}`);
    ws.write('audits/lab.md', manifest('  - { id: s, path: ../data/sort }'));
    const m = await loadManifest(`${ws.root}/audits/lab.md`, ws.root);
    expect(m.datasets[0].sorter?.labels).toEqual(['good']);
  });

  it('names wrong settings: a label that is not text, sorter settings on an npy file, imaging without a frame rate', async () => {
    ws = tempWorkspace();
    ws.write('data/a.npy');
    for (const f of ['F.npy', 'iscell.npy']) ws.write(`data/img/plane0/${f}`);
    ws.write('audits/lab.md', manifest([
      '  - { id: a, path: ../data/a.npy, sorter: { labels: [good] } }',
      '  - { id: b, path: ../data/img, imaging: { trace: F } }',
      '  - { id: c, path: ../data/img, format: sorter-folder, sorter: { labels: [good, 5] } }',
    ].join('\n')));
    const p = await problemsOf(ws);
    expect(p[0]).toMatch(/^datasets\[0\]\.sorter: .*line 5.*found sorter settings for a npy dataset; allowed: sorter only with format sorter-folder$/);
    expect(p[1]).toMatch(/^datasets\[1\]\.imaging\.frame_rate_hz: .*line 6.*required field is missing/);
    expect(p[2]).toMatch(/^datasets\[2\]\.sorter\.labels: .*line 7.*found a list of 2; allowed: a list of 1–64 words/);
    expect(p[3]).toMatch(/^datasets\[2\]\.path: .*"\.\.\/data\/img" has no spike_times\.npy/);
  });

  it('refuses a member file that is a symbolic link leading outside the workspace', async () => {
    ws = tempWorkspace();
    ws.write('data/sort/spike_times.npy');
    ws.link('data/sort/spike_clusters.npy', `${ws.outside}/secret.npy`);
    ws.write('audits/lab.md', manifest('  - { id: s, path: ../data/sort, format: sorter-folder }'));
    const p = await problemsOf(ws);
    expect(p).toHaveLength(1);
    expect(p[0]).toContain('datasets[0].path: found "../data/sort/spike_clusters.npy", a symbolic link leading outside the workspace');
  });
});
