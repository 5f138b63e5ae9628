/**
 * The memory budget (src/readers/memory-budget.ts) on spike tables: a 27-byte table whose one
 * late spike makes 2·10⁹ bins is refused at that row, in a child process with a memory cap
 * (before the budget it was killed by the kernel at 24 GB), and a `# duration_s:` line that
 * makes too many bins is refused by `check` and `build` with the same message.
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { totalmem, tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { InputError } from '../../src/errors.ts';
import { BYTES_PER_BIN, BYTES_PER_UNIT, checkActivityShape, maxBinsFor, memoryBudget } from '../../src/readers/memory-budget.ts';
import { runLacunaCapped } from './capped-run.ts';

let root = '';
beforeAll(() => {
  root = mkdtempSync(join(tmpdir(), 'lacuna-budget-'));
});
afterAll(() => rmSync(root, { recursive: true, force: true }));

function workspace(name: string, table: string): string {
  const ws = join(root, name);
  mkdirSync(join(ws, 'audits'), { recursive: true });
  mkdirSync(join(ws, 'data'), { recursive: true });
  writeFileSync(join(ws, 'data', 'spikes.csv'), table);
  writeFileSync(join(ws, 'audits', `${name}.md`), `---\naudit: ${name}\ntitle: t\nkind: activity\naxis: time\nbin_ms: 10\ndatasets:\n  - { id: d1, path: ../data/spikes.csv, format: spikes, month: 2026-01 }\n---\nx\n`);
  return ws;
}

describe('memory budget', { timeout: 150_000 }, () => {
  it('is a quarter of physical memory, and refuses one byte past it', () => {
    // The rule as documented: units × 512 B + bins × 256 B ≤ totalmem / 4 (os.totalmem from Node).
    expect(memoryBudget()).toBe(Math.floor(totalmem() / 4));
    const bins = maxBinsFor(1000);
    expect(bins).toBe(Math.floor((Math.floor(totalmem() / 4) - 1000 * BYTES_PER_UNIT) / BYTES_PER_BIN));
    expect(() => checkActivityShape({ units: 1000, bins, binMs: 10, file: 'f', where: 'w' })).not.toThrow();
    expect(() => checkActivityShape({ units: 1000, bins: bins + 1, binMs: 10, file: 'f', where: 'w' })).toThrow(InputError);
  });

  it('a 27-byte spike table with a spike at 2·10⁷ s is refused at its row, within 1.5 GB', async () => {
    const table = 'unit,time\na,0.5\na,20000000\n';
    expect(Buffer.byteLength(table)).toBe(27);
    const ws = workspace('late-spike', table);
    const r = await runLacunaCapped(['build', '--workspace', ws, '--out', join(root, 'site')]);
    expect(r.killed).toBeNull();
    expect(r.code, r.stderr).toBe(1);
    expect(r.stderr).toMatch(/data\/spikes\.csv, row 3, column 2: \d+ bins of 10 ms would need about \d+ GB/);
    expect(r.stderr).toMatch(/raise bin_ms to \d+ or more/);
  });

  it('check and build refuse a duration_s that passes the budget with the same message', async () => {
    // 10^7 s at 10 ms is 10^9 bins (under the 2^31 cap): 256 GB at 256 B a bin, past the quarter
    // of any machine with less than 1 TB of memory. (The bin count printed is 999999999: the
    // edge tolerance in spikes.ts takes one bin off at this scale; that is not checked here.)
    const ws = workspace('long-duration', '# duration_s: 10000000\nunit,time\na,0.5\n');
    const check = await runLacunaCapped(['check', '--workspace', ws]);
    const build = await runLacunaCapped(['build', '--workspace', ws, '--out', join(root, 'site2')]);
    const line = (s: string) => /data\/spikes\.csv, row 1: .*/.exec(s)?.[0];
    expect(check.code).toBe(1);
    expect(build.code).toBe(1);
    expect(line(check.stderr)).toMatch(/ \d{9,10} bins of 10 ms would need about 256 GB/);
    expect(line(build.stderr)).toBe(line(check.stderr));
  });
});
