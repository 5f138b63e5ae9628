/**
 * Vega-Lite → Vega → SVG, server-side. Compiling at build time lets a page load only
 * `vega.min.js`; rendering with `renderer: 'none'` needs no canvas (text widths are estimated).
 */
import * as vega from 'vega';
import type { ChartSpec } from '../types.ts';
import type { ChartBatch, CompiledStatic } from './compile-ahead.ts';
import { compileToVega, staticVariant, stderrLogger, vegaLogger, type ChartLogger } from './compile.ts';

export { compileToVega, staticVariant, STATIC_POINTS_MAX_ROWS } from './compile.ts';
export type { ChartLogger } from './compile.ts';

/**
 * Render one chart to an SVG string (compile and runtime warnings go to `logger`). `compiled`
 * is its static variant compiled already (`compile-ahead.ts`): its warnings are passed on as
 * if compiled here.
 */
export async function renderChartSvg(chart: ChartSpec, options: { logger?: ChartLogger; compiled?: CompiledStatic | null } = {}): Promise<string> {
  const sink = options.logger ?? stderrLogger;
  let compiled: Record<string, unknown>;
  if (options.compiled) {
    for (const w of options.compiled.warnings) sink.warn(w);
    compiled = options.compiled.vega;
  } else compiled = compileToVega(staticVariant(chart.spec), { logger: sink });
  const view = new vega.View(vega.parse(compiled as vega.Spec), { renderer: 'none', logger: vegaLogger(sink) as never });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}

/** Copies of `charts` with `svg` filled in (inputs are not changed). `ahead`: their compiles, submitted already. */
export async function renderChartSvgs(charts: ChartSpec[], options: { logger?: ChartLogger; ahead?: ChartBatch | null } = {}): Promise<ChartSpec[]> {
  const out: ChartSpec[] = [];
  const turn = () => new Promise<void>((resolve) => setImmediate(resolve));
  for (const [i, c] of charts.entries()) {
    if (options.ahead) await turn(); // lets the worker's answers in (drawing a chart may never leave the microtask queue)
    const compiled = options.ahead?.static(i) ?? null;
    out.push({ ...c, svg: await renderChartSvg(c, { logger: options.logger, compiled }) });
  }
  return out;
}
