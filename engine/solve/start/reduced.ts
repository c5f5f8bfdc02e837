/**
 * The reduced (variable-projection) least-squares problem over the
 * nonlinear parameters α only: r(α) = √w ⊙ (y − f(α, c*(α))) with c*(α)
 * the linear parameters solved exactly (separable.ts). Its Jacobian is
 * Kaufman's approximation J ≈ −P⊥·(√w ⊙ ∂f/∂α) at (α, c*) (L. Kaufman, "A
 * variable projection method for solving separable nonlinear least squares
 * problems", BIT 15 (1975) 49–57), which gives the exact gradient Jᵀr; the
 * Levenberg–Marquardt solver (lm.ts) runs on it unchanged. Eliminating the
 * linear parameters enlarges the region from which the solver converges
 * (Golub & Pereyra, Inverse Problems 19 (2003) R1–R26, §5), which is what
 * the multi-start search (explore.ts) needs from its partial solves.
 */
import type { LeastSquaresProblem } from '../problem';
import { SeparableSolver } from './separable';
import type { StartInput } from './types';

export interface ReducedProblem extends LeastSquaresProblem {
  /** The full parameter vector (linear parameters solved) for α. */
  fullTheta(alpha: Float64Array): Float64Array;
}

export function reducedProblem(input: StartInput, base: Float64Array, linear: readonly number[], nonlinear: readonly number[]): ReducedProblem {
  const { n, model, cols, sqrtW, parameters } = input;
  const P = parameters.length;
  const p = nonlinear.length;
  const sep = new SeparableSolver(input, linear);
  const theta = Float64Array.from(base);
  const at = new Float64Array(p).fill(NaN);
  const f = new Float64Array(n);
  const jac = new Float64Array(n * P);
  const col = new Float64Array(n);

  const solveAt = (alpha: Float64Array) => {
    let same = true;
    for (let k = 0; k < p; k++) if (!Object.is(at[k], alpha[k])) same = false;
    if (same) return;
    nonlinear.forEach((j, k) => (theta[j] = alpha[k]));
    sep.solve(theta);
    at.set(alpha);
  };
  const jacobianAt = (alpha: Float64Array, out: Float64Array) => {
    solveAt(alpha);
    model.valueAndJacobian(theta, cols, n, f, jac);
    for (let k = 0; k < p; k++) {
      const from = nonlinear[k] * n;
      for (let i = 0; i < n; i++) col[i] = -(sqrtW ? sqrtW[i] : 1) * jac[from + i];
      if (col.every(Number.isFinite)) sep.project(col);
      out.set(col, k * n);
    }
  };
  return {
    n,
    p,
    lower: Float64Array.from(nonlinear, (j) => parameters[j].lower),
    upper: Float64Array.from(nonlinear, (j) => parameters[j].upper),
    residuals(alpha, out) {
      solveAt(alpha);
      out.set(sep.r);
    },
    jacobian(alpha, out) {
      jacobianAt(alpha, out);
    },
    residualsAndJacobian(alpha, out, jacOut) {
      jacobianAt(alpha, jacOut);
      out.set(sep.r);
    },
    fullTheta(alpha) {
      solveAt(alpha);
      return Float64Array.from(theta);
    },
  };
}
