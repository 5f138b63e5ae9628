/**
 * How numbers and names are written on the pages. Expected strings worked out by hand from
 * ECMA-262 `toPrecision`/`toExponential` (3 significant digits; ties pick the larger digit)
 * and from the binary prefixes of IEC 80000-13 (1 KiB = 1024 bytes).
 */
import { describe, expect, it } from 'vitest';
import { describeInterval, formatBytes, formatCount, formatInterval, formatLevel, formatNumber, slug, uniqueSlugger } from '../../src/report/site-format.ts';
import { auditIndexModel, hrefSegment, latestModel } from '../../src/report/site-index.ts';
import { collectSeeds, flattenParameters } from '../../src/report/site-model.ts';
import { activityFixture } from '../fixtures/audit-result.ts';

describe('formatNumber', () => {
  it.each([
    [0.4948261737089201, '0.495'], // 0.494|8… rounds up
    [12.345, '12.3'],
    [-0.05, '-0.0500'], // 3 significant digits kept, so the precision is visible
    [0, '0'],
    [12345, '12,345'], // a whole number in full (shared policy, src/format/number.ts)
    [12345.6, '12,346'], // more integer digits than significant ones: rounded, not 1.23e+4
    [0.000123, '1.23e-4'], // below 0.001 in exponent form
    [null, '—'],
    [Number.NaN, 'not finite'],
    [Number.POSITIVE_INFINITY, 'not finite'],
  ])('%s → %s', (x, want) => {
    expect(formatNumber(x)).toBe(want);
  });
});

describe('other formats', () => {
  it('counts, intervals, levels, sizes', () => {
    expect(formatCount(71568)).toBe('71,568');
    expect(formatInterval([0.4712, 0.5179])).toBe('[0.471, 0.518]');
    expect(formatInterval(null)).toBe('—');
    expect(formatLevel(0.95)).toBe('95%');
    expect(formatLevel(0.995)).toBe('99.5%');
    expect(formatBytes(1023)).toBe('1023 B');
    expect(formatBytes(1536)).toBe('1.5 KiB'); // 1536 / 1024 = 1.5
    expect(formatBytes(576128)).toBe('563 KiB'); // 576128 / 1024 = 562.625 → 563
    expect(formatBytes(3 * 1024 ** 3)).toBe('3.0 GiB');
  });

  it('an interval says its level, method, resamples, resampling unit, block length and seed', () => {
    const ds = activityFixture().datasets[0];
    expect(describeInterval(ds.measures.population_sparseness!)).toBe('95% BCa bootstrap, 2,000 resamples of blocks-of-bins, blocks of 12 bins (auto), seed 20240117');
    expect(describeInterval({ ...ds.measures.kurtosis!, interval: null, note: 'too few units' })).toBe('no interval: too few units');
  });

  it('parameters flatten to dotted names; seeds are collected once each', () => {
    const r = activityFixture();
    expect(flattenParameters({ a: 1, b: { c: 'x', d: [1, 2] } })).toEqual([
      { name: 'a', value: '1' },
      { name: 'b.c', value: 'x' },
      { name: 'b.d', value: '[1,2]' },
    ]);
    // Fixture: 7 + 5 plain measures with intervals except rig-a-2024-02's Hoyer (no record),
    // plus 1 event measure: 12 intervals, all with seed 20240117.
    expect(collectSeeds(r)).toEqual(['bootstrap.seed = 20240117', 'seed 20240117 used by 12 bootstrap intervals']);
  });
});

describe('ids and links', () => {
  it('slugs are safe for ids and file names, and unique on a page', () => {
    expect(slug('rig A/2024 <x>')).toBe('rig-A-2024-x-');
    expect(slug('..')).toBe('x..');
    expect(slug('')).toBe('x');
    const s = uniqueSlugger();
    expect([s('a b'), s('a-b'), s('a b')]).toEqual(['a-b', 'a-b-2', 'a-b-3']);
  });

  it('link segments are percent-encoded and never . or ..', () => {
    expect(hrefSegment('2024-06-30T12-00-00Z')).toBe('2024-06-30T12-00-00Z');
    expect(hrefSegment('a b/"c"')).toBe('a%20b%2F%22c%22');
    expect(hrefSegment('..')).toBe('%2E%2E');
  });

  it('versions are listed newest first; latest/ points one folder up', () => {
    const input = {
      audit: 'a',
      title: 'A',
      latest: 'v3',
      versions: [
        { version: 'v1', created: '2024-01-01T00:00:00Z', inputsHash: '1'.repeat(64), changes: 'first' },
        { version: 'v3', created: '2024-03-01T00:00:00Z', inputsHash: '3'.repeat(64), changes: 'third' },
        { version: 'v2', created: '2024-02-01T00:00:00Z', inputsHash: '2'.repeat(64), changes: 'second' },
      ],
    };
    const m = auditIndexModel(input);
    expect(m.versions.map((v) => v.version)).toEqual(['v3', 'v2', 'v1']);
    expect(m.versions.map((v) => v.latest)).toEqual([true, false, false]);
    expect(m.versions[0].href).toBe('v3/index.html');
    expect(latestModel(input).target).toBe('../v3/index.html');
  });
});
