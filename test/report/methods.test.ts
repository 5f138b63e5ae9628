/**
 * The methods paragraph states what the audit actually did: every number checked here is
 * read from the fixture (or from a changed copy), never written into the source.
 */
import { describe, expect, it } from 'vitest';
import { cautionsText, methodsText } from '../../src/report/methods.ts';
import type { AuditResult, IntervalRecord } from '../../src/types.ts';
import { activityFixture, weightsFixture } from '../fixtures/audit-result.ts';

function eachRecord(r: AuditResult, f: (rec: IntervalRecord) => void): void {
  for (const ds of r.datasets) for (const m of [...Object.values(ds.measures), ...Object.values(ds.eventMeasures ?? {})]) if (m?.intervalRecord) f(m.intervalRecord);
}

describe('methodsText', () => {
  it('states the fixture’s resamples, seed, level, block lengths, negatives policy, bin width and version', () => {
    const r = activityFixture();
    // The negatives policy is stated only where some dataset had negative values: give it one.
    r.datasets[1]!.findings.push({ level: 'caution', code: 'negative-values', message: '4 negative cells, set to 0 (rectify).', where: ['unit 2'], count: 4 });
    const { plain, markdown } = methodsText(r);
    const rec = r.datasets[0]!.measures.population_sparseness!.intervalRecord!;
    expect(plain).toContain(`${rec.resamples} resamples`);
    expect(plain).toContain(`seed ${rec.seed}`);
    expect(plain).toContain(`${rec.level * 100}%`);
    expect(plain).toContain(`${rec.blockLength} bins (rig-a-2024-01)`);
    expect(plain).toContain(`${r.datasets[1]!.measures.population_sparseness!.intervalRecord!.blockLength} bins (rig-a-2024-02)`);
    expect(plain).toContain('chosen automatically');
    expect(plain).toContain('set to zero (rectified)'); // negatives: 'rectify'
    expect(plain).toContain(`${(r.parameters as { bin_ms: number }).bin_ms} ms`);
    expect(plain).toContain(`Lacuna ${r.tool.version}`);
    expect(plain).toContain('moving-block bootstrap');
    expect(plain).toContain('percentile intervals'); // kurtosis uses the percentile method in the fixture
    expect(plain).toContain('silent bins (36, in rig-a-2024-01)'); // exclusion finding in words, with its count
    expect(plain).not.toContain('silent-bins'); // never the internal code
    expect(plain).toContain('robust standard deviations'); // events are on in the fixture
    expect(plain).toContain('window from 0 s to 30 s');
    expect(markdown).toContain('*g*₂');
    expect(plain).not.toContain('*');
  });

  it('changes when the bootstrap settings and policies change (nothing hard-coded)', () => {
    const r = activityFixture();
    eachRecord(r, (rec) => {
      rec.resamples = 4999;
      rec.seed = 31337;
      rec.level = 0.9;
      if (rec.blockLength !== null) {
        rec.blockLength = 17;
        rec.blockLengthChoice = 'set';
      }
    });
    r.parameters.negatives = 'keep';
    r.datasets[1]!.findings.push({ level: 'caution', code: 'negative-values', message: '4 negative cells, kept.', where: ['unit 2'], count: 4 });
    r.parameters.zero_tolerance = 0.001;
    r.parameters.bin_ms = 33;
    r.parameters.events = null;
    r.tool.version = '9.8.7';
    const { plain, citations } = methodsText(r);
    expect(plain).toContain('4999 resamples');
    expect(plain).toContain('seed 31337');
    expect(plain).toContain('90%');
    expect(plain).toContain('17 bins (rig-a-2024-01, set in the manifest)');
    expect(plain).toContain('kept as recorded');
    expect(plain).toContain('at most 0.001');
    expect(plain).toContain('33 ms');
    expect(plain).toContain('Lacuna 9.8.7');
    for (const old of ['2000 resamples', '20240117', '95%', '12 bins', '50 ms', 'rectified', 'robust standard deviations']) expect(plain).not.toContain(old);
    // Block lengths set by hand: the automatic-selection papers are not cited.
    expect(citations).not.toContain('politis2004');
  });

  it('describes the drift screening from the drift settings', () => {
    const r = activityFixture();
    const ewma = methodsText(r);
    expect(ewma.plain).toContain('λ = 0.2');
    expect(ewma.plain).toContain('±3σ');
    expect(ewma.plain).toContain(`${r.drift!.testsRun} tests`);
    expect(ewma.citations).toEqual(expect.arrayContaining(['roberts1959', 'holm1979', 'gilbert1987', 'theil1950', 'sen1968']));
    expect(ewma.plain).toContain('Theil–Sen slope (Theil 1950; Sen 1968)');
    r.drift!.chart = 'cusum';
    r.drift!.adjustment = 'bh';
    (r.parameters.drift as Record<string, unknown>).cusum_h = 4;
    const cusum = methodsText(r);
    expect(cusum.plain).toContain('CUSUM');
    expect(cusum.plain).toContain('H = 4σ');
    expect(cusum.citations).toEqual(expect.arrayContaining(['page1954', 'benjamini1995']));
    expect(cusum.citations).not.toContain('roberts1959');
    r.drift = null;
    expect(methodsText(r).plain).not.toContain('drift');
  });

  it('escapes user text in Markdown and keeps it verbatim in plain text', () => {
    const r = activityFixture();
    r.datasets[0]!.id = 'rig_*a*[1]';
    const { markdown, plain } = methodsText(r);
    expect(plain).toContain('rig_*a*[1]');
    expect(markdown).toContain('rig\\_\\*a\\*\\[1\\]');
    // Parentheses and pipes start no Markdown inside running text: left as they are.
    r.datasets[0]!.id = 'rig (a|b)';
    expect(methodsText(r).markdown).toContain('rig (a|b)');
  });

  it('describes a weights audit with its own settings', () => {
    const r = weightsFixture();
    const { plain } = methodsText(r);
    // Weights are the whole network, not a sample: the audit attaches no sampling interval.
    expect(plain).toContain('No bootstrap intervals were computed');
    expect(plain).toContain('all weights of a dataset taken together');
    expect(plain).toContain('Graph density');
    expect(plain).not.toContain('moving-block');
    expect(plain).not.toContain('resampled');
  });
});

describe('cautionsText', () => {
  it('lists the assumptions that apply, and only those', () => {
    const r = activityFixture();
    const c = cautionsText(r);
    expect(c.items.some((s) => s.includes('independent'))).toBe(true);
    expect(c.items.some((s) => s.includes('stationary') && s.includes('12, 9 bins'))).toBe(true);
    expect(c.items.some((s) => s.includes('screening aids'))).toBe(true);
    expect(c.items.some((s) => s.includes('human participants'))).toBe(true);
    expect(c.items.some((s) => s.includes('indicator’s kinetics'))).toBe(true);
    expect(c.markdown.split('\n').filter((l) => l.startsWith('- ')).length).toBe(c.items.length);
    const w = cautionsText(weightsFixture());
    expect(w.items.some((s) => s.includes('screening aids'))).toBe(false);
    expect(w.items.some((s) => s.includes('stationary'))).toBe(false);
    expect(w.items.some((s) => s.includes('indicator'))).toBe(false);
    expect(w.items.some((s) => s.includes('human participants'))).toBe(true);
  });

  it('says nothing about a negatives policy when no dataset had negative values', () => {
    const r = activityFixture(); // negatives: rectify, and no negative-values finding
    expect(cautionsText(r).items.some((s) => /negative/i.test(s))).toBe(false);
    expect(methodsText(r).plain).not.toMatch(/negative values/i);
    r.datasets[0]!.findings.push({ level: 'caution', code: 'negative-values', message: '2 negative cells, set to 0.', where: ['unit 1'], count: 2 });
    expect(cautionsText(r).items.some((s) => s.includes('Negative values were set to zero'))).toBe(true);
    expect(methodsText(r).plain).toContain('Negative values were set to zero (rectified)');
  });
});
