/**
 * Where a build writes, and who may write: linked state folders are refused; one build of a
 * workspace at a time (the lock names its holder; a dead holder's lock is freed); a site folder
 * belongs to one workspace (another is refused unless it adopts the site, and then every page of
 * another record is regenerated); an audit whose manifest was removed keeps readable pages and is
 * marked in the site index, whose every link resolves.
 */
import { describe, it, expect, afterAll } from 'vitest';
import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { hostname, tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { writeNpy } from '../../src/readers/npy-write.ts';
import { createRandom } from '../../src/stats/random.ts';
import { buildWorkspace } from '../../src/audit/build.ts';
import { acquireWorkspaceLock, lockFile, processStartMs } from '../../src/audit/lock.ts';
import { readRecord } from '../../src/audit/versions.ts';
import { createProgress } from '../../src/cli/progress.ts';
import { InputError } from '../../src/errors.ts';

const quiet = createProgress({ quiet: true });
const BIN = resolve(import.meta.dirname, '../../bin/lacuna.mjs');
const made: string[] = [];
afterAll(() => {
  for (const d of made) rmSync(d, { recursive: true, force: true });
});
const temp = (prefix: string) => {
  const d = mkdtempSync(join(tmpdir(), prefix));
  made.push(d);
  return d;
};

/** A workspace with audits `slugs`, data seeded by `seed`. */
function workspace(seed: number, slugs = ['fixture']): string {
  const ws = temp('lacuna-state-');
  mkdirSync(join(ws, 'audits'));
  mkdirSync(join(ws, 'data'));
  const rng = createRandom(seed);
  writeNpy(join(ws, 'data', 'm1.npy'), new Float32Array(8 * 200).map(() => (rng.next() < 0.2 ? 1 + rng.int(3) : 0)), [8, 200]);
  for (const slug of slugs) {
    writeFileSync(
      join(ws, 'audits', `${slug}.md`),
      `---\naudit: ${slug}\ntitle: Audit ${slug}\nbin_ms: 10\nmin_bins: 50\nbootstrap: { resamples: 100, level: 0.9, method: percentile, seed: ${seed} }\ndatasets:\n  - { id: d1, path: ../data/m1.npy, month: 2026-01 }\n---\n`,
    );
  }
  return ws;
}

const build = (ws: string, out: string, extra: { adoptSite?: boolean } = {}) => buildWorkspace({ workspace: ws, out, progress: quiet, workers: '1', ...extra });
const failure = (p: Promise<unknown>) => p.then(() => null, (e: unknown) => e);

describe('linked state folders', () => {
  for (const name of ['records', '.lacuna-cache']) {
    it(`a ${name} that is a symbolic link is refused, naming it, and nothing is written through it`, async () => {
      const ws = workspace(1);
      const elsewhere = temp('lacuna-elsewhere-');
      symlinkSync(elsewhere, join(ws, name));
      const err = await failure(build(ws, join(ws, '_site')));
      expect(err).toBeInstanceOf(InputError);
      expect((err as Error).message).toContain(`"${name}" is a symbolic link`);
      expect(readdirSync(elsewhere)).toEqual([]);
    });
  }

  for (const shard of [undefined, '1/1']) {
    it(`.lacuna-cache/hashes.d as a symbolic link is refused${shard ? ' by a shard' : ''}, and no file where it points is written or removed`, async () => {
      const ws = workspace(1);
      const elsewhere = temp('lacuna-elsewhere-');
      writeFileSync(join(elsewhere, 'someone-elses.json'), '{}');
      mkdirSync(join(ws, '.lacuna-cache'));
      symlinkSync(elsewhere, join(ws, '.lacuna-cache', 'hashes.d'));
      const err = await failure(buildWorkspace({ workspace: ws, out: join(ws, '_site'), progress: quiet, workers: '1', shard }));
      expect(err).toBeInstanceOf(InputError);
      expect((err as Error).message).toContain('is a symbolic link');
      expect(readdirSync(elsewhere)).toEqual(['someone-elses.json']);
    });
  }

  it("the site's state file as a symbolic link is refused, and its target is left alone", async () => {
    const ws = workspace(1);
    const out = join(ws, '_site');
    mkdirSync(out);
    const target = join(temp('lacuna-elsewhere-'), 'victim.txt');
    writeFileSync(target, 'keep me');
    symlinkSync(target, join(out, '.lacuna-site.json'));
    const err = await failure(build(ws, out));
    expect(err).toBeInstanceOf(InputError);
    expect((err as Error).message).toContain('.lacuna-site.json');
    expect(readFileSync(target, 'utf8')).toBe('keep me');
  });
});

describe('records are untrusted too', () => {
  it('a record whose version differs from its file name is refused, and nothing is written where it points', async () => {
    const ws = workspace(4);
    const out = join(temp('lacuna-site-'), 'site');
    await build(ws, out);
    const file = join(ws, 'records', 'fixture', 'v001.json');
    const rec = JSON.parse(readFileSync(file, 'utf8'));
    rec.entry.version = '../../escaped';
    rec.result.version = '../../escaped';
    writeFileSync(file, JSON.stringify(rec));
    rmSync(out, { recursive: true });
    const err = await failure(build(ws, out));
    expect(err).toBeInstanceOf(InputError);
    expect((err as Error).message).toContain('v001.json');
    expect((err as Error).message).toContain('entry.version');
    expect(existsSync(join(out, '..', 'escaped'))).toBe(false);
  });
});

describe('one build of a workspace at a time', () => {
  it('a second build stops with an error naming the holder (pid, host, start) and writes nothing', async () => {
    const ws = workspace(2);
    const release = acquireWorkspaceLock(ws);
    try {
      const err = await failure(build(ws, join(ws, '_site')));
      expect(err).toBeInstanceOf(InputError);
      const msg = (err as Error).message;
      expect(msg).toContain(`process ${process.pid} on host ${hostname()}, started 20`);
      expect(existsSync(join(ws, 'records'))).toBe(false);
    } finally {
      release();
    }
    expect(existsSync(lockFile(ws))).toBe(false);
    expect((await build(ws, join(ws, '_site'))).audits[0].version).toBe('v001');
  });

  it("a lock left by a process that has died is freed, and the build goes on", async () => {
    const ws = workspace(3);
    const dead = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], { encoding: 'utf8' });
    const pid = Number(dead.stdout);
    expect(pid).toBeGreaterThan(0);
    mkdirSync(dirname(lockFile(ws)), { recursive: true });
    writeFileSync(lockFile(ws), JSON.stringify({ pid, host: hostname(), started: '2026-01-01T00:00:00.000Z' }));
    expect((await build(ws, join(ws, '_site'))).audits[0].version).toBe('v001');
    expect(existsSync(lockFile(ws))).toBe(false);
  });

  // The start time of a process from /proc (proc(5)); Linux only.
  it.skipIf(process.platform !== 'linux')('a lock whose pid now belongs to a process started after the lock was taken is freed; one taken after its holder started is kept', async () => {
    const ws = workspace(4);
    const other = spawn('sleep', ['60'], { stdio: 'ignore' });
    try {
      await new Promise((r) => other.once('spawn', r));
      const pid = other.pid!;
      // Cross-check the start time against ps(1)'s elapsed seconds (procps, outside this project).
      const etimes = Number(spawnSync('ps', ['-o', 'etimes=', '-p', String(pid)], { encoding: 'utf8' }).stdout.trim());
      const started = processStartMs(pid);
      expect(started).not.toBeNull();
      if (Number.isFinite(etimes)) expect(Math.abs(Date.now() - etimes * 1000 - started!)).toBeLessThan(3000);
      mkdirSync(dirname(lockFile(ws)), { recursive: true });
      // Held by this pid since now: a live holder, refused.
      writeFileSync(lockFile(ws), JSON.stringify({ pid, host: hostname(), started: new Date(Date.now() + 1000).toISOString() }));
      expect(await failure(build(ws, join(ws, '_site')))).toBeInstanceOf(InputError);
      // Taken an hour before this process existed: the pid was reused, the lock is stale.
      writeFileSync(lockFile(ws), JSON.stringify({ pid, host: hostname(), started: new Date(Date.now() - 3_600_000).toISOString() }));
      expect((await build(ws, join(ws, '_site'))).audits[0].version).toBe('v001');
      expect(existsSync(lockFile(ws))).toBe(false);
    } finally {
      other.kill();
    }
  });
});

describe('a site folder belongs to one workspace', () => {
  it('another workspace is refused; told to adopt the site, it regenerates every page of another record', async () => {
    const a = workspace(10);
    const b = workspace(11); // same audit name, other data and seed
    const out = join(temp('lacuna-site-'), 'site');
    await build(a, out);
    const err = await failure(build(b, out));
    expect(err).toBeInstanceOf(InputError);
    expect((err as Error).message).toContain(a);
    expect((err as Error).message).toContain('--adopt-site');
    expect(existsSync(join(b, 'records'))).toBe(false); // refused before any work
    await build(b, out, { adoptSite: true });
    const shown = JSON.parse(readFileSync(join(out, 'fixture', 'v001', 'results.json'), 'utf8'));
    expect(shown).toEqual(readRecord(b, 'fixture', 'v001').result);
    expect(shown).not.toEqual(readRecord(a, 'fixture', 'v001').result); // the two records do differ
    const page = readFileSync(join(out, 'fixture', 'v001', 'index.html'), 'utf8');
    expect(page).toContain(readRecord(b, 'fixture', 'v001').result.inputs[0].sha256.slice(0, 12));
    expect(page).not.toContain(readRecord(a, 'fixture', 'v001').result.inputs[0].sha256.slice(0, 12));
    // The site is now b's: a is refused.
    expect(await failure(build(a, out))).toBeInstanceOf(InputError);
  });

  it("adopting a site removes the other workspace's pages that no record here backs, and nothing it did not write", async () => {
    const a = workspace(12, ['fixture', 'only-a']);
    const b = workspace(13, ['fixture']);
    const out = join(temp('lacuna-site-'), 'site');
    await build(a, out);
    // a gets a second version of `fixture`: b has only v001.
    writeFileSync(join(a, 'audits', 'fixture.md'), readFileSync(join(a, 'audits', 'fixture.md'), 'utf8').replace('title: Audit fixture', 'title: Audit fixture, retitled'));
    await build(a, out);
    expect(existsSync(join(out, 'fixture', 'v002', 'index.html'))).toBe(true);
    mkdirSync(join(out, 'notes'));
    writeFileSync(join(out, 'notes', 'README.txt'), 'a file the lab put here');
    await build(b, out, { adoptSite: true });
    expect(existsSync(join(out, 'only-a'))).toBe(false);
    expect(existsSync(join(out, 'fixture', 'v002'))).toBe(false);
    expect(existsSync(join(out, 'fixture', 'v001', 'index.html'))).toBe(true);
    expect(readFileSync(join(out, 'notes', 'README.txt'), 'utf8')).toBe('a file the lab put here');
    const index = readFileSync(join(out, 'index.html'), 'utf8');
    expect(index).not.toContain('only-a');
    expect(readFileSync(join(out, 'fixture', 'index.html'), 'utf8')).not.toContain('v002');
    // No page of a's is left anywhere in the site.
    const aSha = readRecord(a, 'fixture', 'v001').result.inputs[0].sha256.slice(0, 12);
    const files = (readdirSync(out, { recursive: true }) as string[]).filter((f) => f.endsWith('.html') || f.endsWith('.json'));
    for (const f of files) expect(readFileSync(join(out, f), 'utf8'), f).not.toContain(aSha);
  });
});

/** Every relative link of an HTML page that points at a file must resolve. */
function brokenLinks(page: string): string[] {
  const html = readFileSync(page, 'utf8');
  const hrefs = [...html.matchAll(/href="([^"#?]+)"/g)].map((m) => m[1]).filter((h) => !/^[a-z]+:/.test(h));
  return hrefs.filter((h) => !existsSync(join(dirname(page), decodeURIComponent(h))));
}

describe('an audit whose manifest was removed', () => {
  it('stays readable and is marked in the site index; every index link resolves, also after the site is deleted', async () => {
    const ws = workspace(20, ['kept', 'gone']);
    const out = join(ws, '_site');
    await build(ws, out);
    rmSync(join(ws, 'audits', 'gone.md'));
    await build(ws, out);
    const index = () => readFileSync(join(out, 'index.html'), 'utf8');
    expect(index()).toMatch(/gone<\/code>\s*<span class="sub">manifest removed/);
    expect(index()).not.toMatch(/kept<\/code>\s*<span class="sub">manifest removed/);
    rmSync(out, { recursive: true });
    await build(ws, out);
    expect(index()).toMatch(/gone<\/code>\s*<span class="sub">manifest removed/);
    for (const page of ['index.html', 'gone/index.html', 'gone/latest/index.html', 'kept/index.html']) expect(brokenLinks(join(out, page)), page).toEqual([]);
    expect(existsSync(join(out, 'gone', 'v001', 'results.json'))).toBe(true);
  });
});

describe('the build command', () => {
  it('accepts --rehash and --adopt-site, and a held lock is an input problem (exit 1) naming its holder', () => {
    const ws = workspace(30);
    const out = join(ws, '_site');
    const run = (...args: string[]) => spawnSync(process.execPath, [BIN, 'build', '--workspace', ws, '--out', out, '--workers', '1', ...args], { encoding: 'utf8', env: { ...process.env, NO_COLOR: '1' } });
    const first = run('--rehash', '--adopt-site');
    expect(first.status, first.stderr).toBe(0);
    expect(first.stderr).toContain('new version v001');
    const release = acquireWorkspaceLock(ws);
    try {
      const held = run();
      expect(held.status, held.stderr).toBe(1);
      expect(held.stderr).toContain(`process ${process.pid} on host ${hostname()}`);
    } finally {
      release();
    }
  });
});
