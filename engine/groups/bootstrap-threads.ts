/**
 * Bootstrap refits on worker threads (the engine worker, engine/worker.ts,
 * request `bootstrap`): the refits 0 … total − 1 of a job are cut into chunks
 * of consecutive indices, each worker takes the next chunk when it answers the
 * previous one (dynamic scheduling), and the answers are joined by index. A
 * chunk whose worker fails or exits, and every chunk left when no worker can
 * start, is computed in this thread. Each refit depends only on its index
 * (engine/run/bootstrap.ts), so the result is bit-identical whatever the
 * number of threads, the chunking or the finishing order.
 *
 * When to use threads (`bootstrapThreads`): `threads: 1` never; `threads N`
 * (N ≥ 2) always; automatic: all cores when the job has at least
 * AUTO_MIN_REFIT_ROWS refit-rows (refits × rows). Measured (test/bench case
 * 21, 2026-12-03, 2 cores under a load average of 19): 2100 refits of 100
 * rows (210,000 refit-rows) took 1.2 s in one thread and 4.1 s on two
 * workers, so the bound keeps jobs under about 5 s of one-thread work here.
 */
import os from 'node:os';
import { Worker } from 'node:worker_threads';
import { isWorkerResponse, type WorkerRequest } from './protocol';
import { jobSize, runBootstrapRange, type BootstrapChunk, type BootstrapJob } from '../run/bootstrap';

/** Refits × rows below which the refits stay in this thread when the thread count is automatic. */
export const AUTO_MIN_REFIT_ROWS = 1_000_000;

/** Chunks per thread: small enough to balance slow refits, large enough that messages cost little. */
const CHUNKS_PER_THREAD = 8;

export function bootstrapThreads(job: Pick<BootstrapJob, 'replicates' | 'jackknife' | 'data'>, asked: number | undefined, cores = os.availableParallelism()): number {
  if (asked !== undefined) return Number.isFinite(asked) && asked >= 2 ? Math.floor(asked) : 1;
  if (cores < 2) return 1;
  return jobSize(job) * job.data.n >= AUTO_MIN_REFIT_ROWS ? cores : 1;
}

/** The refits of `job` on `threads` worker threads from `workerFile` (see the module comment). */
export function runBootstrapInWorkers(job: BootstrapJob, threads: number, workerFile: string, cancelFlag: SharedArrayBuffer | null): Promise<BootstrapChunk[]> {
  const total = jobSize(job);
  const size = Math.max(8, Math.ceil(total / (threads * CHUNKS_PER_THREAD)));
  const ranges: [number, number][] = [];
  for (let from = 0; from < total; from += size) ranges.push([from, Math.min(total, from + size)]);
  const done: (BootstrapChunk | undefined)[] = new Array(ranges.length);
  let next = 0;
  let active = 0;
  let id = 0;
  return new Promise((resolve) => {
    const finish = () => {
      if (active > 0) return;
      // whatever no worker answered (none could start, or one failed) is computed here
      for (let c = 0; c < ranges.length; c++) if (!done[c]) done[c] = runBootstrapRange(job, ranges[c][0], ranges[c][1]);
      resolve(done as BootstrapChunk[]);
    };
    const launch = () => {
      let worker: Worker;
      try {
        worker = new Worker(workerFile);
      } catch {
        finish();
        return;
      }
      active++;
      let current = -1;
      let requestId = -1;
      const give = () => {
        if (next >= ranges.length) {
          current = -1;
          void worker.terminate();
          return;
        }
        current = next++;
        requestId = id++;
        const [from, to] = ranges[current];
        const request: WorkerRequest = { kind: 'bootstrap', id: requestId, job, from, to, cancelFlag };
        worker.postMessage(request);
      };
      worker.on('message', (m: unknown) => {
        if (!isWorkerResponse(m) || m.id !== requestId) return;
        if (m.kind === 'bootstrapDone') done[current] = m.chunk;
        give();
      });
      worker.on('error', () => undefined);
      worker.on('exit', () => {
        active--;
        finish();
      });
      give();
    };
    const n = Math.max(1, Math.min(threads, ranges.length));
    if (ranges.length === 0) resolve([]);
    else for (let t = 0; t < n; t++) launch();
  });
}
