/**
 * A missing `}` or `]` in a manifest's front matter is reported on the line where the flow
 * collection opened (and the line where the YAML parser gave up), not only on the later line
 * the parser names; a closed collection keeps the parser's own line. `check` is run from a
 * temporary folder outside the repository, as a user runs it.
 */
import { describe, it, expect, afterAll } from 'vitest';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { parseManifestText } from '../../src/manifest/parse.ts';
import { cleanUp, lacuna, tempDir } from './run.ts';

afterAll(cleanUp);

describe('an unclosed flow mapping in a manifest', () => {
  const manifest = [
    '---', // line 1
    'audit: x',
    'title: T',
    'kind: activity',
    'bootstrap: { resamples: 2000, level: 0.95', // line 5: the `}` is missing
    'datasets:', // line 6: where the YAML parser gives up
    '  - { id: a, path: a.npy }',
    '---',
    '',
  ].join('\n');

  it('check reports the line where it opened and the line where the parser gave up', () => {
    const cwd = tempDir();
    mkdirSync(join(cwd, 'audits'));
    writeFileSync(join(cwd, 'audits', 'x.md'), manifest);
    const r = lacuna(['check'], cwd);
    expect(r.status).toBe(1);
    expect(r.stderr).toMatch(/audits\/x\.md, line 5: .*flow mapping `\{` opened on line 5 is not closed; the parser gave up on line 6/);
  });

  it('a missing `}` in a dataset item names that item’s line', () => {
    const text = '---\naudit: x\ndatasets:\n  - { id: a, path: a.npy\n  - { id: b, path: b.npy }\nbin_ms: 10\n---\n';
    expect(() => parseManifestText(text, 'x.md')).toThrow(/^x\.md, line 4: .*opened on line 4 is not closed; the parser gave up on line 5/);
  });

  it('a mapping that is closed keeps the parser’s own line (no false report)', () => {
    const text = '---\naudit: x\nbootstrap: { resamples: 2000 level: 0.95 }\ntitle: "a { b"\n---\n';
    let message = '';
    try {
      parseManifestText(text, 'x.md');
    } catch (err) {
      message = (err as Error).message;
    }
    expect(message).toMatch(/^x\.md, line 3: YAML error/);
    expect(message).not.toContain('not closed');
  });

  it('an unclosed `[` is named as a flow sequence', () => {
    const text = "---\naudit: x\nfiles: ['a.npy', 'b.npy'\nkind: activity\n---\n";
    expect(() => parseManifestText(text, 'x.md')).toThrow(/line 3: .*flow sequence `\[` opened on line 3 is not closed/);
  });
});
