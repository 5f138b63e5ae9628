/**
 * The site-wide words in `_data/` (Eleventy's global data folder): JSON only, the README's
 * measure table generated from the same glossary the pages use, a level for every level the
 * code knows, and words for every finding code the code can emit.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { findingKind, readmeMeasureTable, siteData } from '../../src/report/site-data.ts';
import { WORKS } from '../../src/report/citations.ts';
import { FINDING_LEVELS } from '../../src/types.ts';

function* files(dir: string): Generator<string> {
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) yield* files(p);
    else yield p;
  }
}

describe('_data/', () => {
  it('holds only JSON files, each of which parses (no executable .js data files)', () => {
    const all = [...files('_data')];
    expect(all.length).toBeGreaterThan(0);
    for (const f of all) {
      expect(f, 'only .json in _data').toMatch(/\.json$/);
      expect(() => JSON.parse(readFileSync(f, 'utf8')), f).not.toThrow();
    }
  });

  it('the README measure table is the one generated from _data/measures.json', () => {
    const readme = readFileSync('README.md', 'utf8');
    const at = readme.indexOf('| measure | formula | source |');
    const table = readme.slice(at, readme.indexOf('\n\n', at));
    expect(table).toBe(readmeMeasureTable());
  });

  it('every glossary citation is a known work; every level the code knows has its meaning', () => {
    for (const g of siteData().measures.glossary) for (const k of g.citations) expect(WORKS[k], `${g.term}: ${k}`).toBeDefined();
    expect([...siteData().levels.order].sort()).toEqual([...FINDING_LEVELS].sort());
    for (const l of FINDING_LEVELS) expect(siteData().levels.levels[l].meaning.length).toBeGreaterThan(20);
  });

  it('every finding code emitted in src/ has words (no code shown as a kind)', () => {
    const codes = new Set<string>();
    for (const f of files('src')) {
      if (!/\.ts$/.test(f)) continue;
      const text = readFileSync(f, 'utf8');
      for (const m of text.matchAll(/code: '([a-z0-9-]+)'/g)) codes.add(m[1]!);
      for (const m of text.matchAll(/add\('(?:exclude|caution|notice)', '([a-z0-9-]+)'/g)) codes.add(m[1]!);
    }
    expect(codes.size).toBeGreaterThan(15);
    const missing = [...codes].filter((c) => !(c in siteData().findings.kinds));
    expect(missing).toEqual([]);
    expect(findingKind('duplicate-units')).toBe('duplicated units');
  });
});
