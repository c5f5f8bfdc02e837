/**
 * The state of every declared fit in the results panel: converged, not
 * converged (a result, but not an estimate: engine/front/views/summary.ts
 * `fitStatus`), failed (no result: a run error names the fit, e.g. a `where`
 * that keeps no row), or not run (declared, but this run did not ask for it).
 * A fit without a result still gets its entry, with the reason, so the panel
 * never shows "2/2 converged" for three declared fits.
 *
 * Pure: no vscode, no DOM.
 */
import type { FitResult, RunResult } from '../../engine/result';
import { fitStatus } from '../../engine/front/views/summary';

export type FitState = 'converged' | 'not_converged' | 'failed' | 'not_run';
export const FIT_STATES: readonly FitState[] = ['converged', 'not_converged', 'failed', 'not_run'];

/** How each state is named in the panel (navigation, headers, chips). */
export const FIT_STATE_LABEL: Record<FitState, string> = {
  converged: 'converged',
  not_converged: 'not converged',
  failed: 'failed',
  not_run: 'not run',
};

/**
 * The state of a fit with a result: converged; failed when the solver could not take a single step or reported
 * a failure (nothing was fitted: its values are the starting values, engine/front/views/summary.ts `fitStatus`
 * `not_fitted`); not converged otherwise (stopped at its last iterate).
 */
export function fitState(f: FitResult): FitState {
  if (f.stop.converged) return 'converged';
  return f.stop.code === 'failed' || fitStatus(f) === 'not_fitted' ? 'failed' : 'not_converged';
}

/** A declared fit without a result: its name, state and the reasons (the run errors that name it). */
export interface MissingFit {
  name: string;
  state: Extract<FitState, 'failed' | 'not_run'>;
  reasons: string[];
}

/** Text of a fit that this run did not ask for (a run of one fit at the cursor). */
export const NOT_RUN_REASON = 'not run this time: the last run fitted other fits of this spec only';

/**
 * Declared fits without a result in `run`, in declaration order: those named
 * by a run error are failed (the errors' messages are the reasons); those in
 * `declared` but named nowhere were not run. Without `declared`, only the
 * fits named by errors are found.
 */
export function missingFits(run: RunResult, declared: readonly string[] = []): MissingFit[] {
  const have = new Set(run.fits.map((f) => f.name));
  const reasons = new Map<string, string[]>();
  for (const e of run.errors) {
    if (e.fit === undefined || have.has(e.fit)) continue;
    const list = reasons.get(e.fit) ?? [];
    if (!list.includes(e.message)) list.push(e.message);
    reasons.set(e.fit, list);
  }
  const names = [...new Set([...declared, ...reasons.keys()])].filter((n) => !have.has(n));
  return names.map((name) => {
    const r = reasons.get(name);
    return r ? { name, state: 'failed', reasons: r } : { name, state: 'not_run', reasons: [NOT_RUN_REASON] };
  });
}

/** Fit names in display order: declared order first (when known), then any others in run order. */
export function declaredOrder(declared: readonly string[], names: readonly string[]): Map<string, number> {
  const order = new Map<string, number>();
  for (const n of [...declared, ...names]) if (!order.has(n)) order.set(n, order.size);
  return order;
}

/** Counts of the states over entries (a per-group fit counts each group). */
export function stateCounts(states: readonly FitState[]): Record<FitState, number> {
  const out: Record<FitState, number> = { converged: 0, not_converged: 0, failed: 0, not_run: 0 };
  for (const s of states) out[s]++;
  return out;
}
