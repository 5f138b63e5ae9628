/**
 * `lacuna serve` as a user runs it: a file it cannot read is answered with an error status and
 * the server keeps serving; a busy port is named with a way out instead of a stack trace; folder
 * URLs without their slash are redirected (301) to the slash form on this host only; and the
 * server stops on SIGTERM, SIGINT and SIGHUP, also when started through npx, whose `kill $!`
 * reaches npm and not the server.
 */
import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { spawnSync, type ChildProcess } from 'node:child_process';
import { mkdirSync, symlinkSync, writeFileSync } from 'node:fs';
import { request } from 'node:http';
import { join } from 'node:path';
import { folderRedirect } from '../../src/cli/serve.ts';
import { BIN, cleanUp, exitWithin, freePort, startLacuna, tempDir, waitForStderr } from './run.ts';

const started: ChildProcess[] = [];
const groups: number[] = [];
afterAll(() => {
  for (const c of started) if (c.exitCode === null && c.signalCode === null) c.kill('SIGKILL');
  for (const g of groups) {
    try {
      process.kill(-g, 'SIGKILL'); // a server left running in npx's process group
    } catch {
      // the group is gone
    }
  }
  cleanUp();
});

/** A raw GET (the path is sent exactly as given) answered with status, location and body. */
function get(port: number, path: string): Promise<{ status: number; location?: string; body: string }> {
  return new Promise((ok, fail) => {
    const req = request({ host: '127.0.0.1', port, path, method: 'GET', agent: false }, (res) => {
      let body = '';
      res.on('data', (d: Buffer) => (body += d.toString('utf8')));
      res.on('end', () => ok({ status: res.statusCode ?? 0, location: res.headers.location, body }));
      res.on('error', fail);
    });
    req.on('error', fail);
    req.end();
  });
}

function makeSite(): string {
  const cwd = tempDir('lacuna-serve-');
  const site = join(cwd, 'site');
  mkdirSync(join(site, 'kc-survey', 'latest'), { recursive: true });
  writeFileSync(join(site, 'index.html'), '<p>home</p>');
  writeFileSync(join(site, 'kc-survey', 'latest', 'index.html'), '<a href="data.json">data</a>');
  mkdirSync(join(site, 'broken', 'index.html'), { recursive: true }); // a folder where a page should be
  mkdirSync(join(site, 'evil.com'));
  writeFileSync(join(site, 'evil.com', 'index.html'), 'x');
  symlinkSync('/etc', join(site, 'etc-link'));
  return cwd;
}

async function serve(cwd: string, extra: string[] = []): Promise<{ child: ChildProcess; port: number }> {
  const port = await freePort();
  const child = startLacuna(['serve', '--out', 'site', '--port', String(port), ...extra], cwd);
  started.push(child);
  await waitForStderr(child, /serving .* at http/);
  return { child, port };
}

describe('lacuna serve', () => {
  let cwd: string;
  beforeAll(() => {
    cwd = makeSite();
  });

  it('answers a file it cannot read with an error status and keeps serving', async () => {
    const { child, port } = await serve(cwd);
    const broken = await get(port, '/broken/');
    expect(broken.status).toBeGreaterThanOrEqual(400);
    const direct = await get(port, '/broken/index.html/');
    expect(direct.status).toBeGreaterThanOrEqual(400);
    const home = await get(port, '/');
    expect(home.status).toBe(200);
    expect(home.body).toContain('home');
    child.kill('SIGTERM');
    expect(await exitWithin(child, 20_000)).toEqual({ code: 0, signal: null });
  });

  it('redirects folder URLs to their slash form with 301, a path on this host only', async () => {
    const { child, port } = await serve(cwd);
    const latest = await get(port, '/kc-survey/latest');
    expect(latest.status).toBe(301);
    expect(latest.location).toBe('/kc-survey/latest/');
    expect((await get(port, '/kc-survey/latest?x=1')).location).toBe('/kc-survey/latest/');
    expect((await get(port, '/kc-survey/latest/')).status).toBe(200);
    // Paths a browser would read as another host (`//evil.com`, `/\evil.com`) stay on this one.
    for (const path of ['//evil.com', '/%2F%2Fevil.com', '/.//evil.com']) {
      const r = await get(port, path);
      expect(r.status, path).toBe(301);
      expect(r.location, path).toBe('/evil.com/');
    }
    expect((await get(port, '/%5Cevil.com')).status).toBe(404);
    // No redirect to a folder outside the site (a symlink leaving it), nor past the root.
    expect((await get(port, '/etc-link')).status).toBe(404);
    expect((await get(port, '/..')).status).not.toBe(301);
    child.kill('SIGTERM');
    await exitWithin(child, 20_000);
  });

  it('the redirect location is built from the resolved path (unit check)', () => {
    const site = join(cwd, 'site');
    expect(folderRedirect(site, '/kc-survey/./latest')).toBe('/kc-survey/latest/');
    expect(folderRedirect(site, '/kc-survey/latest/')).toBeNull();
    expect(folderRedirect(site, '/index.html')).toBeNull();
    expect(folderRedirect(site, '/../site/kc-survey')).toBe('/kc-survey/'); // resolved inside the site
    expect(folderRedirect(site, '/..')).toBeNull();
    expect(folderRedirect(site, '/etc-link')).toBeNull();
  });

  it('a busy port is named, with --port as the way out, and no stack trace', async () => {
    const { child, port } = await serve(cwd);
    const r = spawnSync(process.execPath, [BIN, 'serve', '--out', 'site', '--port', String(port)], { cwd, encoding: 'utf8', timeout: 60_000 });
    expect(r.status).toBe(1);
    expect(r.stderr).toContain(`port ${port}`);
    expect(r.stderr).toContain('already in use');
    expect(r.stderr).toContain('--port');
    expect(r.stderr).not.toMatch(/EADDRINUSE|\n\s+at /);
    child.kill('SIGTERM');
    await exitWithin(child, 20_000);
  });

  for (const signal of ['SIGTERM', 'SIGINT', 'SIGHUP'] as const) {
    it(`stops on ${signal} with exit code 0, after a browser-like keep-alive connection`, async () => {
      const { child, port } = await serve(cwd);
      // A kept-alive connection must not hold the server open.
      await new Promise<void>((ok, fail) => {
        request({ host: '127.0.0.1', port, path: '/', headers: { connection: 'keep-alive' } }, (res) => {
          res.resume();
          res.on('end', ok);
        })
          .on('error', fail)
          .end();
      });
      child.kill(signal);
      expect(await exitWithin(child, 20_000)).toEqual({ code: 0, signal: null });
    });
  }

  it('started through npx, it stops when npx is killed (`npx lacuna serve & … kill $!`)', async () => {
    const npx = spawnSync('npx', ['--version'], { encoding: 'utf8' });
    if (npx.status !== 0) {
      console.warn('npx not found: npx signal check skipped');
      return;
    }
    // A project that has lacuna installed: node_modules/.bin/lacuna → bin/lacuna.mjs.
    const project = tempDir('lacuna-npx-');
    writeFileSync(join(project, 'package.json'), '{ "name": "a-lab", "version": "1.0.0", "private": true }\n');
    mkdirSync(join(project, 'node_modules', '.bin'), { recursive: true });
    symlinkSync(BIN, join(project, 'node_modules', '.bin', 'lacuna'));
    symlinkSync(join(cwd, 'site'), join(project, 'site'));
    const port = await freePort();
    // Its own process group, so that the clean-up can reach a server left running.
    const child = startLacuna(['lacuna', 'serve', '--out', 'site', '--port', String(port)], project, { detached: true, command: ['npx', '--offline', '--no'] });
    groups.push(child.pid!);
    await waitForStderr(child, /serving .* at http/);
    child.kill('SIGTERM'); // what `kill $!` does: the signal reaches npm only
    await exitWithin(child, 20_000);
    // The server is gone when the port can be taken again.
    let free = false;
    for (let i = 0; i < 40 && !free; i++) {
      free = await get(port, '/').then(
        () => false,
        () => true,
      );
      if (!free) await new Promise((ok) => setTimeout(ok, 250));
    }
    expect(free).toBe(true);
  });
});
