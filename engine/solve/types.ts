/**
 * Options and outcome shared by the solvers (linear QR, Levenberg–Marquardt,
 * gradient descent, robust IRLS).
 */
import type { StopReason, StopCode } from '../result';
import type { CancelToken } from './problem';

export interface SolveOptions {
  /** Iteration limit. Default 1000 (LM: the hardest NIST StRD starts need up to ~750), 100000 (gradient descent). */
  maxIterations?: number;
  /** Residual-evaluation limit. Default max(2000, 2·maxIterations, 100·(p + 1)) for LM, 2·maxIterations + 600 for gradient descent. */
  maxEvaluations?: number;
  /** Relative cost-reduction tolerance (see each solver for its inequality). Default 1e-10. */
  ftol?: number;
  /** Relative step tolerance. Default 1e-10. */
  xtol?: number;
  /** Scaled-gradient tolerance. Default 1e-10. */
  gtol?: number;
  /** Checked once per iteration. */
  cancel?: CancelToken;
  /** LM: Gauss–Newton polishing after a converged stop (`polish.ts`). Default true. */
  polish?: boolean;
  /** Called after each accepted iteration with the cost ½‖r‖². */
  onIteration?: (it: number, cost: number) => void;
}

export interface SolveOutcome {
  theta: Float64Array;
  residuals: Float64Array;
  /** n×p column-major at theta. */
  jacobian: Float64Array;
  /** ½‖r‖² (robust fits: ½Σ c²ρ(rᵢ²/c²), see `loss.ts`). */
  cost: number;
  stop: StopReason;
  iterations: number;
  /** Residual evaluations (passes over the data computing r). */
  evaluations: number;
  jacobianEvaluations: number;
  /** Numerical rank of the Jacobian at theta, when the solver determined it. */
  rank?: number;
  /** Robust fits: final IRLS weights ρ′(rᵢ²/c²) per residual. */
  robustWeights?: Float64Array;
}

export const DEFAULT_TOLERANCE = 1e-10;

export function stopReason(code: StopCode, message: string): StopReason {
  const converged = code === 'exact' || code === 'small_reduction' || code === 'small_step' || code === 'small_gradient';
  return { code, message, converged };
}

/** Short exponential notation for stop messages, e.g. 3.1e-13. */
export function fmt(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  if (x === 0) return '0';
  const a = Math.abs(x);
  return a >= 1e-3 && a < 1e5 ? String(Number(x.toPrecision(3))) : x.toExponential(2).replace('e+', 'e');
}

export function allFinite(x: Float64Array, length = x.length): boolean {
  for (let i = 0; i < length; i++) if (!Number.isFinite(x[i])) return false;
  return true;
}

export function halfSumSquares(r: Float64Array): number {
  let s = 0;
  for (let i = 0; i < r.length; i++) s += r[i] * r[i];
  return 0.5 * s;
}
