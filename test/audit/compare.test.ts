/**
 * compareVersions / formatComparison on the hand-made fixture (test/fixtures/audit-result.ts):
 * two versions that differ in exactly one dataset must report that dataset, its input and its
 * measures, and nothing else. Expected deltas are worked by hand from the numbers set here.
 */
import { describe, expect, it } from 'vitest';
import { compareVersions, formatComparison } from '../../src/audit/compare.ts';
import { activityFixture } from '../fixtures/audit-result.ts';
import type { AuditResult } from '../../src/types.ts';

function nextVersion(): { from: AuditResult; to: AuditResult } {
  const from = activityFixture();
  const to = activityFixture();
  to.version = '2024-07-31T12-00-00Z';
  to.created = '2024-07-31T12:00:00.000Z';
  // Dataset rig-a-2024-02: one of its two files re-exported (new hash), two measures moved.
  const ds = to.datasets[1];
  ds.files[1] = { ...ds.files[1], sha256: '9'.repeat(64) };
  to.inputs = [...to.datasets[0].files, ...ds.files];
  const life = ds.measures.lifetime_sparseness!;
  life.estimate = 0.82717; // from 0.72717: delta +0.1, relative 0.1/0.72717
  life.interval = [0.8201, 0.8990]; // from [0.6262, 0.8147]: 0.8201 > 0.8147 → no overlap
  const kurt = ds.measures.kurtosis!;
  kurt.estimate = 3.408; // from 3.508: delta −0.1, interval kept → overlap
  return { from, to };
}

describe('compareVersions', () => {
  it('reports exactly the changed dataset, its input and its two measures', () => {
    const { from, to } = nextVersion();
    const c = compareVersions(from, to);
    expect(c).toMatchObject({ audit: 'v1-rig-a', from: '2024-06-30T12-00-00Z', to: '2024-07-31T12-00-00Z' });
    expect(c.inputs).toEqual([{ path: 'data/2024-02/session_2.csv', change: 'changed' }]);
    expect(c.parameters).toEqual([]);
    expect(c.datasets.map((d) => [d.id, d.change])).toEqual([['rig-a-2024-01', 'same'], ['rig-a-2024-02', 'changed']]);
    const moved = c.datasets[1].measures.filter((m) => m.delta !== 0);
    expect(moved.map((m) => m.measure)).toEqual(['lifetime_sparseness', 'kurtosis']);
    const [life, kurt] = moved;
    expect(life.from).toBe(0.72717);
    expect(life.to).toBe(0.82717);
    expect(life.delta).toBeCloseTo(0.1, 12);
    expect(life.relative).toBeCloseTo(0.1 / 0.72717, 12);
    expect(life.overlap).toBe(false);
    expect(kurt.delta).toBeCloseTo(-0.1, 12);
    expect(kurt.overlap).toBe(true);
    // hoyer of that dataset has no interval in the fixture → overlap null.
    expect(c.datasets[1].measures.find((m) => m.measure === 'hoyer')?.overlap).toBeNull();
    expect(c.datasets[0].measures.every((m) => m.delta === 0 && m.overlap === true)).toBe(true);
    expect(c.summary).toMatch(/1 input file differs.*1 dataset changed \(rig-a-2024-02\)/);
    expect(c.summary).toMatch(/no longer overlap for rig-a-2024-02 lifetime sparseness/);
  });

  it('lists parameters by dotted name, and added / removed datasets and inputs', () => {
    const { from } = nextVersion();
    const to = activityFixture();
    (to.parameters.bootstrap as { resamples: number }).resamples = 4000;
    to.datasets = [to.datasets[0]];
    to.inputs = [...to.datasets[0].files, { path: 'data/extra.npy', sha256: '1'.repeat(64), bytes: 8 }];
    const c = compareVersions(from, to);
    expect(c.parameters).toEqual([{ name: 'bootstrap.resamples', from: 2000, to: 4000 }]);
    expect(c.inputs).toEqual([
      { path: 'data/2024-02/session_1.csv', change: 'removed' },
      { path: 'data/2024-02/session_2.csv', change: 'removed' },
      { path: 'data/extra.npy', change: 'added' },
    ]);
    const gone = c.datasets.find((d) => d.id === 'rig-a-2024-02')!;
    expect(gone.change).toBe('removed');
    expect(gone.measures.every((m) => m.to === null && m.delta === null && m.relative === null)).toBe(true);
    const back = compareVersions(to, from).datasets.find((d) => d.id === 'rig-a-2024-02')!;
    expect(back.change).toBe('added');
  });

  it('identical versions: no changes, said clearly', () => {
    const a = activityFixture();
    const c = compareVersions(a, activityFixture());
    expect(c.inputs).toEqual([]);
    expect(c.parameters).toEqual([]);
    expect(c.datasets.every((d) => d.change === 'same')).toBe(true);
    expect(c.summary).toMatch(/^No changes/);
    expect(formatComparison(c)).toMatch(/\nno changes\n$/);
  });
});

describe('formatComparison', () => {
  it('an aligned table with only the changed dataset and its moved measures', () => {
    const { from, to } = nextVersion();
    const text = formatComparison(compareVersions(from, to));
    const lines = text.split('\n');
    expect(text).toContain('changed  data/2024-02/session_2.csv');
    expect(text).not.toContain('rig-a-2024-01 (');
    expect(text).toContain('rig-a-2024-02 (changed)');
    const header = lines.find((l) => l.includes('measure') && l.includes('delta'))!;
    const row = lines.find((l) => l.trim().startsWith('lifetime_sparseness'))!;
    // Columns line up: "delta" starts where the row's delta starts.
    expect(row.indexOf('+0.1')).toBe(header.indexOf('delta'));
    expect(row).toMatch(/\+13\.75%/); // 100·0.1/0.72717 = 13.752 → 4 significant digits
    expect(row.trimEnd().endsWith('no')).toBe(true);
    expect(lines.find((l) => l.trim().startsWith('kurtosis'))).toMatch(/-0\.1\b.*yes$/);
    expect(text).toContain('1 dataset unchanged.');
    expect(text).not.toContain('population_sparseness');
  });
});
