/**
 * The solvers a fit may use (engine/solve, owned by the numerics module),
 * behind one small interface so the runner can be tested with fakes and
 * a solver added in one place.
 */
import type { LossKind } from '../../parser/plan';
import { gradientDescent, robustFit, solveLinear, solveNonlinear } from '../solve';
import type { LeastSquaresProblem, SolveOptions, SolveOutcome } from '../solve';

export interface IterativeOptions extends SolveOptions {
  /** Gradient descent learning rate (solver default when absent). */
  learningRate?: number;
}

export interface Solvers {
  linear(problem: LeastSquaresProblem, options: { cancel?: SolveOptions['cancel'] }): SolveOutcome;
  /** Levenberg–Marquardt; with bounds, the interior reflective trust region unless `options.bounds` says otherwise (engine/solve/nonlinear.ts). */
  levenbergMarquardt(problem: LeastSquaresProblem, theta0: Float64Array, options: IterativeOptions): SolveOutcome;
  /** Optional so that test fakes may leave it out; the fit then fails with a clear stop message. */
  gradientDescent?(problem: LeastSquaresProblem, theta0: Float64Array, options: IterativeOptions): SolveOutcome;
  /** Optional as above. */
  robust?(problem: LeastSquaresProblem, theta0: Float64Array, loss: Exclude<LossKind, 'squared'>, scale: number | 'spread', options: IterativeOptions): SolveOutcome;
}

export const defaultSolvers: Solvers = {
  linear: (problem, options) => solveLinear(problem, { cancel: options.cancel }),
  levenbergMarquardt: (problem, theta0, options) => solveNonlinear(problem, theta0, options),
  gradientDescent: (problem, theta0, options) => gradientDescent(problem, theta0, options),
  robust: (problem, theta0, loss, scale, options) => robustFit(problem, theta0, loss, scale, options),
};
