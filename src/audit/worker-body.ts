/** A worker thread running tasks on request: { id, task } in, { id, ok, result } | { id, ok: false, … } out. */
import { parentPort } from 'node:worker_threads';
import { runTask, type Task } from './pool.ts';
import { InputError, causeChain } from '../errors.ts';

parentPort!.on('message', async (msg: { id: number; task: Task }) => {
  let pending = 0;
  const flush = () => {
    if (pending > 0) parentPort!.postMessage({ id: msg.id, progress: pending });
    pending = 0;
  };
  const timer = setInterval(flush, 200);
  try {
    const result = await runTask(msg.task, (n) => (pending += n));
    flush();
    parentPort!.postMessage({ id: msg.id, ok: true, result });
  } catch (err) {
    flush();
    parentPort!.postMessage({
      id: msg.id,
      ok: false,
      input: err instanceof InputError,
      message: err instanceof Error ? err.message : String(err),
      chain: causeChain(err),
      hint: err instanceof InputError ? err.hint : undefined,
    });
  } finally {
    clearInterval(timer);
  }
});
