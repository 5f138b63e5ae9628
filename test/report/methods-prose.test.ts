/**
 * The methods paragraph as a manuscript would take it, checked on the demo's three audits (built
 * from the seeded demo scenario into a temporary workspace) and on the hand-made fixtures:
 * parentheses balance, no doubled punctuation, no Markdown backslash escapes, no internal finding
 * codes, and no sentence about a negatives policy when no dataset had a negative value.
 * (Rules of ordinary English punctuation, common practice, no source.)
 */
import { mkdtemp, readFile, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildWorkspace } from '../../src/audit/build.ts';
import { createProgress } from '../../src/cli/progress.ts';
import { makeDemo } from '../../src/demo/scenario.ts';
import { hadNegatives, methodsText } from '../../src/report/methods.ts';
import type { AuditResult } from '../../src/types.ts';
import { activityFixture, weightsFixture } from '../fixtures/audit-result.ts';

/** Every way the text can read wrong that a check can see; returns the problems found. */
function proseProblems(result: AuditResult): string[] {
  const { markdown, plain } = methodsText(result);
  const codes = result.datasets.flatMap((d) => d.findings.map((f) => f.code));
  const out = [...textProblems('plain', plain, codes), ...textProblems('markdown', markdown, codes)];
  if (!hadNegatives(result) && /negative values/i.test(plain)) out.push('a negatives policy is stated, but no dataset had negative values');
  return out;
}

function textProblems(name: string, text: string, codes: string[]): string[] {
  const out: string[] = [];
  let depth = 0;
  for (const ch of text) {
    if (ch === '(') depth++;
    if (ch === ')') depth--;
    if (depth < 0) break;
  }
  if (depth !== 0) out.push(`${name}: parentheses do not balance (${depth})`);
  const doubled = text.match(/[.,;:]\s*[.,;:]|\.\)|\(\s*\)|\s[.,;:]/g);
  if (doubled) out.push(`${name}: doubled or stray punctuation ${JSON.stringify(doubled)}`);
  for (const c of codes) if (text.includes(c)) out.push(`${name}: finding code ${c}`);
  if (/\\/.test(text)) out.push(`${name}: backslash escape ${JSON.stringify(text.match(/.{0,20}\\.{0,20}/)?.[0])}`);
  return out;
}

let tmp = '';
const demo = new Map<string, AuditResult>();

beforeAll(async () => {
  tmp = await mkdtemp(join(tmpdir(), 'lacuna-methods-demo-'));
  makeDemo(join(tmp, 'ws'));
  await buildWorkspace({ workspace: join(tmp, 'ws'), out: join(tmp, 'site'), progress: createProgress({ quiet: true }) });
  for (const audit of ['kc-survey', 'kc-imaging', 'pruned-net']) {
    demo.set(audit, JSON.parse(await readFile(join(tmp, 'site', audit, 'v001', 'results.json'), 'utf8')) as AuditResult);
  }
}, 240_000);

afterAll(async () => {
  if (tmp) await rm(tmp, { recursive: true, force: true });
});

describe('methods text of the demo reads as prose', () => {
  for (const audit of ['kc-survey', 'kc-imaging', 'pruned-net']) {
    it(audit, () => {
      expect(proseProblems(demo.get(audit)!)).toEqual([]);
    });
  }

  it('kc-survey (spike counts, no negative values) states no negatives policy; methods.txt is the plain text', async () => {
    const r = demo.get('kc-survey')!;
    expect(hadNegatives(r)).toBe(false);
    expect(methodsText(r).plain).not.toMatch(/negative values/i);
    const txt = await readFile(join(tmp, 'site', 'kc-survey', 'v001', 'methods.txt'), 'utf8');
    expect(txt.trim()).toBe(methodsText(r).plain.trim());
  });
});

describe('methods text of the fixtures reads as prose', () => {
  it('activity fixture (no negative values) and weights fixture', () => {
    const a = activityFixture();
    expect(hadNegatives(a)).toBe(false);
    expect(a.parameters.negatives).toBe('rectify'); // a policy was set, but had nothing to do
    expect(proseProblems(a)).toEqual([]);
    expect(proseProblems(weightsFixture())).toEqual([]);
  });

  it('the checks catch the faults of the text as it was before (each on its own)', () => {
    // Text the demo's methods.md held before this change, shortened.
    const pooled = 'Monthly estimates (6 months; Datasets are pooled \\(for kurtosis, a weighted mean approximates the pooled median\\).) were screened.';
    const problems = textProblems('markdown', pooled, []);
    expect(problems.some((p) => p.includes('doubled or stray punctuation'))).toBe(true);
    expect(problems.some((p) => p.includes('backslash escape'))).toBe(true);
    expect(textProblems('plain', 'Data left out: m01-rig-a, kurtosis-too-few-nonzero (3): 3 units.', ['kurtosis-too-few-nonzero'])).toEqual(['plain: finding code kurtosis-too-few-nonzero']);
    expect(textProblems('plain', 'one (two (three).', [])).toEqual(['plain: parentheses do not balance (1)']);
    const kept = activityFixture();
    kept.parameters.negatives = 'keep';
    kept.datasets[0]!.findings = [];
    // A result with no negative values must not state a policy; proseProblems sees one if it is there.
    expect(proseProblems(kept)).toEqual([]);
  });
});
