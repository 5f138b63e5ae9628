/**
 * Run dataset jobs on worker threads (one dataset per worker at a time), or in this thread
 * when one worker is asked for. Results come back in job order. Progress (bytes measured)
 * is reported as workers send it. The first failure stops the pool and is rethrown; an
 * InputError from a worker stays an InputError here, with its chain of causes.
 */
import { Worker } from 'node:worker_threads';
import { InputError, InternalError } from '../errors.ts';
import type { DatasetResult } from '../types.ts';
import { computeDataset, type DatasetJob } from './dataset.ts';

type Reply =
  | { id: number; progress: number }
  | { id: number; ok: true; result: DatasetResult }
  | { id: number; ok: false; input: boolean; message: string; chain: string[]; hint?: string };

export async function runJobs(jobs: DatasetJob[], workers: number, onBytes: (n: number) => void): Promise<DatasetResult[]> {
  const results: DatasetResult[] = new Array(jobs.length);
  if (workers <= 1) {
    for (let i = 0; i < jobs.length; i++) results[i] = await computeDataset(strip(jobs[i]), onBytes);
    return results;
  }
  const pool = Array.from({ length: Math.min(workers, jobs.length) }, () => new Worker(new URL('./worker.mjs', import.meta.url)));
  let next = 0;
  try {
    await Promise.all(
      pool.map(
        (w) =>
          new Promise<void>((resolve, reject) => {
            const feed = () => {
              if (next >= jobs.length) return resolve();
              const id = next++;
              w.postMessage({ id, job: strip(jobs[id]) });
            };
            w.on('message', (msg: Reply) => {
              if ('progress' in msg) return onBytes(msg.progress);
              if (msg.ok) {
                results[msg.id] = msg.result;
                return feed();
              }
              const cause = msg.chain.slice(1).reduceRight<Error | undefined>((c, m) => new Error(m, c ? { cause: c } : undefined), undefined);
              reject(msg.input ? new InputError(msg.message, { cause, hint: msg.hint }) : new InternalError(`worker failed: ${msg.message}`, cause));
            });
            w.on('error', (err) => reject(new InternalError('worker thread crashed', err)));
            w.on('exit', (code) => {
              if (code !== 0) reject(new InternalError(`worker thread exited with code ${code}`));
            });
            feed();
          }),
      ),
    );
  } finally {
    await Promise.all(pool.map((w) => w.terminate()));
  }
  return results;
}

/** Only the plain fields a worker needs (structured clone of the job). */
function strip(j: DatasetJob): DatasetJob {
  return { workspace: j.workspace, manifest: j.manifest, datasetIndex: j.datasetIndex, files: j.files };
}
