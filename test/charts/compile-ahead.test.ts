/**
 * Charts compiled ahead on a worker thread (src/charts/compile-ahead.ts) give exactly what
 * compiling on this thread gives: the worker's Vega specs against vega-lite's `compile` run
 * here (the reference), the SVGs drawn from them against those drawn the old way, the warnings
 * passed on in the same order, and a spec that does not compile failing with the same message.
 * Which thread compiles which chart depends on timing; every check holds whichever it was.
 */
import { Worker } from 'node:worker_threads';
import { afterEach, describe, expect, it } from 'vitest';
import { buildCharts, compileToVega, renderChartSvgs } from '../../src/charts/index.ts';
import { startChartCompiler, type ChartCompiler, type CompileReply, type CompileRequest } from '../../src/charts/compile-ahead.ts';
import { staticVariant } from '../../src/charts/render.ts';
import type { ChartSpec } from '../../src/types.ts';
import { activityFixture, weightsFixture } from '../fixtures/audit-result.ts';

const quiet = { warn() {} };
/** Every kind of chart: activity and weights datasets, across-dataset charts, drift (both chart kinds). */
function charts(): ChartSpec[] {
  const cusum = activityFixture();
  cusum.drift!.chart = 'cusum';
  for (const s of cusum.drift!.series) {
    s.chart = 'cusum';
    for (const p of s.points) p.chartLimit = 0.05; // an arbitrary decision interval H, as in charts.test.ts
  }
  return [...buildCharts(activityFixture()), ...buildCharts(weightsFixture()), ...buildCharts(cusum).filter((c) => c.id.startsWith('drift'))];
}
/** A Vega-Lite spec that compiles with a warning (an encoding channel this mark ignores; from memory of vega-lite's log messages). */
const warned = (): ChartSpec => ({
  id: 'warned',
  title: 'warned',
  description: 'a bar with a shape channel',
  datasetId: null,
  spec: { data: { values: [{ a: 1, b: 2 }] }, mark: 'bar', encoding: { x: { field: 'a', type: 'quantitative' }, y: { field: 'b', type: 'quantitative' }, shape: { field: 'a', type: 'nominal' } } },
});
/** A spec vega-lite refuses (a mark type that does not exist). */
const broken = (): ChartSpec => ({ ...warned(), id: 'broken', spec: { data: { values: [] }, mark: 'no-such-mark', encoding: {} } });
const settle = (ms: number) => new Promise((r) => setTimeout(r, ms));

let compiler: ChartCompiler | null = null;
afterEach(async () => {
  await compiler?.close();
  compiler = null;
});

describe('the compile worker', () => {
  it('answers every chart of a batch, full spec and static variant, as vega-lite compiles them here', { timeout: 60_000 }, async () => {
    const list = [...charts(), warned(), broken()];
    const worker = new Worker(new URL('../../src/charts/worker.mjs', import.meta.url));
    try {
      const replies: CompileReply[] = [];
      const done = new Promise<void>((resolve, reject) => {
        worker.on('message', (r: CompileReply) => replies.push(r) === 2 * list.length && resolve());
        worker.on('error', reject);
      });
      worker.postMessage({ type: 'batch', batch: 7, specs: list.map((c) => c.spec) } satisfies CompileRequest);
      await done;
      for (const [i, c] of list.entries()) {
        const live = replies.find((r) => r.index === i && r.kind === 'live')!;
        const stat = replies.find((r) => r.index === i && r.kind === 'static')!;
        expect(live.batch).toBe(7);
        if (c.id === 'broken') {
          expect(() => compileToVega(c.spec, { logger: quiet })).toThrow();
          expect([live.vega, stat.vega]).toEqual([null, null]);
          continue;
        }
        expect(live.vega, c.id).toEqual(compileToVega(c.spec, { logger: quiet }));
        const warnings: string[] = [];
        expect(stat.vega, c.id).toEqual(compileToVega(staticVariant(c.spec), { logger: { warn: (m) => warnings.push(m) } }));
        expect(stat.warnings, c.id).toEqual(warnings);
      }
      expect(replies.find((r) => r.kind === 'static' && list[r.index].id === 'warned')!.warnings.length).toBeGreaterThan(0);
    } finally {
      await worker.terminate();
    }
  });
});

describe('compiling ahead while drawing', () => {
  it('draws the same SVGs with the same warnings, and delivers the same live specs', { timeout: 60_000 }, async () => {
    const list = [...charts(), warned()];
    const here: string[] = [];
    const before = await renderChartSvgs(list, { logger: { warn: (m) => here.push(m) } });
    compiler = startChartCompiler();
    const batch = compiler.submit(list);
    await settle(1500); // lets the worker deliver some static variants (which ones does not matter)
    const there: string[] = [];
    const after = await renderChartSvgs(list, { logger: { warn: (m) => there.push(m) }, ahead: batch });
    expect(after.map((c) => c.svg)).toEqual(before.map((c) => c.svg));
    expect(there).toEqual(here);
    expect(here.length).toBeGreaterThan(0);
    // Compared as the page embeds them (JSON): drawing tags the spec's data rows in place with a
    // symbol, which the old order (compile after drawing) carried and JSON drops.
    const live = batch.live();
    expect(live.size).toBeLessThanOrEqual(list.length);
    for (const c of list) if (live.has(c.spec)) expect(JSON.stringify(live.get(c.spec)), c.id).toBe(JSON.stringify(compileToVega(c.spec, { logger: quiet })));
  });

  it('a chart that does not compile fails as it does on this thread', { timeout: 60_000 }, async () => {
    const list = [...charts().slice(0, 2), broken()];
    const error = await renderChartSvgs(list, { logger: quiet }).catch((e: Error) => e.message);
    expect(typeof error).toBe('string');
    compiler = startChartCompiler();
    const batch = compiler.submit(list);
    await settle(1500);
    await expect(renderChartSvgs(list, { logger: quiet, ahead: batch })).rejects.toThrow(error as string);
  });

  it('after the worker is closed, every chart is compiled on this thread', { timeout: 60_000 }, async () => {
    const list = charts().slice(0, 3);
    compiler = startChartCompiler();
    await compiler.close();
    const batch = compiler.submit(list);
    expect(list.map((_, i) => batch.static(i))).toEqual([null, null, null]);
    expect(batch.live().size).toBe(0);
    compiler = null;
  });
});
