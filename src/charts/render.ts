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

/** Render one chart to an SVG string (compile and runtime warnings go to `logger`). */
export async function renderChartSvg(chart: ChartSpec, options: { logger?: ChartLogger } = {}): Promise<string> {
  const sink = options.logger ?? stderrLogger;
  const runtime = vega.parse(compileToVega(chart.spec, { logger: sink }) as vega.Spec);
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
