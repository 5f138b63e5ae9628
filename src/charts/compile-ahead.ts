/**
 * Charts compiled ahead on a worker thread while this thread draws them.
 *
 * Each chart is compiled from Vega-Lite to Vega twice: its static variant, drawn as the SVG
 * (`render.ts`), and its full spec, which the page makes live (`report/site.ts`). The two differ
 * in more than the tooltips (Vega-Lite folds the tooltip fields into each mark's text
 * description, which the SVG carries as `aria-label`s), so one cannot be derived from the other
 * without redoing Vega-Lite's work. Both compiles need only vega-lite, with plain JSON in and
 * out, so a worker shares them (`compile-worker.ts`) and this thread keeps the drawing and the
 * pages: the worker compiles a version's full specs, then its static variants from the last
 * chart back, while this thread draws from the first chart on, compiling each static variant
 * the worker has not delivered yet itself. This thread never waits for the worker: on a busy
 * machine it simply does more of the compiles itself.
 *
 * Nothing depends on the worker for correctness: a spec it could not compile, or anything it
 * has not answered yet, is compiled here, with exactly the error and warnings it gave before.
 * The output is the same bytes either way (a Vega spec is plain JSON, copied between threads
 * unchanged).
 */
import { availableParallelism } from 'node:os';
import { Worker } from 'node:worker_threads';
import type { ChartSpec } from '../types.ts';

/** Main thread → worker: a batch of Vega-Lite specs (`ChartSpec.spec`); a static index this thread compiles itself (and every one below it); a batch no longer needed. */
export type CompileRequest =
  | { type: 'batch'; batch: number; specs: Record<string, unknown>[] }
  | { type: 'claim'; batch: number; index: number }
  | { type: 'drop'; batch: number };

/** Worker → main thread: one compiled spec; `vega` null when it did not compile. */
export interface CompileReply {
  batch: number;
  index: number;
  kind: 'static' | 'live';
  vega: Record<string, unknown> | null;
  warnings: string[];
}

/** A static variant compiled on the worker: its Vega spec and the warnings compiling it gave. */
export interface CompiledStatic {
  vega: Record<string, unknown>;
  warnings: string[];
}

/** The compiles of one batch of charts (one version's), as far as the worker has delivered them. */
export interface ChartBatch {
  /**
   * Chart `index`'s static variant if the worker has delivered it; else null, and the worker is
   * told this thread compiles it (and every chart before it). Call with rising `index`; let the
   * event loop turn between calls, or no answer can arrive.
   */
  static(index: number): CompiledStatic | null;
  /**
   * The Vega specs compiled from the charts' full specs so far, keyed by the `spec` object (a
   * chart not in it is compiled here). Ends the batch: the worker drops what is left of it.
   */
  live(): Map<object, Record<string, unknown>>;
}

export interface ChartCompiler {
  /** Queue `charts` (the worker takes batches in the order submitted). */
  submit(charts: ChartSpec[]): ChartBatch;
  /** Stop the worker. */
  close(): Promise<void>;
}

/**
 * Fewest datasets (pending versions together) for which the worker is started. Starting it and
 * loading vega-lite there costs about 0.2 s of CPU and some 20–30 MiB; a version has about four
 * charts a dataset plus one per measure across datasets. The benchmark's one-dataset build (four
 * charts; its peak RSS is a target) stays on this thread.
 */
export const AHEAD_MIN_DATASETS = 4;

/** Whether compiling ahead can pay: enough charts, and a second core to run on. */
export function compileAheadWorthwhile(datasets: number): boolean {
  return datasets >= AHEAD_MIN_DATASETS && availableParallelism() > 1;
}

// Compiled, the worker runs compile-worker.js; from the sources, worker.mjs registers tsx first.
const ENTRY = import.meta.url.endsWith('.js') ? new URL('./compile-worker.js', import.meta.url) : new URL('./worker.mjs', import.meta.url);

interface Batch {
  specs: Record<string, unknown>[];
  statics: (CompiledStatic | null | undefined)[];
  live: Map<object, Record<string, unknown>>;
}

/** Start the worker. Call `close()` when done: it keeps the process alive until then. */
export function startChartCompiler(): ChartCompiler {
  const worker = new Worker(ENTRY);
  const batches = new Map<number, Batch>();
  let stopped = false;
  let nextBatch = 0;
  const send = (m: CompileRequest) => {
    if (stopped) return;
    try {
      worker.postMessage(m);
    } catch {
      stopped = true; // whatever is not answered is compiled on this thread
    }
  };
  worker.on('message', (r: CompileReply) => {
    const b = batches.get(r.batch);
    if (!b || !r.vega) return;
    if (r.kind === 'static') b.statics[r.index] ??= { vega: r.vega, warnings: r.warnings };
    else b.live.set(b.specs[r.index], r.vega);
  });
  const stop = () => {
    stopped = true;
  };
  worker.on('error', stop);
  worker.on('exit', stop);
  return {
    submit(charts) {
      const batch = nextBatch++;
      const b: Batch = { specs: charts.map((c) => c.spec), statics: [], live: new Map() };
      batches.set(batch, b);
      if (b.specs.length) send({ type: 'batch', batch, specs: b.specs });
      return {
        static(index) {
          const got = b.statics[index];
          if (got) return got;
          b.statics[index] = null; // claimed: a late answer is ignored
          send({ type: 'claim', batch, index });
          return null;
        },
        live() {
          batches.delete(batch);
          send({ type: 'drop', batch });
          return b.live;
        },
      };
    },
    async close() {
      stopped = true;
      batches.clear();
      await worker.terminate();
    },
  };
}
