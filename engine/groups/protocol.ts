/**
 * Messages between a host thread and the engine worker (`engine/worker.ts`,
 * bundled to `dist/worker.js`). One worker serves two kinds of jobs:
 *
 * - `runPlan`: run a whole plan off the host thread (the editor extension);
 *   the worker reads the data files itself and answers one `runPlanDone`.
 * - `fitGroups`: fit a chunk of groups of one group-by fit from data the host
 *   already loaded and split (`fitGroupsParallel`); the worker answers one
 *   `groupsDone` with a FitResult per group, in the order sent.
 *
 * Cancellation uses a shared flag (an Int32Array of length 1 over a
 * SharedArrayBuffer): the host stores 1, the fits read it once per solver
 * iteration, so a long fit stops without waiting for a message. Every job
 * carries an `id` echoed in its answers. Messages are structured-cloned;
 * typed arrays travel as copies.
 */
import type { FitPlan, Plan } from '../../parser/plan';
import type { FitResult, RunResult } from '../result';
import type { FitData } from '../run/fit-data';
import type { SharedStart } from './starts';
import type { BootstrapChunk, BootstrapJob } from '../run/bootstrap';
import type { BandInputs } from '../run/fit-bands';

/** Options of `runPlan` that can cross a thread boundary (no functions). */
export interface RunPlanJobOptions {
  baseDir: string;
  specText?: string;
  specPath?: string;
  /** Only these fits (by name). Default: all. */
  fits?: string[];
}

export type WorkerRequest =
  | { kind: 'runPlan'; id: number; plan: Plan; options: RunPlanJobOptions; cancelFlag: SharedArrayBuffer | null }
  | {
      kind: 'fitGroups';
      id: number;
      /** The group-by fit. */
      fit: FitPlan;
      /** One group's rows each (engine/run `prepareFitData`), fitted in this order. */
      groups: FitData[];
      /** The fit's shared start (engine/groups/starts.ts), computed once by the host. */
      shared?: SharedStart;
      cancelFlag: SharedArrayBuffer | null;
    }
  /** Bootstrap refits [from, to) of one fit (engine/groups/bootstrap-threads.ts); answered by `bootstrapDone`. */
  | { kind: 'bootstrap'; id: number; job: BootstrapJob; from: number; to: number; cancelFlag: SharedArrayBuffer | null };

export type WorkerResponse =
  /** Progress inside a job: `done` of `total` units (groups, or fits for runPlan). */
  | { kind: 'progress'; id: number; done: number; total: number }
  /** An accepted iteration of a fit the runPlan job solves itself (at most every ITERATION_MS, engine/worker.ts). */
  | { kind: 'iteration'; id: number; fit: string; group?: string; iteration: number; cost: number }
  | { kind: 'runPlanDone'; id: number; result: RunResult }
  /**
   * Results in the order sent; long number arrays travel packed as Float64Arrays and deferred bands as their
   * inputs (`pack.ts`: `packResults`, `unpackResults` restores them): `packed` lists the results holding packed
   * data, `bands` each result's deferred bands. Without `packed`, every result is unpacked.
   */
  | { kind: 'groupsDone'; id: number; results: FitResult[]; packed?: number[]; bands?: (BandInputs | null)[] }
  /** Bootstrap refits of a `bootstrap` job, in index order. */
  | { kind: 'bootstrapDone'; id: number; chunk: BootstrapChunk }
  /** The job itself could not run (a bug, not a fit failure: those are FitResults with stop `failed`). */
  | { kind: 'error'; id: number; message: string };

export type WorkerRequestKind = WorkerRequest['kind'];
export type WorkerResponseKind = WorkerResponse['kind'];

function isObject(x: unknown): x is Record<string, unknown> {
  return typeof x === 'object' && x !== null && !Array.isArray(x);
}

export function isWorkerRequest(x: unknown): x is WorkerRequest {
  if (!isObject(x) || typeof x.id !== 'number') return false;
  const flagOk = x.cancelFlag === null || x.cancelFlag instanceof SharedArrayBuffer;
  if (x.kind === 'runPlan') return flagOk && isObject(x.plan) && isObject(x.options) && typeof x.options.baseDir === 'string';
  if (x.kind === 'fitGroups') return flagOk && isObject(x.fit) && typeof x.fit.name === 'string' && Array.isArray(x.groups) && (x.shared === undefined || (isObject(x.shared) && typeof x.shared.kind === 'string'));
  if (x.kind === 'bootstrap') return flagOk && isObject(x.job) && typeof x.from === 'number' && typeof x.to === 'number';
  return false;
}

export function isWorkerResponse(x: unknown): x is WorkerResponse {
  if (!isObject(x) || typeof x.id !== 'number') return false;
  switch (x.kind) {
    case 'progress':
      return typeof x.done === 'number' && typeof x.total === 'number';
    case 'iteration':
      return typeof x.fit === 'string' && (x.group === undefined || typeof x.group === 'string') && typeof x.iteration === 'number' && typeof x.cost === 'number';
    case 'runPlanDone':
      return isObject(x.result);
    case 'groupsDone':
      return Array.isArray(x.results) && (x.packed === undefined || Array.isArray(x.packed)) && (x.bands === undefined || (Array.isArray(x.bands) && x.bands.length === x.results.length));
    case 'bootstrapDone':
      return isObject(x.chunk) && typeof x.chunk.from === 'number';
    case 'error':
      return typeof x.message === 'string';
    default:
      return false;
  }
}

/** A cancel flag shared with workers, and a token view of it. */
export function createCancelFlag(): SharedArrayBuffer {
  return new SharedArrayBuffer(4);
}

export function setCancelled(flag: SharedArrayBuffer): void {
  Atomics.store(new Int32Array(flag), 0, 1);
}

/** A CancelToken (engine/solve/problem.ts) reading the shared flag; never cancelled without a flag. */
export function cancelTokenOf(flag: SharedArrayBuffer | null): { readonly cancelled: boolean } {
  if (flag === null) return { cancelled: false };
  const view = new Int32Array(flag);
  return {
    get cancelled() {
      return Atomics.load(view, 0) !== 0;
    },
  };
}
