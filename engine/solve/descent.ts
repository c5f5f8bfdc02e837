/**
 * Gradient descent with a fixed learning rate — the textbook first-order
 * method, offered for comparison with Levenberg–Marquardt, never the default.
 *
 * Feature scaling: parameters are scaled by the Jacobian column norms at the
 * start, φⱼ = dⱼ·θⱼ with dⱼ = ‖∂r/∂θⱼ‖ (1 for a zero column), so every scaled
 * column starts with unit norm. The iteration on ½‖r‖² is
 *     φ ← φ − η·∇_φ,  ∇_φ = D⁻¹Jᵀr,   i.e.  θ ← Π(θ − η·D⁻²Jᵀr),
 * with Π the projection onto the bounds (`bounds.ts`).
 *
 * Learning rate (documented default): a small grid η_k = 2⁻ᵏ/λ_max,
 * k = 0…10, where λ_max is the largest eigenvalue of J_sᵀJ_s (J_s = J·D⁻¹ at
 * the start; 1/λ_max makes descent on the local quadratic model monotone —
 * Nocedal & Wright, Numerical Optimization, 2nd ed., §3.3). Each candidate
 * runs a trial of min(50, maxIterations) iterations from θ₀; the largest η
 * whose trial cost never increased is kept (the smallest if none). The
 * curvature of a nonlinear model changes along the path, which is why 1/λ_max
 * alone can diverge. Trial passes count in `evaluations`. λ_max comes from
 * ml-matrix's symmetric eigensolver of the p×p matrix (an estimate only,
 * never used to solve).
 *
 * Stopping (defaults in brackets):
 *  small_gradient:  max_j |Jⱼᵀr| / (‖Jⱼ‖·‖r‖) ≤ gradientTolerance [1e-10] (as
 *                   in LM), over the components the bounds let move: a
 *                   parameter on its lower bound with Jⱼᵀr > 0 (or on its
 *                   upper bound with Jⱼᵀr < 0) is at a constrained optimum in
 *                   that direction and left out (the projected gradient);
 *  small_reduction: 0 ≤ cost_k − cost_{k+1} ≤ reductionTolerance·cost_k [1e-15 —
 *                   per-step reductions of a first-order method are small by
 *                   nature], with the scaled gradient ≤ 1e-3 (`stagnation.ts`
 *                   DEAD_GRADIENT: a constant cost with a large gradient is a
 *                   cycle, left to the stagnation test);
 *  small_step:      ‖Δφ‖ ≤ stepTolerance·(‖φ‖ + stepTolerance) [1e-15, for the same reason];
 *  stagnated:       over 1000 iterations the best cost fell by ≤ 1e-12
 *                   relative and the best point moved by ≤ 1e-9 relative
 *                   (`stagnation.ts`; e.g. a learning rate that makes the
 *                   iterates cycle with a constant cost); the best point is
 *                   returned, not converged;
 *  failed:          divergence, cost > 10·initial cost (lower the rate),
 *                   an invalid option (`options.ts`), or a stop that would be
 *                   converged but whose ½‖r‖² is beyond the doubles (terms that
 *                   cancel at a scale the data cannot resolve);
 *  max_iterations [100000], max_evaluations [2·maxIterations + 600],
 *  non_finite (residuals or Jacobian not finite at an iterate; a fixed-rate
 *  method has no trust region to shrink), cancelled.
 * Each iteration is one residual pass and one Jacobian pass over the data
 * (`evaluations`, `jacobianEvaluations`).
 */
import { Matrix, EigenvalueDecomposition } from 'ml-matrix';
import type { LeastSquaresProblem } from './problem';
import { type SolveOptions, type SolveOutcome, type NonFiniteReport, DEFAULT_TOLERANCE, stopReason, allFinite, nonFiniteReport } from './types';
import type { StopCode } from '../result';
import { norm2 } from '../linalg/norm';
import { project } from './bounds';
import { stopText } from './messages';
import { validateSolveOptions } from './options';
import { DEAD_GRADIENT, DESCENT_STAGNATION, StagnationWatch } from './stagnation';
import { TraceRecorder } from './trace';

export interface DescentOptions extends SolveOptions {
  /** Learning rate η in scaled parameters. Default: chosen by the trial grid (module comment). */
  learningRate?: number;
}

/** Default per-step relative reduction and step tolerances of gradient descent (steps are η·gradient, small by nature). */
export const DESCENT_FTOL = 1e-15;
/** Learning-rate grid: 2⁻ᵏ/λ_max for k = 0…GRID_SIZE−1, trials of TRIAL_ITERATIONS. */
const GRID_SIZE = 11;
const TRIAL_ITERATIONS = 50;
/** Divergence: cost above this multiple of the initial cost. */
const DIVERGENCE = 10;

/**
 * 1/λ_max of J_sᵀJ_s for J_s = J·diag(1/d). The products are formed from the
 * scaled entries Jᵢⱼ/dⱼ (each at most 1 in size when dⱼ is the column norm),
 * so columns near 1e±300 do not overflow; a matrix that still has a
 * non-finite entry (a column norm that overflowed) falls back to the bound
 * λ_max ≤ trace(J_sᵀJ_s) = Σⱼ‖J_s,ⱼ‖² (≤ p for unit columns), taken as p.
 */
export function defaultLearningRate(jac: Float64Array, n: number, p: number, d: Float64Array): number {
  const rows: number[][] = [];
  let finite = true;
  for (let a = 0; a < p; a++) {
    const row: number[] = [];
    for (let b = 0; b < p; b++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += (jac[a * n + i] / d[a]) * (jac[b * n + i] / d[b]);
      if (!Number.isFinite(s)) finite = false;
      row.push(s);
    }
    rows.push(row);
  }
  if (!finite) return 1 / p;
  const ev = new EigenvalueDecomposition(new Matrix(rows), { assumeSymmetric: true }).realEigenvalues;
  let lmax = -Infinity;
  for (const v of ev) lmax = Math.max(lmax, v);
  return lmax > 0 && Number.isFinite(lmax) ? 1 / lmax : 1;
}

interface State {
  x: Float64Array;
  r: Float64Array;
  jac: Float64Array;
  nfev: number;
  it: number;
  nonFinite: NonFiniteReport | null;
}

interface Settings {
  rate: number;
  d: Float64Array;
  maxIter: number;
  maxFev: number;
  ftol: number;
  xtol: number;
  gtol: number;
  /** Trial mode: stop with 'failed' at the first cost increase. */
  monotone: boolean;
}

interface Stop { code: StopCode; message: string }

/** Runs the iteration from the state (r, J current at x); returns the stop (the state may be moved to the best point seen). */
/** Residuals and Jacobian at `s.x` (one evaluation); false, with the place in `s.nonFinite`, when either is not finite. */
function evaluateAt(problem: LeastSquaresProblem, s: State): boolean {
  const { n, p } = problem;
  problem.residuals(s.x, s.r);
  problem.jacobian(s.x, s.jac);
  s.nfev++;
  if (!allFinite(s.r)) s.nonFinite = nonFiniteReport('residuals', s.r, n, 1, s.x);
  else if (!allFinite(s.jac)) s.nonFinite = nonFiniteReport('jacobian', s.jac, n, p, s.x);
  else return true;
  return false;
}

function iterate(problem: LeastSquaresProblem, s: State, o: Settings, options: DescentOptions, recorder: TraceRecorder | null): Stop {
  const { n, p, lower, upper } = problem;
  const gu = new Float64Array(p);
  const cnorm = new Float64Array(p);
  const step = new Float64Array(p);
  const phi = new Float64Array(p);
  const evaluate = (): boolean => evaluateAt(problem, s);
  // Costs are compared in units of the starting residual norm (½‖r/‖r₀‖‖²), so that residuals
  // beyond 1e154 (whose squares overflow) still compare; `unit²` turns them back for display.
  const r0 = norm2(s.r);
  const unit = r0 > 0 && Number.isFinite(r0) ? r0 : 1;
  const display = (c: number): number => c * unit * unit;
  const initial = 0.5;
  let cost = 0.5 * (r0 / unit) ** 2;
  const watch = o.monotone ? null : new StagnationWatch(p, DESCENT_STAGNATION, o.d.map((dj) => 1 / dj));
  /** Moves the state to the best point the stagnation watch saw (one more pass over the data). */
  const toBest = (): void => {
    if (!watch) return;
    const best = watch.bestPoint();
    if (best.cost < cost) {
      s.x.set(best.theta);
      evaluate();
    }
  };
  for (let k = 0; ; k++) {
    if (options.cancel?.cancelled) return { code: 'cancelled', message: stopText.cancelled(s.it) };
    const rn = norm2(s.r);
    let gnorm = 0;
    for (let j = 0; j < p; j++) {
      // Jⱼᵀr from the unit column Jⱼ/‖Jⱼ‖ (gu), so that columns and residuals near 1e±300 do not overflow
      const cn = norm2(s.jac, j * n, n);
      let sum = 0;
      if (cn > 0 && Number.isFinite(cn)) for (let i = 0; i < n; i++) sum += (s.jac[j * n + i] / cn) * s.r[i];
      gu[j] = sum;
      cnorm[j] = cn;
      // projected gradient: a parameter held at its bound by the gradient does not count
      if ((lower && s.x[j] <= lower[j] && sum > 0) || (upper && s.x[j] >= upper[j] && sum < 0)) continue;
      if (cn > 0 && rn > 0) gnorm = Math.max(gnorm, Math.abs(sum) / rn);
    }
    if (gnorm <= o.gtol) return { code: 'small_gradient', message: stopText.smallGradient(gnorm, o.gtol) };
    if (k >= o.maxIter) {
      toBest();
      return { code: 'max_iterations', message: stopText.maxIterations(o.maxIter) + stopText.withGradient(gnorm) };
    }
    if (s.nfev >= o.maxFev) return { code: 'max_evaluations', message: stopText.maxEvaluations(o.maxFev) };
    for (let j = 0; j < p; j++) {
      step[j] = s.x[j];
      // η·Jⱼᵀr/dⱼ² = η·guⱼ·(‖Jⱼ‖/dⱼ)/dⱼ, in this order so that nothing squared overflows
      s.x[j] -= (o.rate * gu[j] * (cnorm[j] / o.d[j])) / o.d[j];
    }
    project(s.x, lower, upper);
    for (let j = 0; j < p; j++) {
      step[j] = o.d[j] * (s.x[j] - step[j]);
      phi[j] = o.d[j] * s.x[j];
    }
    s.it++;
    const sn = norm2(step);
    if (!evaluate()) {
      recorder?.add({ iteration: s.it - 1, cost: display(cost), trialCost: null, gradient: gnorm, step: sn, radius: null, ratio: null, accepted: false });
      return { code: 'non_finite', message: stopText.notFiniteAtIteration(s.it) };
    }
    const next = 0.5 * (norm2(s.r) / unit) ** 2;
    recorder?.add({ iteration: s.it - 1, cost: display(cost), trialCost: display(next), gradient: gnorm, step: sn, radius: null, ratio: null, accepted: true });
    if (!o.monotone) options.onIteration?.(s.it, display(next));
    const reduction = cost - next;
    cost = next;
    if (next > DIVERGENCE * initial || (o.monotone && reduction < 0)) {
      return { code: 'failed', message: stopText.diverged(display(initial), display(next), s.it) };
    }
    const limit = o.xtol * (norm2(phi) + o.xtol);
    if (sn <= limit) return { code: 'small_step', message: stopText.smallScaledStep(sn, limit) };
    // a tiny reduction with a large gradient is a cycle or a crawl, not a minimum (stagnation.ts DEAD_GRADIENT): left to the window test
    if (reduction >= 0 && reduction <= o.ftol * (cost + reduction) && gnorm <= DEAD_GRADIENT) {
      return { code: 'small_reduction', message: stopText.smallReductionDescent(reduction / (cost + reduction), o.ftol) };
    }
    const stalled = watch?.record(next, s.x);
    if (stalled) {
      toBest();
      return { code: 'stagnated', message: stopText.stagnated(stalled, DESCENT_STAGNATION.costTolerance, DESCENT_STAGNATION.stepTolerance) };
    }
  }
}

export function gradientDescent(problem: LeastSquaresProblem, theta0: Float64Array, options: DescentOptions = {}): SolveOutcome {
  const { n, p, lower, upper } = problem;
  const maxIter = options.maxIterations ?? 100000;
  const settings: Settings = {
    rate: NaN, d: new Float64Array(p), maxIter, maxFev: options.maxEvaluations ?? 2 * maxIter + 600,
    ftol: options.reductionTolerance ?? DESCENT_FTOL, xtol: options.stepTolerance ?? DESCENT_FTOL, gtol: options.gradientTolerance ?? DEFAULT_TOLERANCE, monotone: false,
  };
  const x0 = Float64Array.from(theta0);
  project(x0, lower, upper);
  const s: State = { x: Float64Array.from(x0), r: new Float64Array(n), jac: new Float64Array(n * p), nfev: 0, it: 0, nonFinite: null };
  const recorder = options.trace ? new TraceRecorder('gradient_descent') : null;
  const done = (code: StopCode, message: string): SolveOutcome => {
    // a converged stop needs a cost that is a number: with ‖r‖² beyond the doubles nothing was fitted
    const rnorm = norm2(s.r);
    if (stopReason(code, '').converged && !Number.isFinite(0.5 * rnorm ** 2)) {
      message = stopText.overflowedStop(stopText.costOverflow(rnorm), code, message);
      code = 'failed';
    }
    const note = Number.isFinite(settings.rate) ? stopText.withLearningRate(settings.rate) : '';
    return {
      theta: s.x, residuals: s.r, jacobian: s.jac, cost: 0.5 * norm2(s.r) ** 2, stop: stopReason(code, message + note),
      iterations: s.it, evaluations: s.nfev, jacobianEvaluations: s.nfev,
      ...(recorder ? { trace: recorder.result() } : {}),
      ...(code === 'non_finite' && s.nonFinite ? { nonFinite: s.nonFinite } : {}),
    };
  };
  const invalid = validateSolveOptions(options);
  if (invalid !== null) return done('failed', stopText.invalidOption(invalid));
  if (n === 0) return done('failed', stopText.noRows);
  const start = (): boolean => {
    s.x.set(x0);
    s.it = 0;
    return evaluateAt(problem, s);
  };
  if (!start()) return done('non_finite', stopText.startNotFinite(s.nonFinite?.what ?? 'residuals'));
  if (p === 0) return done('small_gradient', stopText.noFreeParameters);
  for (let j = 0; j < p; j++) {
    const c = norm2(s.jac, j * n, n);
    settings.d[j] = c > 0 ? c : 1;
  }
  if (options.learningRate !== undefined) settings.rate = options.learningRate;
  else {
    const base = defaultLearningRate(s.jac, n, p, settings.d);
    const trial: Settings = { ...settings, maxIter: Math.min(TRIAL_ITERATIONS, maxIter), maxFev: Infinity, monotone: true };
    for (let k = 0; k < GRID_SIZE; k++) {
      trial.rate = base * 2 ** -k;
      settings.rate = trial.rate;
      const stop = iterate(problem, s, trial, options, null);
      if (stop.code === 'cancelled') return done(stop.code, stop.message);
      if (stop.code !== 'failed' && stop.code !== 'non_finite') break;
      start();
    }
    if (s.it > 0) start();
  }
  s.nonFinite = null;
  const stop = iterate(problem, s, settings, options, recorder);
  return done(stop.code, stop.message);
}
