/**
 * Stop messages of the iterative solvers, in one place and in plain words:
 * each names the quantity, its value and the tolerance or limit it met
 * (the inequalities are in each solver's module comment).
 */
import { formatNumber } from '../format';
import { fmt } from './types';
import type { Stagnation } from './stagnation';
import type { NonFiniteReport } from './types';

export const stopText = {
  smallReduction: (actual: number, tol: number, predicted: number) =>
    `relative reduction ${fmt(actual)} below its tolerance ${fmt(tol)} (predicted ${fmt(predicted)})`,
  smallReductionRounding: (actual: number) => `relative reduction ${fmt(actual)} at the rounding level of double precision`,
  smallRadius: (radius: number, limit: number) => `trust-region radius ${fmt(radius)} below the step tolerance times the scaled parameter size (${fmt(limit)})`,
  smallRadiusRounding: (radius: number, size: number) => `trust-region radius ${fmt(radius)} at the rounding level of the scaled parameter size ${fmt(size)}`,
  smallGradient: (g: number, tol: number) => `scaled gradient ${fmt(g)} below its tolerance ${fmt(tol)}`,
  smallGradientRounding: (g: number) => `scaled gradient ${fmt(g)} at the rounding level of double precision`,
  smallScaledStep: (step: number, limit: number) => `scaled step ${fmt(step)} below the step tolerance times the scaled parameter size (${fmt(limit)})`,
  maxIterations: (limit: number) => `reached the iteration limit ${limit}`,
  maxEvaluations: (limit: number) => `reached the evaluation limit ${limit}`,
  cancelled: (iterations: number) => `cancelled after ${iterations} iteration(s)`,
  noRows: 'no data rows to fit',
  noFreeParameters: 'no free parameters to fit',
  allAtBounds: 'every parameter is held at a bound by the gradient (projected gradient 0)',
  noStepAccepted: '; no step was accepted from the starting values (try other starting values or a tighter tolerance)',
  polished: (steps: number) => `; then ${steps} Gauss–Newton polishing step(s)`,
  stagnated: (s: Stagnation, costTolerance: number, stepTolerance: number) =>
    `no progress over the last ${s.window} iterations: the best cost fell by a relative ${fmt(s.reduction)} (threshold ${fmt(costTolerance)}) and the best parameters moved by a relative ${fmt(s.move)} (threshold ${fmt(stepTolerance)})`,
  deadRegion: (gamma: number, predicted: number) =>
    `no progress possible: the scaled gradient ${fmt(gamma)} is far from 0 but the model predicts a relative reduction of only ${fmt(predicted)}; this is not a minimum (the model has lost its dependence on a parameter here, e.g. a rate constant ran off)`,
  startNotFinite: (what: NonFiniteReport['what']) =>
    what === 'residuals' ? 'the residuals at the starting values are not finite' : 'the Jacobian at the starting values is not finite, so no step can be computed',
  noFiniteStep: (what: NonFiniteReport['what'], radius: number) =>
    `no finite step: every trial near the last point gave non-finite ${what === 'residuals' ? 'residuals' : 'derivatives'} until the trust region shrank to ${fmt(radius)}`,
  invalidOption: (message: string) => `invalid solver option: ${message}`,
  costOverflow: (rnorm: number) =>
    `the residual norm at the stop, ${fmt(rnorm)}, squares beyond the range of double precision: terms of the model cancel at a scale the data cannot resolve (rescale the model or its parameters)`,
  /** A converged stop whose cost is not a number: `costOverflow` followed by the stop it replaces. */
  overflowedStop: (overflow: string, code: string, message: string) => `${overflow} (stopped by ${code}: ${message})`,
  // gradient descent (descent.ts)
  withGradient: (g: number) => ` (scaled gradient ${fmt(g)})`,
  withLearningRate: (rate: number) => ` (learning rate ${fmt(rate)})`,
  notFiniteAtIteration: (iteration: number) => `the residuals or the Jacobian are not finite at iteration ${iteration}`,
  diverged: (from: number, to: number, iteration: number) => `diverged: cost rose from ${fmt(from)} to ${fmt(to)} at iteration ${iteration}; use a smaller learning rate`,
  smallReductionDescent: (actual: number, tol: number) => `relative reduction ${fmt(actual)} below its tolerance ${fmt(tol)}`,
  // the linear QR solver (linear.ts)
  cancelledBeforeSolve: 'cancelled before the solve',
  linearNotFinite: 'residuals or Jacobian at the expansion point are not finite',
  linearSolved: (refinements: number, rankNote: string) => `direct solve by pivoted Householder QR with ${refinements} refinement step(s)${rankNote}`,
  linearRankNote: (rank: number, p: number, tolerance: number) =>
    `; rank ${rank} < ${p} (|R_kk| ≤ ${formatNumber(tolerance, 2)}·|R_00|), the ${p - rank} dependent parameter(s) set to their expansion value`,
  // iteratively reweighted least squares for robust losses (loss.ts)
  irlsNotFinite: 'residuals are not finite',
  irlsInnerStop: (k: number, message: string) => `reweighting ${k}: ${message}`,
  irlsConverged: (reduction: number, tol: number, change: number, k: number) =>
    `IRLS: relative robust-cost change ${fmt(reduction)} below the reduction tolerance ${fmt(tol)} and parameter change ${fmt(change)} below its square root after ${k} reweighting(s)`,
  irlsLimit: (reweightings: number, reduction: number) => `IRLS: reached ${reweightings} reweightings (last relative change ${fmt(reduction)})`,
  // the multi-start search (start/explore.ts)
  separableConfirmed: (message: string) => `no step of the full problem improves on the converged separable solution (${message})`,
} as const;

/** How starting values were found (engine/solve/start): the `how` of a guess, shown in the `guessed_start` warning. */
export const startText = {
  linear: (names: string) => `linear least squares for ${names}`,
  grid: (names: string, candidates: number) => `grid search over ${names} (${candidates} candidates)`,
  rational: (names: readonly string[], reweightings: number) =>
    `linearised rational least squares for ${names.join(', ')} (numerator and denominator multiplied out, ${reweightings} reweightings)`,
  /** Why the multi-start search did not run (`SearchResult.skipped`). */
  skippedLinear: 'the model is linear in its parameters',
  skippedDimension: (limit: number) => `more than ${limit} nonlinear parameters`,
} as const;

/**
 * The located part of a non-finite stop, for the run layer: data-file lines
 * (or 1-based row numbers when no lines are known), the parameters whose
 * derivative was not finite and the parameter values.
 */
export function nonFiniteDetail(r: NonFiniteReport, names: readonly string[], lines?: ArrayLike<number>): string {
  const rows = r.rows.map((i) => String(lines ? lines[i] : i + 1));
  const more = r.count > rows.length ? ` and ${r.count - rows.length} more` : '';
  const where = `${lines ? 'data line' : 'row'}${r.count === 1 ? '' : 's'} ${rows.join(', ')}${more}`;
  const params = r.what === 'jacobian' && r.parameters.length ? ` (derivative with respect to ${r.parameters.map((j) => names[j]).join(', ')})` : '';
  const at = names.map((name, j) => `${name} = ${fmt(r.theta[j])}`).join(', ');
  return `not finite at ${where}${params} with ${at}`;
}
