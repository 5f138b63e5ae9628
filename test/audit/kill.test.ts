/**
 * Builds killed (SIGKILL, in a child process: test/helpers/kill-child.ts) at each step that
 * writes: the workspace lock, the record, a version's temporary folder, the rename of the version into place, the
 * index pages, the site state. After every one, the next plain build must leave the site showing
 * what the records say (the same index pages and results as a site rendered afresh from the
 * records), no leftovers in `records/` or the site, and the earlier version untouched.
 */
import { describe, it, expect, afterAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, relative, resolve } from 'node:path';
import { writeNpy } from '../../src/readers/npy-write.ts';
import { createRandom } from '../../src/stats/random.ts';
import { buildWorkspace, renderSite } from '../../src/audit/build.ts';
import { listVersions, readRecord } from '../../src/audit/versions.ts';
import { createProgress } from '../../src/cli/progress.ts';

const quiet = createProgress({ quiet: true });
const ROOT = resolve(import.meta.dirname, '../..');
const CHILD = join(ROOT, 'test/helpers/kill-child.ts');
const made: string[] = [];
afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});

function workspace(): { ws: string; out: string } {
  const ws = mkdtempSync(join(tmpdir(), 'lacuna-kill-'));
  made.push(ws);
  mkdirSync(join(ws, 'audits'));
  mkdirSync(join(ws, 'data'));
  for (const i of [1, 2]) {
    const rng = createRandom(70 + i);
    writeNpy(join(ws, 'data', `m${i}.npy`), new Float32Array(8 * 200).map(() => (rng.next() < 0.2 ? 1 + rng.int(3) : 0)), [8, 200]);
  }
  const rows = [1, 2].map((i) => `  - { id: d${i}, path: ../data/m${i}.npy, month: 2026-0${i} }`).join('\n');
  writeFileSync(join(ws, 'audits', 'a.md'), `---\naudit: fixture\ntitle: Kill fixture\nbin_ms: 10\nmin_bins: 50\nbootstrap: { resamples: 100, level: 0.9, method: percentile, seed: 5 }\ndatasets:\n${rows}\n---\n`);
  return { ws, out: join(ws, '_site') };
}

function changeOneByte(ws: string): void {
  const f = join(ws, 'data', 'm1.npy');
  const b = readFileSync(f);
  b[b.length - 1] ^= 0x01;
  writeFileSync(f, b);
}

function files(dir: string): Map<string, string> {
  const out = new Map<string, string>();
  const walk = (d: string) => {
    for (const f of readdirSync(d)) {
      const p = join(d, f);
      if (statSync(p).isDirectory()) walk(p);
      else out.set(relative(dir, p), readFileSync(p, 'utf8'));
    }
  };
  walk(dir);
  return out;
}

/** Run a build in a child process that kills itself at `at`; the kill must have happened. */
function killedBuild(ws: string, out: string, at: { fn: string; match: string; when: 'before' | 'after' }): void {
  const r = spawnSync(process.execPath, ['--max-old-space-size=512', '--import', 'tsx', CHILD, ws, out], {
    cwd: ROOT,
    env: { ...process.env, NO_COLOR: '1', KILL_AT: JSON.stringify(at) },
    encoding: 'utf8',
  });
  expect(r.signal, `the child was not killed at ${JSON.stringify(at)}: exit ${r.status}\n${r.stderr}`).toBe('SIGKILL');
}

/** The site shows what the records say: the same index pages and results as a fresh render. */
async function expectConverged(ws: string, out: string): Promise<void> {
  const versions = listVersions(ws, 'fixture').map((v) => v.version);
  const newest = versions[versions.length - 1];
  const fresh = mkdtempSync(join(tmpdir(), 'lacuna-fresh-'));
  made.push(fresh);
  await renderSite(fresh, ws, ['fixture'], quiet);
  const got = files(out);
  const want = files(fresh);
  for (const page of ['index.html', 'fixture/index.html', 'fixture/latest/index.html']) expect(got.get(page), page).toBe(want.get(page));
  expect(got.get('fixture/latest/index.html')).toContain(`../${newest}/index.html`);
  expect(got.get('index.html')).toContain(`fixture/${newest}/index.html`);
  for (const v of versions) {
    expect(got.get(`fixture/${v}/results.json`), v).toBe(want.get(`fixture/${v}/results.json`));
    expect(JSON.parse(got.get(`fixture/${v}/results.json`)!)).toEqual(readRecord(ws, 'fixture', v).result);
  }
  // No leftovers anywhere.
  expect([...got.keys()].filter((p) => p.includes('.tmp-'))).toEqual([]);
  expect(readdirSync(out).filter((p) => p.includes('.tmp'))).toEqual([]);
  expect(readdirSync(join(out, 'fixture')).filter((p) => p.startsWith('.'))).toEqual([]);
  expect(readdirSync(join(ws, 'records', 'fixture')).filter((f) => !/^v\d{3}\.json$/.test(f))).toEqual([]);
}

/** v001 built, one byte changed, a build killed at `at`, then a plain build. */
async function scenario(at: { fn: string; match: string; when: 'before' | 'after' }, afterKill?: (ws: string, out: string) => void) {
  const { ws, out } = workspace();
  await buildWorkspace({ workspace: ws, out, progress: quiet, workers: '1' });
  const v001 = files(join(out, 'fixture', 'v001'));
  changeOneByte(ws);
  killedBuild(ws, out, at);
  afterKill?.(ws, out);
  const s = await buildWorkspace({ workspace: ws, out, progress: quiet, workers: '1' });
  expect(s.audits.map((a) => a.version)).toEqual(['v002']);
  expect(files(join(out, 'fixture', 'v001'))).toEqual(v001);
  await expectConverged(ws, out);
  return { ws, out, summary: s };
}

describe('a build killed part-way, then built again', () => {
  it('killed just after v002/ is renamed into place: the indexes and latest/ move to v002', async () => {
    const { summary } = await scenario({ fn: 'renameSync', match: '/fixture/v002$', when: 'after' }, (ws, out) => {
      // The kill came where intended: the record and the pages exist, the indexes still say v001.
      expect(existsSync(join(out, 'fixture', 'v002', 'index.html'))).toBe(true);
      expect(readFileSync(join(out, 'fixture', 'latest', 'index.html'), 'utf8')).toContain('../v001/index.html');
    });
    expect(summary.audits[0].reused).toBe(true);
  });

  it('killed between the audit index and the site index: the site index moves to v002', async () => {
    await scenario({ fn: 'writeFileSync', match: '_site/index\\.html$', when: 'before' }, (ws, out) => {
      expect(readFileSync(join(out, 'fixture', 'latest', 'index.html'), 'utf8')).toContain('../v002/index.html');
      expect(readFileSync(join(out, 'index.html'), 'utf8')).not.toContain('fixture/v002/index.html');
    });
  });

  it('killed before the site state is written: the next build still ends converged', async () => {
    await scenario({ fn: 'renameSync', match: '\\.lacuna-site\\.json$', when: 'before' });
  });

  it('killed while v002 is being rendered: the partial .tmp-v002-PID/ is removed', async () => {
    await scenario({ fn: 'mkdirSync', match: '/fixture/\\.tmp-v002-\\d+$', when: 'after' }, (ws, out) => {
      expect(readdirSync(join(out, 'fixture')).filter((f) => f.startsWith('.tmp-v002-')).length).toBe(1);
    });
  });

  it('killed while holding the workspace lock: the dead holder\'s lock is freed by the next build', async () => {
    await scenario({ fn: 'linkSync', match: '\\.lacuna-cache/build\\.lock$', when: 'after' }, (ws) => {
      expect(existsSync(join(ws, '.lacuna-cache', 'build.lock'))).toBe(true);
    });
  });

  it('killed before the record is linked into place: the temporary record (and a truncated one) are removed', async () => {
    const { summary } = await scenario({ fn: 'linkSync', match: '/records/fixture/v002\\.json$', when: 'before' }, (ws) => {
      const dir = join(ws, 'records', 'fixture');
      expect(readdirSync(dir).filter((f) => f.startsWith('.v002.json.tmp-')).length).toBe(1);
      writeFileSync(join(dir, '.v002.json.tmp-99999999'), '{"format":"lacuna-rec'); // as if cut off mid-write
    });
    expect(summary.audits[0].reused).toBe(false);
  });
});
