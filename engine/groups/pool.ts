/**
 * A small pool of worker threads running chunks of groups (`fitGroups` jobs,
 * see protocol.ts). Each worker takes the next chunk as soon as it answers
 * the previous one (dynamic scheduling, so a slow group delays only its own
 * chunk); answers are handed back by chunk index, so the caller can place
 * results in input order whatever the finishing order.
 *
 * A worker holds up to IN_FLIGHT chunks (the one it fits and the next).
 *
 * Failure handling:
 * - a worker that exits (crash, out of memory) while holding chunks fails
 *   those chunks' groups (`onChunkFailed`) and is replaced;
 * - a worker that exits before it answered anything is taken as a start-up
 *   failure (e.g. an unusable worker file): no more workers are started and
 *   no more chunks taken; the chunks it held are returned in `notRun`;
 * - once the shared cancel flag is set, no further chunk is taken.
 * Chunks come from a queue (`take`) that the caller may also consume.
 */
import { Worker } from 'node:worker_threads';
import type { FitPlan } from '../../parser/plan';
import type { FitResult } from '../result';
import type { FitData } from '../run/fit-data';
import { isWorkerResponse, type WorkerRequest } from './protocol';
import { unpackNumbers, unpackResults } from './pack';
import type { SharedStart } from './starts';

export interface PoolJob {
  workerFile: string;
  threads: number;
  fit: FitPlan;
  /** The fit's shared start, sent with every chunk. */
  shared?: SharedStart;
  chunks: readonly FitData[][];
  /** The next chunk index to fit, or null when none is left (a queue shared with other consumers). */
  take(): number | null;
  cancelFlag: SharedArrayBuffer;
  /** Groups of chunk `chunk` finished so far (progress inside a chunk). */
  onChunkProgress(chunk: number, done: number): void;
  onChunkDone(chunk: number, results: FitResult[]): void;
  onChunkFailed(chunk: number, message: string): void;
}

export interface PoolOutcome {
  /** Chunks taken by a worker that could not start (still to be fitted). Chunks never taken stay in the queue. */
  notRun: number[];
  /** Why workers could not start, when they could not. */
  startupError: string | null;
}

/**
 * Chunks a worker holds at once: the one it is fitting and the next, already
 * waiting in its message queue, so it does not sit idle while this thread
 * (which fits groups too) gets round to reading its answer and sending more.
 * Measured before (2026-12-03, 10,000 12-point groups, two threads): the
 * worker idle 12 % of its time with one chunk at a time.
 */
export const IN_FLIGHT = 2;

export function runChunksInWorkers(job: PoolJob): Promise<PoolOutcome> {
  const cancelView = new Int32Array(job.cancelFlag);
  const isCancelled = () => Atomics.load(cancelView, 0) !== 0;
  const notRun: number[] = [];
  let active = 0;
  let startupError: string | null = null;

  return new Promise((resolve) => {
    const finishIfIdle = () => {
      if (active > 0) return;
      resolve({ notRun: notRun.sort((a, b) => a - b), startupError });
    };

    const launch = () => {
      let worker: Worker;
      try {
        worker = new Worker(job.workerFile);
      } catch (e) {
        startupError = e instanceof Error ? e.message : String(e);
        finishIfIdle();
        return;
      }
      active++;
      /** Chunks posted to this worker and not answered yet, oldest first (it fits them in that order). */
      const held: number[] = [];
      let answered = false;
      let lastError: Error | null = null;

      const give = () => {
        while (held.length < IN_FLIGHT) {
          const c = startupError !== null || isCancelled() ? null : job.take();
          if (c === null) break;
          held.push(c);
          const request: WorkerRequest = { kind: 'fitGroups', id: c, fit: job.fit, groups: job.chunks[c], ...(job.shared ? { shared: job.shared } : {}), cancelFlag: job.cancelFlag };
          worker.postMessage(request);
        }
        if (held.length === 0) void worker.terminate();
      };

      worker.on('message', (m: unknown) => {
        if (!isWorkerResponse(m) || !held.includes(m.id)) return;
        answered = true;
        if (m.kind === 'progress') {
          job.onChunkProgress(m.id, m.done);
          return;
        }
        held.splice(held.indexOf(m.id), 1);
        if (m.kind === 'groupsDone') {
          const results = m.packed !== undefined ? unpackResults({ results: m.results, packed: m.packed, bands: m.bands ?? [] }, job.fit) : unpackNumbers(m.results, job.fit);
          job.onChunkDone(m.id, results);
        } else if (m.kind === 'error') job.onChunkFailed(m.id, m.message);
        else job.onChunkFailed(m.id, `unexpected answer ${m.kind} from a worker thread`);
        give();
      });
      worker.on('error', (err) => {
        lastError = err;
      });
      worker.on('exit', (code) => {
        active--;
        if (held.length > 0) {
          const why = lastError?.message ?? `exit code ${code}`;
          if (!answered) {
            startupError ??= `worker thread could not start: ${why}`;
            notRun.push(...held);
          } else {
            for (const c of held) job.onChunkFailed(c, `the worker thread fitting this group stopped: ${why}`);
            if (startupError === null && !isCancelled()) launch();
          }
          held.length = 0;
        }
        finishIfIdle();
      });
      give();
    };

    const n = Math.max(1, Math.min(job.threads, job.chunks.length));
    if (job.chunks.length === 0) finishIfIdle();
    else for (let t = 0; t < n; t++) launch();
  });
}
