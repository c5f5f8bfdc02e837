/**
 * Robust losses for least squares, minimising ½·Σ c²·ρ(rᵢ²/c²) with scale c:
 *   huber:   ρ(z) = z for z ≤ 1, 2√z − 1 otherwise   (Huber, Ann. Math.
 *            Statist. 35 (1964) 73-101, in the squared-argument form);
 *   pseudo_huber: ρ(z) = 2(√(1+z) − 1), so ½c²ρ = c²(√(1+(r/c)²) − 1), the
 *            pseudo-Huber loss (Hartley & Zisserman, "Multiple View Geometry
 *            in Computer Vision", 2nd ed. 2004, appendix A6.8);
 *   cauchy:  ρ(z) = ln(1 + z)                        (Cauchy/Lorentzian);
 * the ρ(z) convention of Triggs, McLauchlan, Hartley & Fitzgibbon, "Bundle
 * adjustment — a modern synthesis" (2000), §4.3.
 *
 * Method: iteratively reweighted least squares (Holland & Welsch, "Robust
 * regression using iteratively reweighted least-squares", Comm. Statist.
 * Theory Methods 6 (1977) 813-827): with weights wᵢ = ρ′(rᵢ²/c²) frozen at
 * the current θ, the weighted problem min ½Σ wᵢrᵢ² is solved by
 * Levenberg–Marquardt (the interior reflective method with bounds,
 * `nonlinear.ts`), then the weights are renewed. Since these ρ are
 * concave in z, each reweighted problem majorises the robust cost, so the
 * robust cost never increases (an MM algorithm: Lange, Hunter & Yang,
 * J. Comput. Graph. Statist. 9 (2000) 1-20).
 *
 * Stopping (documented): at most 100 reweightings (`maxReweightings`); stop
 * when the relative decrease of the robust cost is ≤ the reduction tolerance
 * τ (default 1e-10) and the largest relative parameter change
 * |Δθⱼ|/(|θⱼ| + 1e-10) is ≤ √τ;
 * a non-converged inner LM stop ends the iteration with that stop.
 * The outcome's residuals and Jacobian are the unweighted ones at the final
 * θ, `robustWeights` the final wᵢ, `robustScale` the scale c used and `cost`
 * the robust cost; with a trace asked for, `trace` is that of the last
 * reweighted solve.
 *
 * The scale from the data (`scale` 'spread', the default when a spec gives
 * no `scale`): c = k·σ̂, with σ̂ = 1.4826·MAD the normal-consistent median
 * absolute deviation of the residuals about their median (Hampel, J. Amer.
 * Statist. Assoc. 69 (1974) 383-393; 1.4826 = 1/Φ⁻¹(3/4), common practice)
 * and k the loss's tuning constant (parser/registry/losses.ts: 1.345 for
 * Huber, 2.385 for Cauchy, the constants giving 95 % efficiency at the
 * normal distribution, Holland & Welsch 1977). It is estimated from the
 * residuals before each reweighting (the first from the squared-loss fit the
 * robust fit starts from), as iteratively rescaled IRLS does (Huber, Robust
 * Statistics, 1981, §7.8), until it settles - a relative change of at most
 * SCALE_SETTLED (1e-3) - or for at most MAX_SCALE_UPDATES (20) reweightings;
 * then it is held, so the iteration ends as the fixed-scale MM algorithm
 * above does. When more than half of the residuals equal their median (MAD
 * 0), σ̂ is 1.2533 times the mean absolute deviation about the median
 * (√(π/2), normal-consistent; common practice); when that is 0 too, every
 * residual is equal and any scale gives weights 1: c = 1.
 */
import type { LossKind } from '../../parser/plan';
import { LOSS_SPECS } from '../../parser/registry/losses';
import type { LeastSquaresProblem } from './problem';
import { type SolveOptions, type SolveOutcome, DEFAULT_TOLERANCE, stopReason } from './types';
import { solveNonlinear } from './nonlinear';
import { stopText } from './messages';

export interface RobustOptions extends SolveOptions {
  /** Reweighting limit. Default 100. */
  maxReweightings?: number;
}

/** ρ(z) of each loss. */
export function rho(loss: LossKind, z: number): number {
  switch (loss) {
    case 'squared': return z;
    case 'huber': return z <= 1 ? z : 2 * Math.sqrt(z) - 1;
    case 'pseudo_huber': return 2 * (Math.sqrt(1 + z) - 1);
    case 'cauchy': return Math.log1p(z);
  }
}

/** ρ′(z), the IRLS weight. */
export function rhoPrime(loss: LossKind, z: number): number {
  switch (loss) {
    case 'squared': return 1;
    case 'huber': return z <= 1 ? 1 : 1 / Math.sqrt(z);
    case 'pseudo_huber': return 1 / Math.sqrt(1 + z);
    case 'cauchy': return 1 / (1 + z);
  }
}

/** ½·Σ c²·ρ(rᵢ²/c²). */
export function robustCost(loss: LossKind, scale: number, r: Float64Array): number {
  const c2 = scale * scale;
  let s = 0;
  for (let i = 0; i < r.length; i++) s += c2 * rho(loss, (r[i] * r[i]) / c2);
  return 0.5 * s;
}

/** The weighted problem √wᵢ·rᵢ(θ) for frozen weights (sqrtW read at each call). */
function weighted(problem: LeastSquaresProblem, sqrtW: Float64Array): LeastSquaresProblem {
  const { n, p } = problem;
  const w: LeastSquaresProblem = {
    n, p,
    residuals(theta, out) {
      problem.residuals(theta, out);
      for (let i = 0; i < n; i++) out[i] *= sqrtW[i];
    },
    jacobian(theta, out) {
      problem.jacobian(theta, out);
      for (let j = 0; j < p; j++) for (let i = 0; i < n; i++) out[j * n + i] *= sqrtW[i];
    },
  };
  const both = problem.residualsAndJacobian?.bind(problem);
  if (both) {
    w.residualsAndJacobian = (theta, out, jac) => {
      both(theta, out, jac);
      for (let i = 0; i < n; i++) out[i] *= sqrtW[i];
      for (let j = 0; j < p; j++) for (let i = 0; i < n; i++) jac[j * n + i] *= sqrtW[i];
    };
  }
  if (problem.lower) w.lower = problem.lower;
  if (problem.upper) w.upper = problem.upper;
  return w;
}

/** σ̂ = 1.4826·MAD changes by at most this (relative) between reweightings: it is held from then on. */
export const SCALE_SETTLED = 1e-3;
/** The scale from the data is re-estimated before at most this many reweightings, then held. */
export const MAX_SCALE_UPDATES = 20;

/** Median of `v` (a copy is sorted). */
function median(v: ArrayLike<number>): number {
  const s = Float64Array.from(v).sort();
  const m = s.length >> 1;
  return s.length === 0 ? NaN : s.length % 2 ? s[m] : 0.5 * (s[m - 1] + s[m]);
}

/** The normal-consistent robust spread σ̂ of residuals (see the module comment): 1.4826·MAD, or 1.2533·mean absolute deviation when MAD is 0; 0 when all are equal. */
export function robustSpread(r: ArrayLike<number>): number {
  const med = median(r);
  const dev = Float64Array.from(r, (x) => Math.abs(x - med));
  const mad = median(dev);
  if (mad > 0) return 1.4826 * mad;
  let sum = 0;
  for (let i = 0; i < dev.length; i++) sum += dev[i];
  return dev.length ? (1.2533 * sum) / dev.length : 0;
}

/** c = k·σ̂ for a robust loss from residuals `r` (1 when they are all equal). */
export function scaleFromSpread(loss: LossKind, r: ArrayLike<number>): number {
  const spread = robustSpread(r);
  return spread > 0 && Number.isFinite(spread) ? LOSS_SPECS[loss].tuning * spread : 1;
}

export function robustFit(problem: LeastSquaresProblem, theta0: Float64Array, loss: LossKind, scaleGiven: number | 'spread', options: RobustOptions = {}): SolveOutcome {
  if (loss === 'squared') return solveNonlinear(problem, theta0, options);
  if (scaleGiven !== 'spread' && (!(scaleGiven > 0) || !Number.isFinite(scaleGiven))) throw new RangeError('loss scale must be a positive finite number');
  const { n, p } = problem;
  const ftol = options.reductionTolerance ?? DEFAULT_TOLERANCE;
  const maxRe = options.maxReweightings ?? 100;
  const rStart = new Float64Array(n);
  problem.residuals(theta0, rStart);
  let scale = scaleGiven === 'spread' ? scaleFromSpread(loss, rStart) : scaleGiven;
  let scaleHeld = scaleGiven !== 'spread';
  let scaleUpdates = 0;
  let c2 = scale * scale;
  // The inner solves report nothing themselves: progress is the robust cost per reweighting.
  const inner: SolveOptions = { ...options, onIteration: undefined };
  const r = new Float64Array(n);
  const sqrtW = new Float64Array(n).fill(1);
  const weights = new Float64Array(n).fill(1);
  let theta: Float64Array = Float64Array.from(theta0);
  problem.residuals(theta, r);
  let cost = robustCost(loss, scale, r);
  let iterations = 0;
  let evaluations = 1;
  let jacobianEvaluations = 0;
  let last: SolveOutcome | null = null;
  let nonFinite: SolveOutcome['nonFinite'];
  let message = '';
  let code: SolveOutcome['stop']['code'] = 'max_iterations';
  for (let k = 1; k <= maxRe; k++) {
    if (!Number.isFinite(cost)) { code = 'non_finite'; message = stopText.irlsNotFinite; break; }
    if (!scaleHeld && k > 1) {
      // the scale from the current residuals, until it settles (module comment)
      const next = scaleFromSpread(loss, r);
      scaleUpdates++;
      const settled = Math.abs(next - scale) <= SCALE_SETTLED * scale;
      scale = next;
      c2 = scale * scale;
      cost = robustCost(loss, scale, r);
      if (settled || scaleUpdates >= MAX_SCALE_UPDATES) scaleHeld = true;
    }
    for (let i = 0; i < n; i++) {
      weights[i] = rhoPrime(loss, (r[i] * r[i]) / c2);
      sqrtW[i] = Math.sqrt(weights[i]);
    }
    last = solveNonlinear(weighted(problem, sqrtW), theta, inner);
    iterations += last.iterations;
    evaluations += last.evaluations + 1;
    jacobianEvaluations += last.jacobianEvaluations;
    if (!last.stop.converged) { code = last.stop.code; message = stopText.irlsInnerStop(k, last.stop.message); theta = last.theta; nonFinite = last.nonFinite; break; }
    let change = 0;
    for (let j = 0; j < p; j++) change = Math.max(change, Math.abs(last.theta[j] - theta[j]) / (Math.abs(theta[j]) + DEFAULT_TOLERANCE));
    theta = Float64Array.from(last.theta);
    problem.residuals(theta, r);
    const next = robustCost(loss, scale, r);
    const reduction = (cost - next) / Math.max(cost, Number.MIN_VALUE);
    cost = next;
    if (scaleHeld && reduction <= ftol && change <= Math.sqrt(ftol)) {
      code = 'small_reduction';
      message = stopText.irlsConverged(Math.abs(reduction), ftol, change, k);
      break;
    }
    if (k === maxRe) message = stopText.irlsLimit(maxRe, reduction);
    options.onIteration?.(iterations, cost);
  }
  problem.residuals(theta, r);
  const jac = new Float64Array(n * p);
  problem.jacobian(theta, jac);
  jacobianEvaluations++;
  for (let i = 0; i < n; i++) weights[i] = rhoPrime(loss, (r[i] * r[i]) / c2);
  return {
    theta, residuals: r, jacobian: jac, cost: robustCost(loss, scale, r),
    stop: stopReason(code, message), iterations, evaluations, jacobianEvaluations, robustWeights: weights, robustScale: scale,
    ...(last?.trace ? { trace: last.trace } : {}),
    ...(code === 'non_finite' && nonFinite ? { nonFinite } : {}),
  };
}
