/**
 * No control character from user text reaches the terminal. The characters are those ECMA-48
 * (5th ed., 1991) defines as C0 and C1 controls, DEL, and the Unicode bidirectional formatting
 * characters (Unicode Standard Annex #9; the "Trojan Source" set, Boucher & Anderson 2021),
 * listed here from those documents (from memory of their tables).
 *
 * End to end: `lacuna check` on a data file whose name holds a screen-clear and a window-title
 * sequence prints the name with the escapes made visible and no ESC or BEL byte.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { InputError, causeChain } from '../../src/errors.ts';
import { createProgress } from '../../src/cli/progress.ts';
import { safeTerminal, safeTerminalLine } from '../../src/text/safe-terminal.ts';

const CONTROLS = [
  ...Array.from({ length: 0x20 }, (_, i) => i).filter((c) => c !== 0x09 && c !== 0x0a),
  0x7f,
  ...Array.from({ length: 0x20 }, (_, i) => 0x80 + i),
  0x061c, 0x200e, 0x200f, 0x202a, 0x202b, 0x202c, 0x202d, 0x202e, 0x2066, 0x2067, 0x2068, 0x2069,
].map((c) => String.fromCharCode(c));
const hasUnsafe = (s: string) => CONTROLS.some((c) => s.includes(c));

describe('safeTerminal', () => {
  it('replaces every control and bidirectional control by a visible escape; keeps tab, accents, CJK', () => {
    for (const c of CONTROLS) {
      const out = safeTerminal(`a${c}b`);
      expect(hasUnsafe(out)).toBe(false);
      expect(out.length).toBeGreaterThan(3);
    }
    expect(safeTerminal('\x1b[2J')).toBe('\\x1b[2J');
    expect(safeTerminal('x\u202Ey')).toBe('x\\u{202e}y');
    expect(safeTerminal('tab\there, é, 神経')).toBe('tab\there, é, 神経');
    expect(safeTerminal('two\nlines')).toBe('two\nlines');
    expect(safeTerminalLine('two\nlines')).toBe('two\\nlines');
  });

  it('InputError messages, cause chains and progress lines carry no control characters', () => {
    const evil = 'data/a\x1b]0;owned\x07\x1b[2J.npy';
    const err = new InputError(`cannot read ${evil}`, { file: evil, where: 'row\r1', hint: 'x\x9by', cause: new Error(`ENOENT ${evil}`) });
    expect(hasUnsafe(err.message)).toBe(false);
    expect(err.message).toContain('data/a\\x1b]0;owned\\x07\\x1b[2J.npy');
    expect(causeChain(err).some(hasUnsafe)).toBe(false);
    const written: string[] = [];
    const p = createProgress({ stream: { isTTY: false, write: (s: string) => written.push(s) } });
    p.info(`reading ${evil}`);
    const step = p.step(`hashing ${evil}`, 1);
    step.done(evil);
    expect(written.join('').replace(/\n/g, '')).not.toMatch(/[\x00-\x1f\x7f-\x9f]/);
  });
});

describe('lacuna check prints a hostile file name escaped', () => {
  const root = mkdtempSync(join(tmpdir(), 'lacuna-term-'));
  afterAll(() => rmSync(root, { recursive: true, force: true }));
  it('no ESC or BEL byte in the output; the name is shown with visible escapes', () => {
    const ws = join(root, 'lab');
    mkdirSync(join(ws, 'audits'), { recursive: true });
    mkdirSync(join(ws, 'data'));
    const name = 'evil\x1b[2J\x1b]0;title\x07.npy';
    writeFileSync(join(ws, 'data', name), 'not an npy file');
    writeFileSync(join(ws, 'audits', 'a.md'), '---\naudit: a\ntitle: a\nkind: activity\naxis: time\nbin_ms: 10\ndatasets:\n  - { id: d, path: ../data }\n---\n');
    const r = spawnSync(process.execPath, [resolve('bin/lacuna.mjs'), 'check', '--workspace', ws], { encoding: 'utf8', timeout: 120_000, env: { ...process.env, NO_COLOR: '1' } });
    expect(r.status).toBe(1);
    const out = r.stdout + r.stderr;
    expect(out).not.toMatch(/[\x1b\x07]/);
    expect(out).toContain('evil\\x1b[2J\\x1b]0;title\\x07.npy');
  }, 120_000);
});
