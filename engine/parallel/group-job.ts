/**
 * Fitting a list of groups one after another: the single code path used by
 * worker threads and by the in-process fallback, so both give bit-identical
 * results (same inputs, same operations, same order).
 *
 * A group never stops the others: an exception escaping `runFit` (which
 * should not happen - it reports input problems as stop `failed`) becomes
 * that group's FitResult with stop `failed` and the exception's message.
 * After cancellation, groups not yet started get stop `cancelled`.
 */
import type { FitPlan } from '../../parser/plan';
import type { FitResult, StopReason } from '../result';
import type { CancelToken } from '../solve/problem';
import type { FitData } from '../run/fit-data';
import { failedFit } from '../run/fit-result';
import { runFit } from '../run/fit';

export const CANCELLED_STOP: StopReason = { code: 'cancelled', message: 'cancelled before this group was fitted', converged: false };

/** A FitResult for a group that did not run: `failed` with `message`, or `cancelled`. */
export function unfittedGroup(fit: FitPlan, data: FitData | null, why: { cancelled: true } | { message: string }): FitResult {
  const stop: StopReason = 'cancelled' in why ? CANCELLED_STOP : { code: 'failed', message: why.message, converged: false };
  return failedFit(fit, data, stop, []);
}

/** Fits one group, turning an unexpected exception into a `failed` result. */
export function fitOneGroup(fit: FitPlan, data: FitData, cancel?: CancelToken): FitResult {
  if (cancel?.cancelled) return unfittedGroup(fit, data, { cancelled: true });
  try {
    return runFit(fit, data, { cancel });
  } catch (e) {
    const reason = e instanceof Error ? e.message : String(e);
    const group = data.group;
    const why = { message: `group ${group ?? ''} of ${fit.name} could not be fitted: ${reason}` };
    try {
      return unfittedGroup(fit, data, why);
    } catch {
      // the data itself is unreadable: a result without points
      return { ...unfittedGroup(fit, null, why), ...(group !== undefined ? { group } : {}) };
    }
  }
}

/** Fits `groups` in order; `onEach(done)` after each group. */
export function fitGroupList(fit: FitPlan, groups: readonly FitData[], cancel?: CancelToken, onEach?: (done: number) => void): FitResult[] {
  const out: FitResult[] = [];
  for (const data of groups) {
    out.push(fitOneGroup(fit, data, cancel));
    onEach?.(out.length);
  }
  return out;
}
