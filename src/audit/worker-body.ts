/** A worker thread computing datasets on request: { job } in, { ok, result } | { ok: false, error } out. */
import { parentPort } from 'node:worker_threads';
import { computeDataset, type DatasetJob } from './dataset.ts';
import { InputError, causeChain } from '../errors.ts';

parentPort!.on('message', async (msg: { id: number; job: DatasetJob }) => {
  let pending = 0;
  const flush = () => {
    if (pending > 0) parentPort!.postMessage({ id: msg.id, progress: pending });
    pending = 0;
  };
  const timer = setInterval(flush, 200);
  try {
    const result = await computeDataset(msg.job, (n) => (pending += n));
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
