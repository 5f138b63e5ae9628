/**
 * Charts on a phone: the demo report opened in Debian's Chromium at a 420 px-wide viewport,
 * once with JavaScript off (the static SVGs drawn at build time, as in print or without
 * scripts) and once with it on (the live charts Vega draws in the page). Every chart text's
 * rendered size (its font size times the SVG's scale on screen) must be at least 10 CSS px
 * (common practice for legible text on a phone, no single source). Skips without Chromium.
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
if (!CHROMIUM) console.warn('test/browser/phone: skipped — Debian chromium not found (apt-get install -y chromium; CI installs it)');
const FLAGS = ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage'];
const PAGES = ['kc-survey/v001/index.html', 'kc-survey/v001/drift.html', 'kc-imaging/v001/index.html', 'pruned-net/v001/index.html'];
const MIN_PX = 10;

/** In the page: the smallest rendered text size of each figure's SVG, and the texts below MIN_PX. */
function measure(min: number) {
  const out: { figure: string; smallest: number; small: string[]; texts: number }[] = [];
  for (const fig of Array.from(document.querySelectorAll('figure.chart'))) {
    let smallest = Infinity;
    let texts = 0;
    const small: string[] = [];
    for (const t of Array.from(fig.querySelectorAll('svg text')) as SVGTextElement[]) {
      if (!t.textContent?.trim()) continue;
      const m = t.getScreenCTM();
      if (!m) continue;
      const px = parseFloat(getComputedStyle(t).fontSize) * Math.hypot(m.a, m.b);
      texts++;
      smallest = Math.min(smallest, px);
      if (px < min) small.push(`${t.textContent.slice(0, 30)} (${px.toFixed(1)} px)`);
    }
    out.push({ figure: fig.id, smallest, small, texts });
  }
  return out;
}

describe.skipIf(!CHROMIUM)('chart text on a 420 px-wide phone', () => {
  let tmp = '';
  let out = '';
  const contexts: { js: boolean; context: BrowserContext; profile: string }[] = [];

  beforeAll(async () => {
    tmp = await mkdtemp(join(tmpdir(), 'lacuna-phone-'));
    makeDemo(join(tmp, 'ws'));
    out = join(tmp, 'site');
    await buildWorkspace({ workspace: join(tmp, 'ws'), out, progress: createProgress({ quiet: true }) });
    for (const js of [false, true]) {
      const profile = await mkdtemp(join(tmpdir(), 'lacuna-chromium-profile-'));
      const context = await chromium.launchPersistentContext(profile, { executablePath: CHROMIUM, headless: true, args: FLAGS, viewport: { width: 420, height: 900 }, javaScriptEnabled: js });
      contexts.push({ js, context, profile });
    }
  }, 240_000);

  afterAll(async () => {
    for (const c of contexts) {
      try {
        await c.context.close();
      } finally {
        await rm(c.profile, { recursive: true, force: true });
      }
    }
    if (tmp) await rm(tmp, { recursive: true, force: true });
  });

  for (const page of PAGES) {
    for (const js of [false, true]) {
      it(`${page} (${js ? 'live charts' : 'static SVGs'}): no chart text under ${MIN_PX} px`, async () => {
        const { context } = contexts.find((c) => c.js === js)!;
        const p = await context.newPage();
        try {
          await p.goto(pathToFileURL(join(out, page)).href, { waitUntil: 'load' });
          const holders = await p.locator('[data-vega-spec]').count();
          expect(holders).toBeGreaterThan(0);
          if (js) await p.waitForFunction((n) => document.querySelectorAll('.chart-canvas.is-live .chart-live svg').length === n, holders, { timeout: 60_000 });
          const figures = await p.evaluate(measure, MIN_PX);
          expect(figures.length).toBe(holders);
          for (const f of figures) {
            expect(f.texts, `${f.figure} has text`).toBeGreaterThan(0);
            expect(f.small, `${f.figure}: smallest ${f.smallest.toFixed(1)} px`).toEqual([]);
          }
        } finally {
          await p.close();
        }
      }, 120_000);
    }
  }
});
