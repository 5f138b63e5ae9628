/**
 * BibTeX: every key the methods text cites has exactly one entry; entries are brace-balanced.
 */
import { describe, expect, it } from 'vitest';
import { bibtex, bibtexText } from '../../src/report/bibtex.ts';
import { WORKS, WORK_KEYS, citeText } from '../../src/report/citations.ts';
import { methodsText } from '../../src/report/methods.ts';
import type { AuditResult } from '../../src/types.ts';
import { activityFixture, weightsFixture } from '../fixtures/audit-result.ts';

/** Brace depth never below zero and back to zero at the end of every entry. */
function balanced(entry: string): boolean {
  let depth = 0;
  for (let i = 0; i < entry.length; i++) {
    const ch = entry[i];
    if (ch === '\\') { i++; continue; } // an escaped character (\{ \} \") does not count
    if (ch === '{') depth++;
    if (ch === '}') depth--;
    if (depth < 0) return false;
  }
  return depth === 0;
}

function cusumBh(): AuditResult {
  const r = activityFixture();
  r.drift!.chart = 'cusum';
  r.drift!.adjustment = 'bh';
  return r;
}

describe.each([
  ['activity', activityFixture()],
  ['activity, CUSUM + BH', cusumBh()],
  ['weights', weightsFixture()],
] as [string, AuditResult][])('methods citations of the %s fixture', (_n, result) => {
  const { plain, citations } = methodsText(result);
  const bib = bibtex(citations);

  it('cites by key, and each cited work appears in the text and once in the BibTeX', () => {
    // Weights audits cite the three measure papers (Hoyer, Hurley & Rickard, Joanes & Gill) and no
    // bootstrap work (no sampling interval); activity audits cite more.
    expect(citations.length).toBeGreaterThanOrEqual(3);
    for (const key of citations) {
      expect(plain).toContain(WORKS[key]!.short);
      expect(bib.match(new RegExp(`@\\w+\\{${key},`, 'g'))?.length).toBe(1);
    }
    // Conversely, every work whose in-text form is in the text is among the cited keys.
    for (const key of WORK_KEYS) if (plain.includes(WORKS[key]!.short)) expect(citations).toContain(key);
    expect(bib.match(/^@/gm)?.length).toBe(citations.length);
  });

  it('is brace-balanced entry by entry', () => {
    const entries = bib.split(/\n(?=@)/);
    expect(entries.length).toBe(citations.length);
    for (const e of entries) expect(balanced(e)).toBe(true);
  });
});

describe('bibtex', () => {
  it('writes every work by default with well-formed fields', () => {
    const all = bibtex();
    expect(all.match(/^@(article|book|misc)\{[a-z]+\d{4},$/gm)?.length).toBe(WORK_KEYS.length);
    for (const e of all.split(/\n(?=@)/)) {
      expect(balanced(e)).toBe(true);
      expect(e).toMatch(/\n {2}year = \{\d{4}\}/);
    }
  });

  it('writes accents and dashes the BibTeX way', () => {
    expect(bibtex(['kunsch1989'])).toContain('author = {K{\\"u}nsch, Hans R.}');
    expect(bibtex(['kunsch1989'])).toContain('pages = {1217--1241}');
    expect(bibtexText('Chapman & Hall')).toBe('Chapman \\& Hall');
  });

  it('gives DOIs only in DOI syntax', () => {
    for (const w of Object.values(WORKS)) if (w.doi) expect(w.doi).toMatch(/^10\.\d{4,9}\/\S+$/);
  });

  it('refuses unknown keys', () => {
    expect(() => bibtex(['nosuch2020'])).toThrow(/unknown citation key/);
    expect(() => citeText('nosuch2020')).toThrow(/unknown citation key/);
  });
});
