/**
 * Runs a plan off the extension host's main thread, in the engine's worker
 * (engine/worker.ts bundled to dist/worker.js; protocol in
 * engine/groups/protocol.ts). One worker per run, ended when the run ends.
 *
 * Cancellation: the shared cancel flag is set first (the solvers read it once
 * per iteration and stop with `stop.code = 'cancelled'`); if the worker has
 * not answered `CANCEL_GRACE_MS` (default 1500 ms) later it is terminated.
 * The outcome says which happened (`how`), for the log and the tests.
 * No vscode import: the extension wraps this in a progress notification.
 */
import { Worker } from 'node:worker_threads';
import type { Plan } from '../../parser/plan';
import type { RunResult } from '../../engine/result';
import type { RunIteration } from '../../engine/runner';
import { createCancelFlag, isWorkerResponse, setCancelled, type RunPlanJobOptions, type WorkerRequest } from '../../engine/groups/protocol';

/** Wait after setting the cancel flag before terminating the worker. */
export const CANCEL_GRACE_MS = 1500;

export type RunOutcome =
  | { kind: 'done'; result: RunResult }
  /**
   * `stopped`: the engine saw the flag and answered with what it had (`partial`: fits
   * or groups not finished carry stop code `cancelled`); `terminated`: the worker was
   * ended after the grace period.
   */
  | { kind: 'cancelled'; how: 'stopped'; partial: RunResult }
  | { kind: 'cancelled'; how: 'terminated' }
  | { kind: 'crashed'; message: string };

export interface RunJob {
  plan: Plan;
  options: RunPlanJobOptions;
  /** Called with `done` of `total` units (fits or groups). */
  onProgress?: (done: number, total: number) => void;
  /** An accepted iteration of a fit solved in the worker (throttled there). */
  onIteration?: (info: RunIteration) => void;
  /** Wait after a cancel before terminating the worker, in ms (default CANCEL_GRACE_MS). */
  graceMs?: number;
}

/** A cancellation source shaped like vscode.CancellationToken (subset). */
export interface CancelSignal {
  readonly isCancellationRequested: boolean;
  onCancellationRequested(listener: () => void): { dispose(): void };
}

export function runInWorker(workerPath: string, job: RunJob, cancel?: CancelSignal): Promise<RunOutcome> {
  return new Promise<RunOutcome>((resolve) => {
    let settled = false;
    let cancelled = false;
    const flag = createCancelFlag();
    let worker: Worker;
    try {
      worker = new Worker(workerPath);
    } catch (e) {
      resolve({ kind: 'crashed', message: `could not start the fit worker (${workerPath}): ${e instanceof Error ? e.message : String(e)}` });
      return;
    }
    let grace: NodeJS.Timeout | undefined;
    const sub = cancel?.onCancellationRequested(() => {
      cancelled = true;
      setCancelled(flag);
      grace = setTimeout(() => finish({ kind: 'cancelled', how: 'terminated' }), job.graceMs ?? CANCEL_GRACE_MS);
    });
    const finish = (outcome: RunOutcome): void => {
      if (settled) return;
      settled = true;
      if (grace) clearTimeout(grace);
      sub?.dispose();
      void worker.terminate();
      resolve(outcome);
    };
    worker.on('message', (msg: unknown) => {
      if (!isWorkerResponse(msg) || msg.id !== 1) return;
      if (msg.kind === 'progress') job.onProgress?.(msg.done, msg.total);
      else if (msg.kind === 'iteration') job.onIteration?.({ fit: msg.fit, ...(msg.group !== undefined ? { group: msg.group } : {}), iteration: msg.iteration, cost: msg.cost });
      else if (msg.kind === 'runPlanDone') finish(cancelled ? { kind: 'cancelled', how: 'stopped', partial: msg.result } : { kind: 'done', result: msg.result });
      else if (msg.kind === 'error') finish({ kind: 'crashed', message: msg.message });
    });
    worker.on('error', (e) => finish({ kind: 'crashed', message: e instanceof Error ? e.message : String(e) }));
    worker.on('exit', (code) => finish(cancelled ? { kind: 'cancelled', how: 'terminated' } : { kind: 'crashed', message: `the fit worker exited (code ${code}) before answering` }));
    const request: WorkerRequest = { kind: 'runPlan', id: 1, plan: job.plan, options: job.options, cancelFlag: flag };
    worker.postMessage(request);
    if (cancel?.isCancellationRequested) {
      cancelled = true;
      setCancelled(flag);
    }
  });
}
