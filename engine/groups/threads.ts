/**
 * Whether the groups of a `per COLUMN` fit are fitted on worker threads or
 * one after another in this thread, and with how many threads.
 *
 * - `threads: 1` - always in this thread (the plain sequential loop).
 * - `threads: N ≥ 2` (asked for) - on worker threads whenever the fit has at
 *   least two groups and the worker bundle exists.
 * - `threads` absent (automatic) - on `os.availableParallelism()` threads when
 *   the machine has at least two, the worker bundle exists and the job is
 *   worth it: at least AUTO_MIN_GROUPS groups and either at least
 *   AUTO_GROUPS_ALONE groups or at least AUTO_MIN_ROWS rows in all. Starting
 *   the workers costs about 50-100 ms (engine/groups/fit-groups.ts), the
 *   time of fitting some 50 small groups; below that a run stays sequential.
 * - Injected solvers (`RunOptions.solvers`, a test hook) cannot cross a
 *   thread boundary: such runs are always sequential.
 *
 * Both ways run the same code per group (engine/run `runFit`) in the same
 * group order, so estimates are bit-identical; only `elapsedMs` differs.
 * The worker bundle is `worker.js` beside the running bundle (`dist/worker.js`
 * for the CLI, the extension and the engine worker itself); when it is
 * missing (e.g. running from sources) or workers cannot start, the groups are
 * fitted in this thread.
 */
import os from 'node:os';

/** Automatic mode: fewer groups than this are always fitted in this thread. */
export const AUTO_MIN_GROUPS = 8;
/** Automatic mode: this many groups are worth worker threads whatever their size. */
export const AUTO_GROUPS_ALONE = 64;
/** Automatic mode: this many rows in all (with at least AUTO_MIN_GROUPS groups) are worth worker threads. */
export const AUTO_MIN_ROWS = 50_000;

export interface GroupThreadOptions {
  /** Threads asked for (see the module comment); undefined: automatic. */
  threads?: number;
  /** True when the run uses injected solvers. */
  customSolvers?: boolean;
  /** Cores available; default `os.availableParallelism()`. */
  cores?: number;
}

/** The number of threads to fit `groups` groups of `rows` rows in all with; 1 means sequential in this thread. */
export function groupThreads(groups: number, rows: number, options: GroupThreadOptions = {}): number {
  if (options.customSolvers || groups < 2) return 1;
  const asked = options.threads;
  if (asked !== undefined) return Number.isFinite(asked) && asked >= 2 ? Math.floor(asked) : 1;
  const cores = options.cores ?? os.availableParallelism();
  if (cores < 2 || groups < AUTO_MIN_GROUPS) return 1;
  return groups >= AUTO_GROUPS_ALONE || rows >= AUTO_MIN_ROWS ? cores : 1;
}
