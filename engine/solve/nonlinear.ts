/**
 * The nonlinear least-squares solver a fit uses: Levenberg–Marquardt
 * (`lm.ts`) without bounds, the interior reflective trust region
 * (`reflective.ts`) when any parameter has a finite bound. `options.bounds =
 * 'projection'` selects Levenberg–Marquardt's projection with an active set
 * instead (kept for comparison: test/robustness, test/strd, test/bench).
 *
 * The choice is measured (README "Accuracy", robustness table): with
 * bounds, the reflective method has fewer failures and wrong minima on the
 * robustness suite and matches the projection on NIST StRD with bounds;
 * without bounds both reduce to the same Levenberg–Marquardt step, and
 * Moré's implementation stays the unbounded path.
 */
import type { LeastSquaresProblem } from './problem';
import type { SolveOptions, SolveOutcome } from './types';
import { levenbergMarquardt } from './lm';
import { reflectiveTrustRegion } from './reflective';
import { hasBounds } from './bounds';

/** How `solveNonlinear` treats the bounds of this problem: null when it has none. */
export function boundsMethodFor(problem: LeastSquaresProblem, options: SolveOptions = {}): 'reflective' | 'projection' | null {
  if (!hasBounds(problem.lower, problem.upper)) return null;
  return options.bounds ?? 'reflective';
}

export function solveNonlinear(problem: LeastSquaresProblem, theta0: Float64Array, options: SolveOptions = {}): SolveOutcome {
  return boundsMethodFor(problem, options) === 'reflective' ? reflectiveTrustRegion(problem, theta0, options) : levenbergMarquardt(problem, theta0, options);
}
