/**
 * Field validation: every problem named with file, field, value found, what is allowed and the
 * line. The allowed values and defaults are this project's choices (common practice, no source);
 * line numbers are counted by hand from BASE below.
 */
import { describe, expect, it } from 'vitest';
import { InputError, InputErrors } from '../../src/errors.ts';
import { parseManifestText } from '../../src/manifest/parse.ts';
import { editDistance, validateManifest } from '../../src/manifest/validate.ts';

// File lines: 1 ---, 2 audit, 3 title, 4 kind, 5 axis, 6 bin_ms, 7 zero_tolerance, 8 bootstrap,
// 9 datasets:, 10 - id, 11 path, 12 month, 13 group, 14 layout, 15 - id, 16 path, 17 month, 18 ---
const BASE = [
  '---',
  'audit: kc-survey',
  'title: Mushroom-body survey, 2026',
  'kind: activity',
  'axis: time',
  'bin_ms: 10',
  'zero_tolerance: 0',
  'bootstrap: { resamples: 2000, level: 0.95, method: bca, seed: 1 }',
  'datasets:',
  '  - id: m01-rig-a',
  '    path: ../data/kc/2026-01/',
  '    month: 2026-01',
  '    group: rig-a',
  '    layout: units-by-bins',
  '  - id: m02-rig-a',
  '    path: ../data/kc/2026-02/',
  '    month: 2026-02',
  '---',
  'notes',
];

/** BASE with file line `line` (1-based) replaced. */
function withLine(line: number, text: string, lines = BASE): string[] {
  const out = [...lines];
  out[line - 1] = text;
  return out;
}

function problemsOf(lines: string[], file = 'audits/kc.md'): InputError[] {
  const p = parseManifestText(lines.join('\n'), file);
  try {
    validateManifest(p.data, { file, lineOf: p.lineOf });
  } catch (err) {
    expect(err).toBeInstanceOf(InputErrors);
    return (err as InputErrors).problems;
  }
  return [];
}

describe('validateManifest', () => {
  it('the base manifest is valid', () => {
    expect(problemsOf(BASE)).toEqual([]);
  });

  // [file line, new text, field path, found (in message), allowed (in message), hint or null]
  const cases: [number, string, string, string, string, RegExp | null][] = [
    [2, 'audit: KC Survey', 'audit', '"KC Survey"', "lowercase letters, digits and '-'", null],
    [3, 'title: 2026', 'title', '2026 (a number)', 'one line of 1–200 characters', /quotes/],
    [4, 'kind: activty', 'kind', '"activty"', 'one of activity, weights', /did you mean "activity"/],
    [5, 'axis: [time]', 'axis', 'a list of 1', 'one of time, stimuli', null],
    [6, 'bin_ms: -5', 'bin_ms', '-5 (a number)', 'a number (0 < x ≤ 3,600,000)', null],
    [7, 'zero_tolerance: .nan', 'zero_tolerance', 'NaN (a number)', 'a number (x ≥ 0)', null],
    [8, 'bootstrap: { resamples: 2000, level: 1.5, method: bca, seed: 1 }', 'bootstrap.level', '1.5 (a number)', 'a number (0 < x < 1)', null],
    [8, 'bootstrap: { resamples: 99.5, level: 0.9, method: bca, seed: 1 }', 'bootstrap.resamples', '99.5 (a number)', 'an integer (100 ≤ x ≤ 1,000,000)', null],
    [8, 'bootstrap: { method: BCa, seed: 1 }', 'bootstrap.method', '"BCa"', 'one of bca, percentile', /did you mean "bca"/],
    [8, 'bootstrap: { block_length: 0 }', 'bootstrap.block_length', '0 (a number)', '`auto` or an integer ≥ 1', null],
    [8, 'bootstrap: { sed: 1 }', 'bootstrap.sed', '"sed"', 'allowed here: resamples, level, method, seed, block_length', /did you mean "seed"/],
    [8, 'bootstrap: 2000', 'bootstrap', '2000 (a number)', 'a mapping with fields resamples', null],
    [6, 'bin_sm: 10', 'bin_sm', '"bin_sm"', 'allowed here: audit, title', /did you mean "bin_ms"/],
    [6, 'seed: 10', 'seed', '"seed"', 'allowed here: audit, title', /belongs at bootstrap\.seed/],
    [12, '    month: 2026-13', 'datasets[0].month', '"2026-13"', 'a month written YYYY-MM', null],
    [17, '    month: 202602', 'datasets[1].month', '202602 (a number)', 'a month written YYYY-MM', /quotes/],
    [14, '    layout: rows', 'datasets[0].layout', '"rows"', 'one of units-by-bins, bins-by-units', null],
    [14, '    format: mat', 'datasets[0].format', '"mat"', 'one of npy, npz, csv, tsv, spikes, nwb, safetensors', null],
    [14, '    files: "**/*.npy"', 'datasets[0].files', '"**/*.npy"', "only '*' and '?'", null],
    [14, '    files: "sub/*.npy"', 'datasets[0].files', '"sub/*.npy"', "no '/'", null],
    [15, '  - id: m01-rig-a', 'datasets[1].id', '"m01-rig-a" again (also datasets[0].id)', 'an id used once', null],
    [16, '    paht: ../data/kc/2026-02/', 'datasets[1].paht', '"paht"', 'allowed here: id, path', /did you mean "path"/],
  ];
  for (const [line, text, field, found, allowed, hint] of cases) {
    it(`${field}: ${text.trim()}`, () => {
      const problems = problemsOf(withLine(line, text));
      const p = problems.find((q) => q.where === field);
      expect(p, problems.map((q) => q.message).join('\n')).toBeDefined();
      expect(p!.file).toBe('audits/kc.md');
      expect(p!.message).toContain(found);
      expect(p!.message).toContain(allowed);
      expect(p!.message.startsWith(`audits/kc.md, line ${line}, ${field}: `)).toBe(true);
      expect(p!.line).toBe(line);
      if (hint) expect(p!.hint).toMatch(hint);
    });
  }

  it('a missing required field names the field, and the line of its parent when it has none', () => {
    const lines = BASE.filter((l) => !l.startsWith('    path: ../data/kc/2026-02/'));
    const p = problemsOf(lines).find((q) => q.where === 'datasets[1].path');
    expect(p?.message).toMatch(/required field is missing/);
    expect(p?.line).toBe(15); // the `- id: m02-rig-a` item line
    const noData = problemsOf(BASE.slice(0, 8).concat(['---']));
    expect(noData.map((q) => q.where)).toEqual(['datasets']);
    expect(problemsOf(['---', 'datasets: []', '---']).map((q) => q.where)).toEqual(['datasets', 'audit', 'title']);
  });

  it('several problems are all reported at once, each with its own line, in file order', () => {
    let lines = withLine(4, 'kind: weight');
    lines = withLine(12, '    month: 26-01', lines);
    lines = withLine(6, 'bin_ms: "10"', lines);
    lines = withLine(16, '    path: 7', lines);
    lines.splice(8, 0, 'colour: blue'); // new file line 9; the datasets lines shift down by one
    const problems = problemsOf(lines);
    expect(problems.map((p) => [p.where, p.line])).toEqual([
      ['kind', 4],
      ['bin_ms', 6],
      ['colour', 9],
      ['datasets[0].month', 13],
      ['datasets[1].path', 17],
    ]);
  });

  it('cross-field checks: event window order, weights with spike/NWB formats or events', () => {
    const ev = problemsOf(withLine(7, 'events: { k: 2.5, baseline: { start_s: 5, end_s: 2 } }'));
    expect(ev.map((p) => p.where)).toEqual(['events.baseline.end_s']);
    expect(ev[0].message).toContain('greater than start_s (5)');
    const w = problemsOf(withLine(14, '    format: spikes', withLine(4, 'kind: weights', withLine(7, 'events: { k: 3 }'))));
    expect(w.map((p) => p.where).sort()).toEqual(['datasets[0].format', 'events']);
  });

  it('events: absent is null; present fills k and baseline defaults; trace or a window', () => {
    const get = (lines: string[]) => {
      const p = parseManifestText(lines.join('\n'), 'f.md');
      return validateManifest(p.data, { file: 'f.md' }).events;
    };
    expect(get(BASE)).toBeNull();
    expect(get(withLine(7, 'events: {}'))).toEqual({ k: 3, baseline: 'trace' });
    expect(get(withLine(7, 'events: { k: 2, baseline: { start_s: 0, end_s: 30 } }'))).toEqual({ k: 2, baseline: { start_s: 0, end_s: 30 } });
  });

  it('does not change its input (frozen data)', () => {
    const p = parseManifestText(BASE.join('\n'), 'f.md');
    const frozen = structuredClone(p.data);
    validateManifest(p.data, { file: 'f.md' });
    expect(p.data).toEqual(frozen);
  });
});

describe('editDistance (optimal string alignment)', () => {
  // Worked by hand: kitten→sitting = 3 (two substitutions, one insertion; Levenshtein 1966's
  // classic example); ab→ba = 1 (one adjacent transposition, Damerau 1964); ca→abc = 3 under
  // OSA (it cannot edit a transposed pair again; true Damerau distance would be 2).
  it.each([
    ['kitten', 'sitting', 3],
    ['ab', 'ba', 1],
    ['ca', 'abc', 3],
    ['', 'abc', 3],
    ['bin_sm', 'bin_ms', 1],
    ['same', 'same', 0],
  ])('%s → %s = %i', (a, b, d) => {
    expect(editDistance(a, b)).toBe(d);
    expect(editDistance(b, a)).toBe(d);
  });
});
