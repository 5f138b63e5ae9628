/**
 * The report pages in a real browser: Debian's Chromium driven by playwright-core, the fixture
 * site opened from `file://`. Checks that Vega redraws every chart (an `<svg>` inside each
 * figure marked live), that nothing is logged as an error, and that no request leaves the
 * machine (every request is logged; only `file:` and `data:` are allowed). A full-page
 * screenshot is saved in the temp folder and its path printed, for a person to look at.
 */
import { existsSync } from 'node:fs';
import { mkdtemp, rm } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { chromium } from 'playwright-core';
import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { buildFixtureSite } from './fixture-site.ts';
import { FONT, PALETTE } from '../../src/charts/theme.ts';
import type { FixtureSite } from './fixture-site.ts';

const CHROMIUM = ['/usr/lib/chromium/chromium', '/usr/bin/chromium'].find((p) => existsSync(p));
if (!CHROMIUM) console.warn('test/browser: skipped — Debian chromium not found at /usr/lib/chromium/chromium or /usr/bin/chromium (apt-get install -y chromium; CI installs it)');

/** Flags from /work/shared/stack-notes.md: no sandbox, no GPU, nothing phoning home. */
const FLAGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage'];

interface PageLog {
  requests: string[];
  errors: string[];
}

function watch(page: Page): PageLog {
  const log: PageLog = { requests: [], errors: [] };
  page.on('request', (r) => log.requests.push(r.url()));
  page.on('console', (m) => {
    if (m.type() === 'error') log.errors.push(`console: ${m.text()}`);
  });
  page.on('pageerror', (e) => log.errors.push(`page: ${e.message}`));
  page.on('requestfailed', (r) => log.errors.push(`request failed: ${r.url()} ${r.failure()?.errorText ?? ''}`));
  return log;
}

const offMachine = (urls: string[]) => urls.filter((u) => !u.startsWith('file:') && !u.startsWith('data:'));

describe.skipIf(!CHROMIUM)('report pages in Chromium (file://)', () => {
  let tmp = '';
  let profile = '';
  let site: FixtureSite;
  let context: BrowserContext;

  beforeAll(async () => {
    tmp = await mkdtemp(join(tmpdir(), 'lacuna-browser-'));
    profile = await mkdtemp(join(tmpdir(), 'lacuna-chromium-profile-'));
    site = await buildFixtureSite(join(tmp, 'site'));
    context = await chromium.launchPersistentContext(profile, { executablePath: CHROMIUM, headless: true, args: FLAGS, viewport: { width: 1280, height: 900 } });
  });

  afterAll(async () => {
    try {
      await context?.close();
    } finally {
      if (profile) await rm(profile, { recursive: true, force: true });
      console.log(`test/browser: site and screenshots kept in ${tmp}`);
    }
  });

  it('draws every chart with Vega, logs no error and requests nothing off the machine', async () => {
    const page = await context.newPage();
    const log = watch(page);
    // Each dataset's charts are on its own page (the version page holds only charts across datasets).
    const url = pathToFileURL(join(site.audits[0].versionDir, 'datasets', site.audits[0].result.datasets[0].id, 'index.html')).href;
    await page.goto(url, { waitUntil: 'load' });
    const holders = await page.locator('[data-vega-spec]').count();
    expect(holders).toBeGreaterThan(2);
    // Vega replaces the static copy only after a successful render and marks the holder live.
    await page.waitForFunction((n) => document.querySelectorAll('.chart-canvas.is-live .chart-live svg').length === n, holders, { timeout: 20_000 });
    expect(await page.locator('.chart-canvas.is-live .chart-live svg .mark-group').count()).toBeGreaterThan(0);
    const shot = join(tmp, 'report.png');
    await page.screenshot({ path: shot, fullPage: true });
    console.log(`test/browser: screenshot ${shot}`);
    expect(log.errors).toEqual([]);
    expect(log.requests.length).toBeGreaterThan(0);
    expect(offMachine(log.requests)).toEqual([]);
    await page.close();
  });

  it('pages take their ink and sans-serif type from the chart theme (one source, src/charts/theme.ts)', async () => {
    const page = await context.newPage();
    await page.goto(pathToFileURL(join(site.audits[0].versionDir, 'index.html')).href, { waitUntil: 'load' });
    const got = await page.evaluate(() => {
      const root = getComputedStyle(document.documentElement);
      const probe = document.createElement('span');
      probe.style.fontFamily = 'var(--sans)';
      document.body.append(probe);
      return { color: root.color, ink: root.getPropertyValue('--ink').trim(), font: getComputedStyle(probe).fontFamily };
    });
    await page.close();
    const hex = PALETTE.ink.slice(1).match(/../g)!.map((h) => parseInt(h, 16));
    expect(got.color).toBe(`rgb(${hex.join(', ')})`);
    expect(got.font.replace(/\s+/g, ' ')).toBe(FONT.replace(/\s+/g, ' '));
  });

  it('opens the drift, comparison, audit and site pages cleanly, and latest/ forwards to the newest version', async () => {
    const page = await context.newPage();
    const log = watch(page);
    const { versionDir, result } = site.audits[0];
    for (const file of [join(versionDir, 'index.html'), join(versionDir, 'drift.html'), join(versionDir, 'compare.html'), join(site.outDir, result.audit, 'index.html'), join(site.outDir, 'index.html')]) {
      await page.goto(pathToFileURL(file).href, { waitUntil: 'load' });
      expect(await page.locator('h1').count(), file).toBe(1);
    }
    await page.goto(pathToFileURL(join(versionDir, 'drift.html')).href, { waitUntil: 'load' });
    await page.waitForFunction(() => document.querySelectorAll('.chart-canvas.is-live').length === document.querySelectorAll('[data-vega-spec]').length);
    await page.screenshot({ path: join(tmp, 'drift.png'), fullPage: true });
    await page.goto(pathToFileURL(join(site.outDir, result.audit, 'latest', 'index.html')).href);
    await page.waitForURL((u) => u.href.endsWith(`/${result.version}/index.html`), { timeout: 10_000 });
    expect(log.errors).toEqual([]);
    expect(offMachine(log.requests)).toEqual([]);
    await page.close();
  });
});
