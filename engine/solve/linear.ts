/**
 * Linear least squares for models linear in their parameters:
 * r(θ) = r(θ₀) + J·(θ − θ₀) exactly, with J the (constant) compiled Jacobian.
 *
 * Method: Householder QR with column pivoting on the column-equilibrated
 * design matrix J·S (S = diag(1/‖Jⱼ‖), `linalg/qr.ts`), basic solution
 * beyond the numerical rank, then iterative refinement on the augmented
 * system with double-double residuals (Björck 1967, `refine.ts`). The normal
 * equations are never formed. When the problem supplies double-double
 * residuals and Jacobian (`residualsExtended`/`jacobianExtended`, e.g. from
 * `modelProblem`), refinement solves the more accurate problem.
 *
 * Measured on NIST StRD Filip (degree-10 polynomial, κ(J·S) ≈ 5e9): QR alone
 * gives LRE ≈ 7-8, because the double rounding of the entries xᵏ alone caps
 * any double-precision solver near 7.6 (checked with exact rational
 * arithmetic on the rounded matrix); refinement against the double-double
 * design matrix lifts it above 9 (see test/strd). Centring of predictor
 * columns is not applied: it would need the model's structure (the generic
 * path only sees J), and column equilibration plus refinement already reach
 * the target.
 *
 * Tall, well-conditioned problems (n ≥ SEMINORMAL_MIN_ROWS and the bound
 * ‖R‖_F‖R⁻¹‖_F on κ(J·S) at most SEMINORMAL_MAX_CONDITION) refine by the
 * corrected seminormal equations instead (`seminormal.ts`: one double-double
 * pass over the rows per step, no application of Q), which converge to the
 * same double-double solution; if they do not converge (‖z‖ ≤ ε‖S⁻¹x‖ within
 * the step limit) the augmented refinement runs from the QR solution as before.
 * Every NIST StRD linear problem (n ≤ 82) keeps the augmented refinement.
 */
import type { LeastSquaresProblem, CancelToken } from './problem';
import { type SolveOutcome, stopReason, allFinite, halfSumSquares } from './types';
import { PivotedQR } from '../linalg/qr';
import { refineLeastSquares } from './refine';
import { refineSeminormal, conditionBound } from './seminormal';
import { stopText } from './messages';
import { formatNumber } from '../format';

export interface LinearOptions {
  /** Expansion point θ₀ (default 0); the result does not depend on it for a linear model. */
  theta0?: Float64Array;
  /** Iterative refinement on (default true). */
  refine?: boolean;
  /** Refinement step limit. Default 10. */
  maxRefinements?: number;
  /** Relative rank tolerance on |R_kk|/|R_00|. Default 10·max(n, p)·ε. */
  rankTolerance?: number;
  cancel?: CancelToken;
}

/**
 * Fewest rows for the seminormal refinement (module comment). Below it the four passes of an augmented
 * step are cheap and small problems (every NIST StRD linear problem) keep their factorisation and
 * refinement bit for bit; the same threshold as the streamed factor of the trust-region solvers.
 */
export const SEMINORMAL_MIN_ROWS = 1024;

/**
 * Largest bound on κ(J·S) for the seminormal refinement: each step contracts the error by about
 * c·κ²·ε (`seminormal.ts`), here at most 1e8·2.2e-16 ≈ 2e-8, so two or three steps reach ε even with a
 * pessimistic constant c. Above it the augmented refinement (which contracts by about κ·ε) is used
 * directly. The convergence test, not this bound, guards the result: an unconverged seminormal
 * refinement is discarded.
 */
export const SEMINORMAL_MAX_CONDITION = 1e4;

function failed(problem: LeastSquaresProblem, theta: Float64Array, code: 'failed' | 'non_finite' | 'cancelled', message: string, evaluations: number): SolveOutcome {
  const residuals = new Float64Array(problem.n);
  const jacobian = new Float64Array(problem.n * problem.p);
  return {
    theta, residuals, jacobian, cost: NaN, stop: stopReason(code, message),
    iterations: 0, evaluations, jacobianEvaluations: 0,
  };
}

export function solveLinear(problem: LeastSquaresProblem, options: LinearOptions = {}): SolveOutcome {
  const { n, p } = problem;
  const theta0 = options.theta0 ? Float64Array.from(options.theta0) : new Float64Array(p);
  if (n === 0) return failed(problem, theta0, 'failed', stopText.noRows, 0);
  if (options.cancel?.cancelled) return failed(problem, theta0, 'cancelled', stopText.cancelledBeforeSolve, 0);

  const r0 = new Float64Array(n);
  const jac = new Float64Array(n * p);
  problem.residuals(theta0, r0);
  problem.jacobian(theta0, jac);
  if (!allFinite(r0) || !allFinite(jac)) {
    return failed(problem, theta0, 'non_finite', stopText.linearNotFinite, 1);
  }

  const qr = new PivotedQR(n, p).factor(jac, n, p, { pivot: true, scale: true, rankTolerance: options.rankTolerance });
  const b = new Float64Array(n);
  for (let i = 0; i < n; i++) b[i] = -r0[i];
  const delta = new Float64Array(p);
  qr.solveLeastSquares(b, delta);

  let refinements = 0;
  if (options.refine !== false && qr.rank === p && p > 0) {
    let bHi = r0;
    let bLo: Float64Array | null = null;
    let aHi = jac;
    let aLo: Float64Array | null = null;
    if (problem.residualsExtended && problem.jacobianExtended) {
      bHi = new Float64Array(n);
      bLo = new Float64Array(n);
      aHi = new Float64Array(n * p);
      aLo = new Float64Array(n * p);
      // Jacobian first: `modelProblem` then serves the residuals at the same θ from that one evaluation.
      problem.jacobianExtended(theta0, aHi, aLo);
      problem.residualsExtended(theta0, bHi, bLo);
      if (!allFinite(bHi) || !allFinite(aHi)) {
        bHi = r0; bLo = null; aHi = jac; aLo = null;
      }
    }
    // b = −r₀ in the refinement's sign convention.
    const bh = new Float64Array(n);
    const bl = bLo ? new Float64Array(n) : null;
    for (let i = 0; i < n; i++) {
      bh[i] = -bHi[i];
      if (bl && bLo) bl[i] = -bLo[i];
    }
    let refined = false;
    if (n >= SEMINORMAL_MIN_ROWS && conditionBound(qr, p) <= SEMINORMAL_MAX_CONDITION) {
      const trial = Float64Array.from(delta);
      const o = refineSeminormal({ qr, n, p, aHi, aLo, bHi: bh, bLo: bl, maxSteps: options.maxRefinements }, trial);
      if (o.converged) {
        delta.set(trial);
        refinements = o.applied;
        refined = true;
      }
    }
    if (!refined) refinements = refineLeastSquares({ qr, n, p, aHi, aLo, bHi: bh, bLo: bl, maxSteps: options.maxRefinements }, delta);
  }

  const theta = new Float64Array(p);
  for (let j = 0; j < p; j++) theta[j] = theta0[j] + delta[j];
  // Final residuals: from the double-double evaluation when available (the
  // double evaluation of e.g. a degree-10 polynomial cancels ~5 digits).
  // The double-double pass comes first: when it is finite the double one is not needed (its
  // only use was to decide whether to try the double-double one; the high part lies within
  // rounding of the double value, so the two are finite together).
  let residuals = new Float64Array(n);
  let extended = false;
  if (problem.residualsExtended) {
    const lo = new Float64Array(n);
    problem.residualsExtended(theta, residuals, lo);
    extended = allFinite(residuals);
    if (extended) for (let i = 0; i < n; i++) residuals[i] += lo[i];
    else residuals = new Float64Array(n);
  }
  if (!extended) problem.residuals(theta, residuals);
  const rankNote = qr.rank < p ? stopText.linearRankNote(qr.rank, p, qr.tolerance) : '';
  return {
    theta,
    residuals,
    jacobian: jac,
    cost: halfSumSquares(residuals),
    stop: stopReason('exact', stopText.linearSolved(refinements, rankNote)),
    iterations: 0,
    evaluations: 2,
    jacobianEvaluations: 1,
    rank: qr.rank,
    // the factorisation of `jac` itself, with the default rank tolerance only (SolveOutcome.factor)
    ...(options.rankTolerance === undefined ? { factor: qr } : {}),
  };
}
