/**
 * The top of the version page from the hand-made fixtures: the verdict's sentences, which
 * datasets stand out, the overview table's shape. Numbers are the fixture's, rounded by hand.
 */
import { describe, expect, it } from 'vitest';
import { findingKinds, inSentence, overviewModel, standOut, verdictSentences } from '../../src/report/site-overview.ts';
import { activityFixture, weightsFixture } from '../fixtures/audit-result.ts';

describe('verdictSentences', () => {
  it('activity fixture: datasets, months, groups, ranges, findings that affect numbers', () => {
    const text = verdictSentences(activityFixture()).join(' ');
    // Fixture: rig-a-2024-01 and rig-a-2024-02, group "rig A"; population sparseness 0.4948… → 0.495
    // and 0.5290 → 0.529; lifetime 0.6921 → 0.692 and 0.7272 → 0.727.
    expect(text).toContain('2 datasets over 2 months (2024-01 to 2024-02), in 1 group (rig A).');
    expect(text).toContain('population sparseness ranged from 0.495 to 0.529, lifetime sparseness ranged from 0.692 to 0.727');
    // exclude and caution findings count; the notice (few units) does not.
    expect(text).toContain('Findings that can affect numbers: silent bins (rig-a-2024-01); silent units (rig-a-2024-01); session join (rig-a-2024-02).');
    expect(text).not.toContain('few units');
  });

  it('months where two groups differ: only differences whose interval excludes zero, headline measures only', () => {
    const r = activityFixture();
    r.drift!.groupDifferences = [
      { measure: 'population_sparseness', month: '2024-01', a: 'rig A', b: 'rig B', difference: 0.01, interval: [-0.01, 0.03] },
      { measure: 'population_sparseness', month: '2024-02', a: 'rig A', b: 'rig B', difference: 0.05, interval: [0.02, 0.08] },
      { measure: 'gini', month: '2024-02', a: 'rig A', b: 'rig B', difference: 0.05, interval: [0.02, 0.08] },
    ];
    const text = verdictSentences(r).join(' ');
    expect(text).toContain('Groups measured in the same month differed, with a difference interval excluding zero: population sparseness (rig A − rig B) in 2024-02.');
    expect(text).not.toContain('2024-01.');
    expect(text).not.toMatch(/Gini index \(rig A/);
  });

  it('weights fixture: names of people keep their capitals', () => {
    expect(inSentence('Hoyer sparseness')).toBe('Hoyer sparseness');
    expect(inSentence('Population sparseness')).toBe('population sparseness');
    expect(verdictSentences(weightsFixture())[0]).toMatch(/^1 weight dataset/);
  });
});

describe('standOut', () => {
  it('names a dataset whose interval lies above every other one, and none when intervals overlap', () => {
    const r = activityFixture();
    const third = structuredClone(r.datasets[1]!);
    third.id = 'rig-a-2024-03';
    r.datasets.push(third);
    // Population sparseness intervals: [0.471, 0.518] and [0.500, 0.558] twice: all overlap.
    expect(standOut(r, 'population_sparseness')).toEqual([]);
    third.measures.population_sparseness!.interval = [0.6, 0.7];
    expect(standOut(r, 'population_sparseness')).toEqual([{ id: 'rig-a-2024-03', side: 'above' }]);
    expect(verdictSentences(r).join(' ')).toContain('Outside every other dataset’s interval: rig-a-2024-03 (population sparseness, above all others).');
  });
});

describe('overviewModel and findingKinds', () => {
  it('weights without months: one unlabelled group, no intervals said so', () => {
    const o = overviewModel(weightsFixture(), (id) => `datasets/${id}/index.html`);
    expect(o.groups.map((g) => g.label)).toEqual(['']);
    expect(o.hasIntervals).toBe(false);
    expect(o.columns.find((c) => c.key === 'density')!.interval).toBe('none (every weight was read: no sampling interval)');
  });

  it('kinds of finding: level order, then the number of datasets', () => {
    const kinds = findingKinds(activityFixture(), () => '');
    expect(kinds.map((k) => k.level)).toEqual(['exclude', 'exclude', 'caution', 'notice']);
    expect(kinds[0]!.kind).toBe('silent bins');
    expect(kinds[0]!.count).toBe('36');
  });
});
