/**
 * The built demo report in a real browser, as CI runs it: the seeded demo scenario is written
 * into a temporary workspace and built with `buildWorkspace` (the code behind `lacuna build`),
 * then Debian's Chromium opens the reports over file:// and checks that every chart was redrawn
 * by Vega, that nothing was logged as an error and that no request left the machine. Screenshots
 * are saved beside the site and their paths printed.
 */
import { existsSync } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium, type BrowserContext } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { makeDemo } from '../../src/demo/scenario.ts';
import { buildWorkspace } from '../../src/audit/build.ts';
import { createProgress } from '../../src/cli/progress.ts';

const CHROMIUM = ['/usr/lib/chromium/chromium', '/usr/bin/chromium'].find((p) => existsSync(p));
if (!CHROMIUM) console.warn('test/browser/demo: skipped — Debian chromium not found (apt-get install -y chromium; CI installs it)');
const FLAGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage'];

describe.skipIf(!CHROMIUM)('the built demo report in Chromium', () => {
  let tmp = '';
  let profile = '';
  let out = '';
  let context: BrowserContext;

  beforeAll(async () => {
    tmp = await mkdtemp(join(tmpdir(), 'lacuna-demo-browser-'));
    profile = await mkdtemp(join(tmpdir(), 'lacuna-chromium-profile-'));
    makeDemo(join(tmp, 'ws'));
    out = join(tmp, 'site');
    await buildWorkspace({ workspace: join(tmp, 'ws'), out, progress: createProgress({ quiet: true }) });
    context = await chromium.launchPersistentContext(profile, { executablePath: CHROMIUM, headless: true, args: FLAGS, viewport: { width: 1280, height: 900 } });
  }, 240_000);

  afterAll(async () => {
    try {
      await context?.close();
    } finally {
      if (profile) await rm(profile, { recursive: true, force: true });
      console.log(`test/browser/demo: site and screenshots kept in ${tmp}`);
    }
  });

  for (const page of ['kc-survey/v001/index.html', 'kc-survey/v001/datasets/m01-rig-a/index.html', 'kc-survey/v001/drift.html', 'kc-imaging/v001/index.html', 'kc-imaging/v001/datasets/img-01/index.html', 'pruned-net/v001/index.html', 'pruned-net/v001/datasets/pruned-90/index.html', 'index.html']) {
    it(`${page}: charts drawn live, no errors, nothing requested off the machine`, async () => {
      const p = await context.newPage();
      const requests: string[] = [];
      const errors: string[] = [];
      p.on('request', (r) => requests.push(r.url()));
      p.on('console', (m) => m.type() === 'error' && errors.push(m.text()));
      p.on('pageerror', (e) => errors.push(e.message));
      await p.goto(pathToFileURL(join(out, page)).href, { waitUntil: 'load' });
      const holders = await p.locator('[data-vega-spec]').count();
      // Dataset pages and the drift page carry charts; a version page has charts only across datasets.
      if (page.includes('/datasets/') || page.endsWith('drift.html')) expect(holders).toBeGreaterThan(0);
      await p.waitForFunction((n) => document.querySelectorAll('.chart-canvas.is-live .chart-live svg').length === n, holders, { timeout: 60_000 });
      const shot = join(tmp, `${page.replace(/[/.]/g, '-')}.png`);
      await p.screenshot({ path: shot, fullPage: false });
      console.log(`test/browser/demo: screenshot ${shot}`);
      expect(errors).toEqual([]);
      expect(requests.filter((u) => !u.startsWith('file:') && !u.startsWith('data:'))).toEqual([]);
      await p.close();
    }, 90_000);
  }

  it('kc-survey version page: verdict and overview table in the first screen, under 6,000 px, at most 8 A4 pages in print', async () => {
    const p = await context.newPage();
    await p.setViewportSize({ width: 1400, height: 900 });
    await p.goto(pathToFileURL(join(out, 'kc-survey/v001/index.html')).href, { waitUntil: 'load' });
    const box = async (sel: string) => (await p.locator(sel).first().boundingBox())!;
    const verdict = await box('#verdict .verdict-text');
    const table = await box('table.overview');
    const firstRow = await box('table.overview tbody tr:nth-child(2)');
    // The whole verdict, and the table's head and first dataset row, above the fold (900 px).
    expect(verdict.y + verdict.height).toBeLessThanOrEqual(900);
    expect(table.y).toBeLessThan(900);
    expect(firstRow.y + firstRow.height).toBeLessThanOrEqual(900);
    const height = await p.evaluate(() => document.documentElement.scrollHeight);
    console.log(`test/browser/demo: kc-survey version page ${height} px tall`);
    expect(height).toBeLessThan(6000);
    // Print as Chromium does (A4, the page's print style sheet) and count the PDF's page objects.
    const pdf = (await p.pdf({ format: 'A4' })).toString('latin1');
    const pages = pdf.match(/\/Type\s*\/Page(?![a-zA-Z])/g)?.length ?? 0;
    console.log(`test/browser/demo: kc-survey version page prints to ${pages} A4 pages`);
    expect(pages).toBeGreaterThan(0);
    expect(pages).toBeLessThanOrEqual(8);
    await p.close();
  }, 90_000);
});
