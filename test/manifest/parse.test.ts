/**
 * Front matter parsing: nothing in a manifest runs.
 * Sources: gray-matter 4.0.3's own `lib/engines.js` (it `eval`s `---js` blocks) and js-yaml 3's
 * README (the default `load` schema constructs `!!js/function`); the rest is common practice,
 * no source.
 */
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { createRequire } from 'node:module';
import { tmpdir } from 'node:os';
import path from 'node:path';
import matter from 'gray-matter';
import { afterEach, describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import { parseManifestText } from '../../src/manifest/parse.ts';

const g = globalThis as Record<string, unknown>;
afterEach(() => {
  delete g.__lacunaPwned;
});

function thrown(f: () => unknown): InputError {
  try {
    f();
  } catch (err) {
    expect(err).toBeInstanceOf(InputError);
    return err as InputError;
  }
  throw new Error('expected an InputError, nothing was thrown');
}

describe('code in front matter never runs', () => {
  const canaryDir = mkdtempSync(path.join(tmpdir(), 'lacuna-canary-'));
  const canaryFile = path.join(canaryDir, 'pwned');
  afterEach(() => rmSync(canaryFile, { force: true }));
  // A front matter body that, if evaluated, sets a global AND writes a file.
  const payload = `{ audit: (globalThis.__lacunaPwned = true, require('fs').writeFileSync(${JSON.stringify(canaryFile)}, 'x'), 'x') }`;

  it('the canary is live: plain gray-matter does run it (so the checks below can fail)', () => {
    // gray-matter 4.0.3 lib/engines.js: the javascript engine evals the block.
    matter(`---js\n${payload}\n---\nbody`);
    expect(g.__lacunaPwned).toBe(true);
    expect(existsSync(canaryFile)).toBe(true);
  });

  for (const tag of ['js', 'javascript', 'JS', ' js', 'coffee', 'json', 'node', 'jsLegacy']) {
    it(`---${tag} is an InputError and nothing runs`, () => {
      const e = thrown(() => parseManifestText(`---${tag}\n${payload}\n---\nbody`, 'audits/evil.md'));
      expect(e.file).toBe('audits/evil.md');
      expect(e.line).toBe(1);
      expect(e.message).toMatch(/YAML only/);
      expect(g.__lacunaPwned).toBeUndefined();
      expect(existsSync(canaryFile)).toBe(false);
    });
  }

  it('--- yaml and --- yml tags are accepted (the same YAML, nothing else)', () => {
    expect(parseManifestText('--- yaml\naudit: a\n---\n', 'f.md').data).toEqual({ audit: 'a' });
    expect(parseManifestText('---yml\naudit: a\n---\n', 'f.md').data).toEqual({ audit: 'a' });
  });

  it('the js-yaml that gray-matter ships would construct !!js/function with its default schema (canary is live)', () => {
    // js-yaml 3 README: `load` uses DEFAULT_FULL_SCHEMA, which has !!js/function.
    const req = createRequire(createRequire(import.meta.url).resolve('gray-matter'));
    const yaml3 = req('js-yaml') as { load(s: string): unknown };
    const data = yaml3.load('audit: !!js/function "function () { globalThis.__lacunaPwned = true }"') as { audit: unknown };
    expect(typeof data.audit).toBe('function');
  });

  const tags = [
    ['!!js/function', 'audit: !!js/function "function () { globalThis.__lacunaPwned = true; return 1 }"'],
    ['!!js/undefined', 'audit: !!js/undefined ""'],
    ['!!js/regexp', 'audit: !!js/regexp /x/'],
    ['verbatim js/function', 'audit: !<tag:yaml.org,2002:js/function> "function () { globalThis.__lacunaPwned = true }"'],
    ['a custom tag', 'audit: !pwn "x"'],
    ['!!binary', 'audit: !!binary aGVsbG8='],
  ];
  for (const [name, line] of tags) {
    it(`${name} is refused with the line, and nothing is constructed`, () => {
      const e = thrown(() => parseManifestText(`---\ntitle: t\n${line}\n---\n`, 'f.md'));
      expect(e.message).toMatch(/unknown tag/);
      expect(e.line).toBe(3); // the tagged value is on file line 3
      expect(g.__lacunaPwned).toBeUndefined();
    });
  }

  it('YAML anchors, aliases and merge keys are refused', () => {
    const e = thrown(() => parseManifestText('---\nbase: &b { seed: 1 }\nbootstrap:\n  <<: *b\n---\n', 'f.md'));
    expect(e.message).toMatch(/anchor &b/);
    expect(e.line).toBe(2);
    const e2 = thrown(() => parseManifestText('---\ntitle: &t "x"\naudit: *t\n---\n', 'f.md'));
    expect(e2.message).toMatch(/anchor &t/);
  });
});

describe('front matter shape', () => {
  it('no front matter, unclosed, oversized, not a mapping', () => {
    expect(thrown(() => parseManifestText('# Notes only\n', 'f.md')).message).toMatch(/no front matter/);
    expect(thrown(() => parseManifestText('', 'f.md')).message).toMatch(/no front matter/);
    expect(thrown(() => parseManifestText('----\naudit: a\n----\n', 'f.md')).message).toMatch(/no front matter/);
    expect(thrown(() => parseManifestText('---\naudit: a\n', 'f.md')).message).toMatch(/not closed/);
    const big = `---\ntitle: "${'x'.repeat(256 * 1024)}"\n---\n`;
    expect(thrown(() => parseManifestText(big, 'f.md')).message).toMatch(/at most 262144 bytes/);
    expect(thrown(() => parseManifestText('---\n- a\n- b\n---\n', 'f.md')).message).toMatch(/a list; allowed: a mapping/);
    expect(thrown(() => parseManifestText('---\njust text\n---\n', 'f.md')).message).toMatch(/a single value/);
  });

  it('a YAML syntax error names the file line (counted by hand)', () => {
    // File line 3 is the wrongly indented `  title: t`.
    const ind = thrown(() => parseManifestText('---\naudit: a\n  title: t\n---\n', 'audits/x.md'));
    expect(ind.message).toBe('audits/x.md, line 3: YAML error: bad indentation of a mapping entry');
    const e = thrown(() => parseManifestText('---\naudit: a\ntitle: t\nbin_ms: [1, 2\nkind: activity\n---\n', 'audits/x.md'));
    expect(e.message).toMatch(/^audits\/x\.md, line \d+: YAML error/);
    // js-yaml reports an unclosed flow sequence where it gives up: on or after line 4.
    expect(e.line).toBeGreaterThanOrEqual(4);
    const dup = thrown(() => parseManifestText('---\naudit: a\naudit: b\n---\n', 'f.md'));
    expect(dup.message).toMatch(/duplicated mapping key/);
    expect(dup.line).toBe(3);
  });

  it('keeps the body, strips a BOM, handles CRLF, and the core schema keeps YYYY-MM as text', () => {
    const p = parseManifestText('\ufeff---\r\naudit: a\r\nmonth: 2026-01\r\nday: 2026-01-15\r\n---\r\nNotes here.\r\n', 'f.md');
    expect(p.data).toEqual({ audit: 'a', month: '2026-01', day: '2026-01-15' });
    expect(p.body).toBe('Notes here.\r\n');
    expect(p.lineOf('month')).toBe(3);
  });

  it('a __proto__ key stays an own key (seen by validation), and Object.prototype is untouched', () => {
    const p = parseManifestText('---\n__proto__: { polluted: 1 }\n---\n', 'f.md');
    expect(Object.keys(p.data as object)).toEqual(['__proto__']);
    expect(({} as Record<string, unknown>).polluted).toBeUndefined();
  });
});

describe('lineOf (text-search approximation)', () => {
  // File lines counted by hand:   1 ---, 2 audit, 3 # comment, 4 bootstrap (flow), 5 drift:,
  // 6 chart, 7 datasets:, 8 - id a, 9 path, 10 - id b, 11 # c, 12 month, 13 - { id: c, month: … }, 14 ---
  const text = [
    '---', 'audit: x', '# a comment: month: 1', 'bootstrap: { resamples: 2000, seed: 1 }', 'drift:', '  chart: ewma',
    'datasets:', '  - id: a', '    path: p', '  - id: b', '    # c', '    month: 2026-13',
    '  - { id: c, month: 2026-02 }', '---', 'notes',
  ].join('\n');
  const p = parseManifestText(text, 'f.md');
  const cases: [string, number | undefined][] = [
    ['audit', 2], ['bootstrap.seed', 4], ['bootstrap.resamples', 4], ['drift.chart', 6], ['datasets', 7],
    ['datasets[0].path', 9], ['datasets[1]', 10], ['datasets[1].month', 12], ['datasets[2].month', 13],
    // Not present: the nearest ancestor's line, or undefined.
    ['datasets[1].group', 10], ['datasets[5].id', 7], ['drift.adjust', 5], ['title', undefined],
  ];
  for (const [field, line] of cases) it(`${field} → ${line}`, () => expect(p.lineOf(field)).toBe(line));

  it('block sequences at the same indent as their key', () => {
    const q = parseManifestText('---\ndatasets:\n- id: a\n  month: x\n- id: b\n  month: y\n---\n', 'f.md');
    expect(q.lineOf('datasets[1].month')).toBe(6);
  });
});
