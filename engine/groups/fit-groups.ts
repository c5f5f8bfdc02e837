/**
 * Fitting the groups of a `per COLUMN` fit on several threads.
 *
 *   fitGroupsParallel(plan, fitName, { baseDir, threads, cancel, onProgress })
 *     loads the fit's data, splits it by group (engine/run `prepareFitData`,
 *     the same split and order as the sequential runner), fits the groups and
 *     resolves to one FitResult per group, sorted by group value.
 *   fitGroupData(fit, groups, options)
 *     the same from data already split (the runner's hook, `groupRunner`).
 *
 * Groups are sent in chunks to worker threads running the bundled engine
 * worker (`worker.js` beside this bundle, i.e. `dist/worker.js`). When that
 * file is missing (running from sources, e.g. under vitest), when one thread
 * is asked for, when the job is small (`minGroupsForWorkers`), or when
 * workers cannot start, the groups are fitted in this thread by the same code (`group-job.ts`), so results are bit-identical
 * either way (only `elapsedMs` differs).
 *
 * A failing group never stops the others: it gets stop `failed` and a
 * message. On cancellation the promise still resolves with one result per
 * group; groups not fitted get stop `cancelled`, a group being fitted stops
 * at its solver's next iteration check.
 */
import { existsSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { FitPlan, Plan } from '../../parser/plan';
import { compileColumnExpr } from '../compile';
import type { FileReader } from '../data';
import { loadSources } from '../run/datasets';
import type { FitResult } from '../result';
import type { CancelToken } from '../solve/problem';
import { prepareFitData, type FitData } from '../run/fit-data';
import { fitOneGroup, unfittedGroup } from './group-job';
import { sharedStart, type SharedStart } from './starts';
import { runChunksInWorkers } from './pool';
import { createCancelFlag, setCancelled } from './protocol';
import { runText } from '../messages';

export interface GroupRunOptions {
  /** Worker threads. Default `os.availableParallelism()`; 1 fits in this thread. */
  threads?: number;
  /** Checked between groups and, through a shared flag, once per solver iteration. */
  cancel?: CancelToken;
  /** The start the groups share (default computed from `groups`, engine/groups/starts.ts); a shard passes the one of all groups. */
  shared?: SharedStart;
  /** Called with the number of groups finished (non-decreasing) and the total. */
  onProgress?: (done: number, total: number) => void;
  /**
   * The bundled worker script. Default: `worker.js` in the directory of the
   * running bundle (`__dirname`). `null` forces fitting in this thread.
   */
  workerFile?: string | null;
  /** Groups per message to a worker. Default ⌈groups / (8·threads)⌉, clamped to 1…64. */
  chunkSize?: number;
  /**
   * Small jobs stay in this thread: workers are used only when there are at
   * least this many groups or at least MIN_ROWS_FOR_WORKERS rows in all.
   * Default 64 (starting a worker takes about 50-100 ms, the time of fitting
   * some 50 small groups).
   */
  minGroupsForWorkers?: number;
  /**
   * With workers, this thread fits chunks too, so `threads` counts it
   * (threads − 1 workers): on a machine with as many cores as threads no
   * core is oversubscribed. Default true; false keeps this thread free (it
   * then only receives results).
   */
  hostThread?: boolean;
  /** Told how groups are being fitted: on worker threads, or in this thread and why (also after workers failed to start). */
  onMode?: (mode: RunMode) => void;
}

export type RunMode = { kind: 'workers'; threads: number; chunkSize: number; hostThread: boolean } | { kind: 'in_process'; reason: string };

/** Rows in all groups from which workers are used whatever the group count (see `minGroupsForWorkers`). */
export const MIN_ROWS_FOR_WORKERS = 50_000;

export interface FitGroupsOptions extends GroupRunOptions {
  /** Folder the spec's data paths are relative to. */
  baseDir: string;
  /** File reader for the data (default engine/io `readInputSync`: regular files only). */
  readFile?: FileReader;
}

/** `worker.js` next to the running bundle, or null when there is none (e.g. running from sources). */
export function defaultWorkerFile(): string | null {
  const dir = typeof __dirname === 'string' ? __dirname : null;
  if (dir === null) return null;
  const file = path.join(dir, 'worker.js');
  return existsSync(file) ? file : null;
}

/** How often the cancel token is polled while workers run, in ms. */
const CANCEL_POLL_MS = 10;
/** The in-process loop yields to the event loop at least this often, in ms. */
const YIELD_MS = 15;

/**
 * With workers, this thread yields at least this often (ms) while it fits
 * groups, and after each of its chunks: a worker's answer waits at most that
 * long (it has a chunk queued meanwhile), where yielding after every group
 * took a turn of the event loop per fit of a 12-point group (about 0.3 ms).
 */
const HOST_YIELD_MS = 4;

const yieldToEventLoop = () => new Promise<void>((resolve) => setImmediate(resolve));

/** Fits already-split groups (in the given order) and resolves to one result per group in that order. */
export async function fitGroupData(fit: FitPlan, groups: readonly FitData[], options: GroupRunOptions = {}): Promise<FitResult[]> {
  const total = groups.length;
  const results = new Array<FitResult | undefined>(total);
  const threads = Math.max(1, Math.floor(options.threads ?? os.availableParallelism()));
  const workerFile = options.workerFile === undefined ? defaultWorkerFile() : options.workerFile;
  let done = 0;
  const report = () => options.onProgress?.(done, total);
  // one shared start for every way of fitting the groups (engine/groups/starts.ts)
  const shared = options.shared ?? sharedStart(fit, groups);

  const inProcess = async (indices: Iterable<number>) => {
    let last = Date.now();
    for (const i of indices) {
      results[i] = fitOneGroup(fit, groups[i], { cancel: options.cancel, shared });
      done++;
      report();
      if (Date.now() - last >= YIELD_MS) {
        await yieldToEventLoop();
        last = Date.now();
      }
    }
  };

  const rows = groups.reduce((sum, g) => sum + g.n, 0);
  const bigEnough = total >= (options.minGroupsForWorkers ?? 64) || rows >= MIN_ROWS_FOR_WORKERS;
  const why =
    workerFile === null ? runText.inProcess.noWorkerFileHere
    : !existsSync(workerFile) ? runText.inProcess.noWorkerFileAt(workerFile)
    : threads < 2 ? runText.inProcess.oneThread
    : total < 2 || !bigEnough ? runText.inProcess.smallJob(total, rows, false)
    : null;
  if (why !== null || workerFile === null) {
    options.onMode?.({ kind: 'in_process', reason: why ?? runText.inProcess.noWorkerFile });
    await inProcess(groups.keys());
    return results as FitResult[];
  }

  const chunkSize = Math.max(1, Math.floor(options.chunkSize ?? Math.min(64, Math.ceil(total / (8 * threads)))));
  const starts: number[] = [];
  const chunks: FitData[][] = [];
  for (let s = 0; s < total; s += chunkSize) {
    starts.push(s);
    chunks.push(groups.slice(s, s + chunkSize));
  }
  const host = options.hostThread ?? true;
  const workerCount = Math.min(host ? threads - 1 : threads, chunks.length);
  options.onMode?.({ kind: 'workers', threads: workerCount, chunkSize, hostThread: host });
  let nextChunk = 0;
  const take = () => (nextChunk < chunks.length ? nextChunk++ : null);
  const partial = new Array<number>(chunks.length).fill(0);
  const finishChunk = (c: number, resultOf: (data: FitData, k: number) => FitResult) => {
    chunks[c].forEach((data, k) => {
      results[starts[c] + k] = resultOf(data, k);
    });
    done += chunks[c].length - partial[c];
    partial[c] = chunks[c].length;
    report();
  };
  const flag = createCancelFlag();
  if (options.cancel?.cancelled) setCancelled(flag);
  const poll = setInterval(() => {
    if (options.cancel?.cancelled) setCancelled(flag);
  }, CANCEL_POLL_MS);
  poll.unref?.();

  const pool = runChunksInWorkers({
    workerFile,
    threads: workerCount,
    fit,
    shared,
    chunks,
    take,
    cancelFlag: flag,
    onChunkProgress(c, n) {
      if (n > partial[c]) {
        done += n - partial[c];
        partial[c] = n;
        report();
      }
    },
    onChunkDone(c, chunkResults) {
      finishChunk(c, (data, k) => {
        const r = chunkResults[k];
        return r && r.group === data.group ? r : unfittedGroup(fit, data, { message: runText.noGroupResult(data.group ?? '') });
      });
    },
    onChunkFailed(c, message) {
      finishChunk(c, (data) => unfittedGroup(fit, data, { message }));
    },
  });
  // this thread fits chunks too, one group at a time, yielding at least every HOST_YIELD_MS so worker answers are
  // handled promptly (each worker has its next chunk queued already: engine/groups/pool.ts IN_FLIGHT)
  const hostLoop = async () => {
    let last = Date.now();
    for (let c = host ? take() : null; c !== null; c = options.cancel?.cancelled ? null : take()) {
      for (let k = 0; k < chunks[c].length; k++) {
        results[starts[c] + k] = fitOneGroup(fit, chunks[c][k], { cancel: options.cancel, shared });
        partial[c]++;
        done++;
        report();
        if (Date.now() - last >= HOST_YIELD_MS) {
          await yieldToEventLoop();
          last = Date.now();
        }
      }
      await yieldToEventLoop();
      last = Date.now();
    }
  };
  const [outcome] = await Promise.all([pool, hostLoop()]);
  clearInterval(poll);

  const rest = [...outcome.notRun];
  for (let c = take(); c !== null; c = take()) rest.push(c);
  const indices = rest.sort((a, b) => a - b).flatMap((c) => chunks[c].map((_, k) => starts[c] + k));
  if (options.cancel?.cancelled) {
    for (const i of indices) results[i] ??= unfittedGroup(fit, groups[i], { cancelled: true });
    done = total;
    if (indices.length > 0) report();
  } else if (indices.length > 0) {
    options.onMode?.({ kind: 'in_process', reason: outcome.startupError ?? 'chunks left over' });
    await inProcess(indices);
  }
  return results as FitResult[];
}

/**
 * Loads the data of fit `fitName` of `plan`, splits it by group and fits the
 * groups (see the module comment). A data problem (missing file, bad cell)
 * gives a single result with stop `failed` naming the problem. Throws only
 * for a name that is not a fit of the plan (a caller error).
 */
export async function fitGroupsParallel(plan: Plan, fitName: string, options: FitGroupsOptions): Promise<FitResult[]> {
  const fit = plan.fits.find((f) => f.name === fitName);
  if (!fit) throw new Error(`no fit named ${fitName} in the plan (fits: ${plan.fits.map((f) => f.name).join(', ')})`);
  const block = fit.blocks[0];
  const source = block ? plan.data.find((d) => d.name === block.data) : undefined;
  if (!block || !source) return [unfittedGroup(fit, null, { message: runText.noDataSource(fit.name) })];
  const sources = loadSources([source], options.baseDir, options.readFile);
  const loaded = sources.tables.get(source.name);
  if (!loaded) return [unfittedGroup(fit, null, { message: sources.errors.map((e) => e.message).join('; ') })];
  const prepared = prepareFitData(fit, source, loaded.table, compileColumnExpr);
  if (!prepared.ok) return [unfittedGroup(fit, null, { message: prepared.errors.map((e) => e.message).join('; ') })];
  return fitGroupData(fit, prepared.data, options);
}

/**
 * A group runner for the plan runner's hook: fits the groups of one fit with
 * `options` (threads, worker file), passing the runner's cancel and progress.
 */
export function parallelGroupRunner(options: Omit<GroupRunOptions, 'cancel' | 'onProgress'> = {}) {
  return (fit: FitPlan, groups: readonly FitData[], ctx: { cancel?: CancelToken; onProgress?: (done: number, total: number) => void } = {}): Promise<FitResult[]> =>
    fitGroupData(fit, groups, { ...options, cancel: ctx.cancel, onProgress: ctx.onProgress });
}
