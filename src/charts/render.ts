/**
 * Vega-Lite → Vega → SVG, server-side. Compiling at build time lets a page load only
 * `vega.min.js`; rendering with `renderer: 'none'` needs no canvas (text widths are estimated).
 */
import * as vega from 'vega';
import * as vl from 'vega-lite';
import type { ChartSpec } from '../types.ts';

/** Where compile and runtime warnings go; the default prints each once to stderr. */
export interface ChartLogger {
  warn(message: string): void;
}

const printed = new Set<string>();
const stderrLogger: ChartLogger = {
  warn(message) {
    if (printed.has(message)) return;
    printed.add(message);
    console.warn(`[lacuna charts] ${message}`);
  },
};

/** A vega-util style logger that forwards warnings and errors to `sink`. */
function vegaLogger(sink: ChartLogger) {
  let lvl = 2;
  const text = (args: unknown[]) => args.map((a) => (a instanceof Error ? a.message : String(a))).join(' ');
  const logger = {
    level(l?: number) {
      if (l === undefined) return lvl as never;
      lvl = l;
      return logger as never;
    },
    warn(...args: unknown[]) {
      sink.warn(text(args));
      return logger;
    },
    error(...args: unknown[]) {
      sink.warn(`error: ${text(args)}`);
      return logger;
    },
    info() {
      return logger;
    },
    debug() {
      return logger;
    },
  };
  return logger;
}

/** Compile a Vega-Lite spec (a `ChartSpec.spec`) to a Vega spec. Pure; warnings go to `logger`. */
export function compileToVega(spec: Record<string, unknown>, options: { logger?: ChartLogger } = {}): Record<string, unknown> {
  const compiled = vl.compile(spec as unknown as vl.TopLevelSpec, { logger: vegaLogger(options.logger ?? stderrLogger) as never });
  return compiled.spec as unknown as Record<string, unknown>;
}

/** Above this many rows, a line's point overlay is left out of the static SVG. */
export const STATIC_POINTS_MAX_ROWS = 100;

/**
 * The Vega-Lite spec drawn as the static SVG: the same chart without what only a pointer can use.
 * - `tooltip` encodings are dropped (a static image shows none);
 * - a line's `point` overlay is dropped when its inline data have more than
 *   STATIC_POINTS_MAX_ROWS rows and no gap (a null or NaN y): on a chart some 600 px wide the
 *   points merge into a thick line. With gaps the points stay, or a defined value between two
 *   gaps (a line of one point) would not be drawn at all.
 *   On the benchmark's gap-free 1,000-window population-sparseness chart this cut the SVG from
 *   335 KB to 40 KB and its drawing time by a third to two thirds (cold).
 * The live chart on the page is compiled from the full spec and keeps both.
 * Pure: returns a new object; `spec` is not changed.
 */
export function staticVariant(spec: Record<string, unknown>): Record<string, unknown> {
  const walk = (node: unknown, rows: unknown[] | null): unknown => {
    if (Array.isArray(node)) return node.map((n) => walk(n, rows));
    if (node === null || typeof node !== 'object') return node;
    const obj = node as Record<string, unknown>;
    const data = obj.data as { values?: unknown[] } | undefined;
    const here = Array.isArray(data?.values) ? data.values : rows;
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(obj)) {
      if (k === 'tooltip' && node !== spec && isEncoding(obj)) continue;
      if (k === 'data') out[k] = v; // data are copied as they are (never walked: values may hold any keys)
      else out[k] = walk(v, here);
    }
    const mark = out.mark as Record<string, unknown> | undefined;
    if (mark && typeof mark === 'object' && mark.type === 'line' && 'point' in mark && here && here.length > STATIC_POINTS_MAX_ROWS) {
      const yField = ((out.encoding as Record<string, { field?: unknown }> | undefined)?.y?.field ?? null) as string | null;
      const gap = yField === null || here.some((r) => {
        const y = (r as Record<string, unknown> | null)?.[yField];
        return y === null || y === undefined || (typeof y === 'number' && Number.isNaN(y));
      });
      if (!gap) {
        const { point: _dropped, ...rest } = mark;
        out.mark = rest;
      }
    }
    return out;
  };
  return walk(spec, null) as Record<string, unknown>;
}

/** An encoding object: holds channels (x, y, color, …) rather than being a mark or a view. */
function isEncoding(obj: Record<string, unknown>): boolean {
  return !('mark' in obj) && !('layer' in obj) && !('data' in obj) && !('encoding' in obj);
}

/** Render one chart to an SVG string (compile and runtime warnings go to `logger`). */
export async function renderChartSvg(chart: ChartSpec, options: { logger?: ChartLogger } = {}): Promise<string> {
  const sink = options.logger ?? stderrLogger;
  const runtime = vega.parse(compileToVega(staticVariant(chart.spec), { logger: sink }) as vega.Spec);
  const view = new vega.View(runtime, { renderer: 'none', logger: vegaLogger(sink) as never });
  try {
    return await view.toSVG();
  } finally {
    view.finalize();
  }
}

/** Copies of `charts` with `svg` filled in (inputs are not changed). */
export async function renderChartSvgs(charts: ChartSpec[], options: { logger?: ChartLogger } = {}): Promise<ChartSpec[]> {
  const out: ChartSpec[] = [];
  for (const c of charts) out.push({ ...c, svg: await renderChartSvg(c, options) });
  return out;
}
