/**
 * Run dataset tasks on lanes: worker threads plus, optionally, this thread as one more lane.
 * A task is the SHA-256 of one input file (→ hex string), a whole dataset (→ its DatasetResult, and the hashes of files it hashed in its reads),
 * one unit range of a split activity dataset (→ its pass state, and the hashes of files it
 * hashed in its reads), or one measure's summary and
 * interval of a split dataset being finished (→ MeasureResult). Results come back in task order. Progress (bytes measured) is reported
 * as lanes send it. The first failure stops handing out tasks and is rethrown; an InputError
 * from a worker stays an InputError here, with its chain of causes.
 *
 * Workers are started when the pool is made, so a build can make the pool before it hashes its
 * inputs and the workers' start-up (loading the TypeScript sources, about 0.4 s here) overlaps
 * with that work. This thread as a lane needs no start-up at all.
 */
import { Worker } from 'node:worker_threads';
import { inputErrorWithHint, InternalError } from '../errors.ts';
import type { DatasetResult, MeasureResult } from '../types.ts';
import { summarise, type SummariseJob } from './summarise.ts';
import { computePassPart, measureDataset, type DatasetJob, type DatasetOutcome, type PassPart } from './dataset.ts';
import { sha256File } from './cache.ts';

export type Task =
  | { kind: 'hash'; path: string }
  | { kind: 'dataset'; job: DatasetJob }
  | { kind: 'pass'; job: DatasetJob; range: { unitStart: number; unitEnd: number } }
  | { kind: 'summarise'; job: SummariseJob };
export type TaskResult = DatasetOutcome | PassPart | MeasureResult | string;

type Reply =
  | { id: number; progress: number }
  | { id: number; ok: true; result: TaskResult }
  | { id: number; ok: false; input: boolean; message: string; chain: string[]; hint?: string };

/** Run one task in this thread (also the worker's body). */
export async function runTask(task: Task, onBytes: (n: number) => void): Promise<TaskResult> {
  if (task.kind === 'hash') return sha256File(task.path, onBytes);
  if (task.kind === 'summarise') return summarise(task.job.plan, task.job.stat, task.job.summary);
  return task.kind === 'dataset' ? measureDataset(task.job, onBytes) : computePassPart(task.job, task.range, onBytes);
}

export interface Pool {
  /** Number of lanes: worker threads, plus one when this thread works too. */
  lanes: number;
  /**
   * Run `tasks`; with `mainLaneAfter`, this thread takes tasks only once that promise settles
   * (it is busy with other work meanwhile, e.g. loading the render modules). `onResult` is told
   * of each task's result as it arrives, so a caller keeps what finished even when a later task
   * fails and `run` rejects.
   */
  run(tasks: Task[], onBytes: (n: number) => void, options?: { mainLaneAfter?: Promise<unknown>; onResult?: (index: number, result: TaskResult) => void }): Promise<TaskResult[]>;
  close(): Promise<void>;
}

/**
 * What a worker thread loads: compiled, this file is dist/audit/pool.js and the body sits beside
 * it as JavaScript; from the sources, a small .mjs bootstrap registers tsx first (a worker
 * cannot load .ts by itself).
 */
const WORKER_ENTRY = import.meta.url.endsWith('.js') ? new URL('./worker-body.js', import.meta.url) : new URL('./worker.mjs', import.meta.url);

/** A pool of `workers` worker threads, plus this thread as a lane when `mainLane`. */
export function createPool(workers: number, options: { mainLane: boolean }): Pool {
  const threads = Array.from({ length: Math.max(0, workers) }, () => new Worker(WORKER_ENTRY));
  let closed = false;
  return {
    lanes: threads.length + (options.mainLane ? 1 : 0),
    async run(tasks, onBytes, runOptions = {}) {
      if (closed) throw new InternalError('pool used after close');
      const results: TaskResult[] = new Array(tasks.length);
      let next = 0;
      let failed: unknown = null;
      const take = () => (failed === null && next < tasks.length ? next++ : -1);
      const mainLane = async () => {
        if (runOptions.mainLaneAfter) await runOptions.mainLaneAfter.catch(() => {}); // (its failure is the caller's to report)
        for (let id = take(); id >= 0; id = take()) {
          results[id] = await runTask(strip(tasks[id]), onBytes);
          runOptions.onResult?.(id, results[id]);
        }
      };
      const workerLane = (w: Worker) =>
        new Promise<void>((resolve, reject) => {
          const feed = () => {
            const id = take();
            if (id < 0) return finish(resolve);
            w.postMessage({ id, task: strip(tasks[id]) });
          };
          const onMessage = (msg: Reply) => {
            if ('progress' in msg) return onBytes(msg.progress);
            if (msg.ok) {
              results[msg.id] = msg.result;
              runOptions.onResult?.(msg.id, msg.result);
              return feed();
            }
            const cause = msg.chain.slice(1).reduceRight<Error | undefined>((c, m) => new Error(m, c ? { cause: c } : undefined), undefined);
            finish(() => reject(msg.input ? inputErrorWithHint(msg.message, cause, msg.hint) /* message already holds the hint */ : new InternalError(`worker failed: ${msg.message}`, cause)));
          };
          const onError = (err: Error) => finish(() => reject(new InternalError('worker thread crashed', err)));
          const onExit = (code: number) => finish(() => reject(new InternalError(`worker thread exited with code ${code}`)));
          const finish = (then: () => void) => {
            w.off('message', onMessage);
            w.off('error', onError);
            w.off('exit', onExit);
            then();
          };
          w.on('message', onMessage);
          w.on('error', onError);
          w.on('exit', onExit);
          feed();
        });
      const lanes = [...threads.map(workerLane), ...(options.mainLane ? [mainLane()] : [])].map((p) =>
        p.catch((err) => {
          if (failed === null) failed = err;
        }),
      );
      await Promise.all(lanes);
      if (failed !== null) throw failed;
      return results;
    },
    async close() {
      closed = true;
      await Promise.all(threads.map((w) => w.terminate()));
    },
  };
}

/** Only the plain fields a worker needs (structured clone of the task). */
function strip(t: Task): Task {
  if (t.kind === 'summarise' || t.kind === 'hash') return t;
  const job = { workspace: t.job.workspace, manifest: t.job.manifest, datasetIndex: t.job.datasetIndex, files: t.job.files, hashInPass: t.job.hashInPass, stamps: t.job.stamps };
  return t.kind === 'dataset' ? { kind: 'dataset', job } : { kind: 'pass', job, range: t.range };
}
