/**
 * Worker-thread body of `compile-ahead.ts`. For each batch of charts, in the order received: the
 * full specs compiled to Vega (made live on the pages), first to last; then the static variants
 * (drawn as SVG), last to first, until it meets the main thread, which compiles them first to
 * last and claims each one before it starts on it. Each result is posted as soon as it is ready,
 * and the loop yields between compiles so that claims and dropped batches are seen at once.
 * Loads vega-lite only. A spec that does not compile is answered with `vega: null`: the main
 * thread then compiles it itself, so its error and warnings are exactly those of compiling there.
 */
import { parentPort } from 'node:worker_threads';
import { compileToVega, staticVariant } from './compile.ts';
import type { CompileReply, CompileRequest } from './compile-ahead.ts';

const port = parentPort!;
const queue: { batch: number; specs: Record<string, unknown>[] }[] = [];
/** Per batch: the highest static index the main thread has claimed (-1: none); absent once dropped. */
const claimed = new Map<number, number>();
let running = false;

port.on('message', (m: CompileRequest) => {
  if (m.type === 'batch') {
    queue.push({ batch: m.batch, specs: m.specs });
    claimed.set(m.batch, -1);
    if (!running) void run();
  } else if (m.type === 'claim') {
    if (claimed.has(m.batch)) claimed.set(m.batch, Math.max(claimed.get(m.batch)!, m.index));
  } else claimed.delete(m.batch);
});

const turn = () => new Promise<void>((resolve) => setImmediate(resolve));

async function run(): Promise<void> {
  running = true;
  for (let job = queue.shift(); job; job = queue.shift()) {
    const { batch, specs } = job;
    for (let i = 0; i < specs.length && claimed.has(batch); i++) {
      port.postMessage(reply(batch, i, 'live', specs[i], false));
      await turn();
    }
    for (let i = specs.length - 1; i > (claimed.get(batch) ?? Infinity); i--) {
      port.postMessage(reply(batch, i, 'static', specs[i], true));
      await turn();
    }
  }
  running = false;
}

function reply(batch: number, index: number, kind: CompileReply['kind'], spec: Record<string, unknown>, asStatic: boolean): CompileReply {
  // The main thread prints a static compile's warnings (as compiling there would); a live
  // compile's are not shown, as before (it is the same chart, with tooltips).
  const warnings: string[] = [];
  try {
    const vega = asStatic ? compileToVega(staticVariant(spec), { logger: { warn: (m) => warnings.push(m) } }) : compileToVega(spec, { logger: { warn() {} } });
    return { batch, index, kind, vega, warnings };
  } catch {
    return { batch, index, kind, vega: null, warnings: [] };
  }
}
