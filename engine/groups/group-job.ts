/**
 * Fitting a list of groups one after another: the single code path used by
 * worker threads, by the in-process fallback and by the plan runner's
 * sequential loop, so all give bit-identical results (same inputs, same
 * operations, same order).
 *
 * Starts and retries (engine/groups/starts.ts decides the shared start once per fit):
 *  1. The group is fitted from the shared start: the spec's values, the
 *     group's own template-shape start, or the start computed on all groups
 *     pooled.
 *  2. When that fit does not converge (or fails inside the solver), the group
 *     is fitted again from a start computed from its own rows alone (every
 *     parameter guessed: template shape, rational linearisation or the
 *     separable grid), unless step 1 already started there.
 *  3. When that does not converge either, the group gets the multi-start
 *     search on its own rows (engine/solve/start/explore.ts).
 * The first converged attempt is reported, with `retry` saying how the first
 * attempt stopped and where the reported one started, and a `retried_start`
 * warning; when none converges, the first attempt is reported with the retry
 * record (and counts as failed or not converged). A group with fewer usable
 * rows than parameters is not retried: no start changes that.
 *
 * A group never stops the others: an exception escaping `runFit` (which
 * should not happen - it reports input problems as stop `failed`) becomes
 * that group's FitResult with stop `failed` and the exception's message.
 * After cancellation, groups not yet started get stop `cancelled`.
 */
import type { FitPlan } from '../../parser/plan';
import type { FitResult, RetryRecord, StopReason } from '../result';
import type { CancelToken } from '../solve/problem';
import type { FitData } from '../run/fit-data';
import { failedFit } from '../run/fit-result';
import { runFit, type RunFitOptions } from '../run/fit';
import type { SharedStart } from './starts';
import { runText, warningText } from '../messages';

export const CANCELLED_STOP: StopReason = { code: 'cancelled', message: runText.groupCancelled, converged: false };

/** A FitResult for a group that did not run: `failed` with `message`, or `cancelled`. */
export function unfittedGroup(fit: FitPlan, data: FitData | null, why: { cancelled: true } | { message: string }): FitResult {
  const stop: StopReason = 'cancelled' in why ? CANCELLED_STOP : { code: 'failed', message: why.message, converged: false };
  return failedFit(fit, data, stop, []);
}

export interface GroupFitOptions {
  cancel?: CancelToken;
  /** The shared start of the fit's groups (engine/groups/starts.ts); default: the spec's starts. */
  shared?: SharedStart;
  onIteration?: RunFitOptions['onIteration'];
  /** Solver implementations (a test hook of the plan runner; default engine/solve). */
  solvers?: RunFitOptions['solvers'];
  /** Record the solver's per-iteration trace (fit --trace). */
  trace?: boolean;
}

function attempt(fit: FitPlan, data: FitData, options: RunFitOptions): FitResult {
  try {
    return runFit(fit, data, options);
  } catch (e) {
    const reason = e instanceof Error ? e.message : String(e);
    const group = data.group;
    const why = { message: runText.groupFailed(group ?? '', fit.name, reason) };
    try {
      return unfittedGroup(fit, data, why);
    } catch {
      // the data itself is unreadable: a result without points
      return { ...unfittedGroup(fit, null, why), ...(group !== undefined ? { group } : {}) };
    }
  }
}

/** Fits one group from the shared start, retrying from its own data when that fails (module comment). */
export function fitOneGroup(fit: FitPlan, data: FitData, cancelOrOptions?: CancelToken | GroupFitOptions): FitResult {
  const options: GroupFitOptions = cancelOrOptions && 'cancelled' in cancelOrOptions ? { cancel: cancelOrOptions } : (cancelOrOptions as GroupFitOptions | undefined) ?? {};
  const { cancel, shared } = options;
  if (cancel?.cancelled) return unfittedGroup(fit, data, { cancelled: true });
  const free = fit.parameters.filter((p) => !p.fixed);
  const watch = { cancel, ...(options.onIteration ? { onIteration: options.onIteration } : {}), ...(options.solvers ? { solvers: options.solvers } : {}), ...(options.trace ? { trace: true } : {}) };
  const first = attempt(fit, data, { ...watch, ...(shared?.kind === 'pooled' ? { startOverride: { theta: Float64Array.from(shared.theta), how: shared.how } } : {}) });
  if (first.stop.converged || first.stop.code === 'cancelled' || cancel?.cancelled || !(rowsOf(data) >= free.length)) return first;

  const own = { theta: new Float64Array(free.length).fill(NaN), how: '' };
  // Step 1 already started from the group's own data when every start was guessed per group.
  const startedOwn = shared?.kind === 'per_group' && free.every((p) => p.initial === undefined);
  const tries: { from: RetryRecord['from']; options: RunFitOptions }[] = [
    ...(startedOwn ? [] : [{ from: 'own_start' as const, options: { ...watch, startOverride: own } }]),
    { from: 'search', options: { ...watch, startOverride: own, searchGroup: true } },
  ];
  for (const t of tries) {
    if (cancel?.cancelled) break;
    const r = attempt(fit, data, t.options);
    if (r.stop.converged) return withRetry(r, first.stop, t.from, true);
  }
  return withRetry(first, first.stop, tries[tries.length - 1].from, false);
}

/** Rows of a group, NaN when its data cannot be read (then it is not retried). */
function rowsOf(data: FitData): number {
  try {
    return data.n;
  } catch {
    return NaN;
  }
}

function withRetry(r: FitResult, first: StopReason, from: RetryRecord['from'], recovered: boolean): FitResult {
  const firstText = `${first.code}: ${first.message}`;
  return { ...r, retry: { first, from }, warnings: [{ code: 'retried_start', message: warningText.retried_start(firstText, from, recovered) }, ...r.warnings] };
}

/** Fits `groups` in order; `onEach(done)` after each group. */
export function fitGroupList(fit: FitPlan, groups: readonly FitData[], cancel?: CancelToken, onEach?: (done: number) => void, shared?: SharedStart): FitResult[] {
  const out: FitResult[] = [];
  for (const data of groups) {
    out.push(fitOneGroup(fit, data, { cancel, ...(shared ? { shared } : {}) }));
    onEach?.(out.length);
  }
  return out;
}
