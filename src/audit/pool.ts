/**
 * Run dataset tasks on worker threads, or in this thread when one worker is asked for.
 * A task is a whole dataset (→ DatasetResult) or one unit range of a split activity dataset
 * (→ its pass state). Results come back in task order. Progress (bytes measured) is reported
 * as workers send it. The first failure stops the pool and is rethrown; an InputError from a
 * worker stays an InputError here, with its chain of causes.
 */
import { Worker } from 'node:worker_threads';
import { InputError, InternalError } from '../errors.ts';
import type { DatasetResult } from '../types.ts';
import type { ActivityPassState } from '../metrics/activity-pass.ts';
import { computeDataset, computePassPart, type DatasetJob } from './dataset.ts';

export type Task = { kind: 'dataset'; job: DatasetJob } | { kind: 'pass'; job: DatasetJob; range: { unitStart: number; unitEnd: number } };
export type TaskResult = DatasetResult | ActivityPassState;

type Reply =
  | { id: number; progress: number }
  | { id: number; ok: true; result: TaskResult }
  | { id: number; ok: false; input: boolean; message: string; chain: string[]; hint?: string };

/** Run one task in this thread (also the worker's body). */
export function runTask(task: Task, onBytes: (n: number) => void): Promise<TaskResult> {
  return task.kind === 'dataset' ? computeDataset(task.job, onBytes) : computePassPart(task.job, task.range, onBytes);
}

export async function runTasks(tasks: Task[], workers: number, onBytes: (n: number) => void): Promise<TaskResult[]> {
  const results: TaskResult[] = new Array(tasks.length);
  if (workers <= 1) {
    for (let i = 0; i < tasks.length; i++) results[i] = await runTask(strip(tasks[i]), onBytes);
    return results;
  }
  const pool = Array.from({ length: Math.min(workers, tasks.length) }, () => new Worker(new URL('./worker.mjs', import.meta.url)));
  let next = 0;
  try {
    await Promise.all(
      pool.map(
        (w) =>
          new Promise<void>((resolve, reject) => {
            const feed = () => {
              if (next >= tasks.length) return resolve();
              const id = next++;
              w.postMessage({ id, task: strip(tasks[id]) });
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

/** Only the plain fields a worker needs (structured clone of the task). */
function strip(t: Task): Task {
  const job = { workspace: t.job.workspace, manifest: t.job.manifest, datasetIndex: t.job.datasetIndex, files: t.job.files };
  return t.kind === 'dataset' ? { kind: 'dataset', job } : { kind: 'pass', job, range: t.range };
}
