/**
 * The command line refuses what it would otherwise ignore, and its help comes from the one
 * table of options (src/cli/commands.ts): extra arguments are named, `-v` and `version` print
 * the version, every option of every command is in its help, `compare` on a misspelled audit
 * says there is no such audit and lists those there are.
 * Run from temporary folders outside the repository.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { mkdirSync, readFileSync, symlinkSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { COMMANDS } from '../../src/cli/commands.ts';
import { cleanUp, lacuna, tempDir } from './run.ts';

afterAll(cleanUp);

const PACKAGE_VERSION = (JSON.parse(readFileSync(resolve(__dirname, '../../package.json'), 'utf8')) as { version: string }).version;

describe('arguments', () => {
  let ws: string;
  beforeAll(() => {
    ws = join(tempDir(), 'lab');
    expect(lacuna(['init', ws, '--quiet']).status).toBe(0);
  });

  it('extra arguments are refused (exit 2), each named', () => {
    const check = lacuna(['check', 'audits/kc-survey.md'], ws);
    expect(check.status).toBe(2);
    expect(check.stderr).toContain('unexpected argument "audits/kc-survey.md"');
    expect(check.stderr).not.toContain('no problems');
    const build = lacuna(['build', 'now', 'please', '--workspace', ws]);
    expect(build.status).toBe(2);
    expect(build.stderr).toContain('unexpected arguments "now" "please"');
    const init = lacuna(['init', 'a', 'b']);
    expect(init.status).toBe(2);
    expect(init.stderr).toContain('unexpected argument "b"');
    const compare = lacuna(['compare', 'kc-survey', 'v001', 'v002', 'v003'], ws);
    expect(compare.status).toBe(2);
    expect(compare.stderr).toContain('"v003"');
    const serve = lacuna(['serve', 'site'], ws);
    expect(serve.status).toBe(2);
    expect(serve.stderr).toContain('"site"');
  });

  it('control characters in a refused argument are shown escaped, not sent to the terminal', () => {
    const r = lacuna(['check', 'x\u001b[2Jy'], ws);
    expect(r.status).toBe(2);
    expect(r.stderr).toContain('"x\\x1b[2Jy"');
    expect(r.stderr).not.toContain('\u001b');
  });

  it('-v, version and --version print the version from package.json', () => {
    for (const flag of ['-v', 'version', '--version']) {
      const r = lacuna([flag]);
      expect(r.status, flag).toBe(0);
      expect(r.stdout, flag).toMatch(new RegExp(`^${PACKAGE_VERSION.replace(/\./g, '\\.')} \\(`));
    }
  });

  it('help for each command lists every option of the table, in its usage line and its option list', () => {
    for (const [name, spec] of Object.entries(COMMANDS)) {
      const r = lacuna(['help', name]);
      expect(r.status, name).toBe(0);
      const usageLine = r.stdout.split('\n')[0];
      for (const arg of spec.args) expect(usageLine, `${name} ${arg}`).toContain(arg);
      for (const flag of Object.keys(spec.flags)) {
        expect(usageLine, `${name} --${flag}`).toContain(`[--${flag}`);
        expect(r.stdout, `${name} --${flag}`).toMatch(new RegExp(`\\n  --${flag}\\b`));
      }
    }
    // The case that drifted: build's --workers.
    expect(lacuna(['help', 'build']).stdout.split('\n')[0]).toContain('[--workers N]');
  });

  it('compare on a misspelled audit says there is no such audit and lists the audits there are', () => {
    const r = lacuna(['compare', 'kc-survy', 'v001', 'v002'], ws);
    expect(r.status).toBe(1);
    expect(r.stderr).toContain('no such audit "kc-survy"');
    expect(r.stderr).toContain('kc-imaging, kc-survey, pruned-net');
    expect(r.stderr).not.toContain('has no version');
    // A broken link among the records is no audit, and no internal error.
    mkdirSync(join(ws, 'records'), { recursive: true });
    symlinkSync(join(ws, 'nowhere'), join(ws, 'records', 'ghost'));
    const ghost = lacuna(['compare', 'kc-survy', 'v001', 'v002'], ws);
    expect(ghost.status).toBe(1);
    expect(ghost.stderr).toContain('audits there: kc-imaging, kc-survey, pruned-net)');
    // A known audit without versions still says to build first.
    const known = lacuna(['compare', 'kc-survey', 'v001', 'v002'], ws);
    expect(known.stderr).toContain('no version v001');
    expect(known.stderr).toContain('lacuna build');
  });
});
