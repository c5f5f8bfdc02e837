/**
 * Final Gauss–Newton polishing after a converged Levenberg–Marquardt stop.
 *
 * The relative cost-reduction tests cannot resolve the last digits of θ:
 * near the minimum a parameter error δθ changes the cost only by ‖J·δθ‖²,
 * which drops below the rounding noise of the cost while δθ/θ is still
 * ≈1e-7 (NIST StRD ENSO, Lanczos3). Here undamped Gauss–Newton steps
 * δ = argmin‖J·δ + r‖ (pivoted, column-scaled QR plus one Björck
 * refinement step, `refine.ts`: measured on NIST StRD Lanczos2 it lifts the
 * minimum LRE from 9.3 to 10.4; more steps changed nothing) are iterated under the natural monotonicity (contraction)
 * test of Deuflhard, Newton Methods for Nonlinear Problems (Springer 2004),
 * §4.3: a new point is kept only if the Gauss–Newton step computed there is
 * shorter than the one that led to it. This judges progress by steps, not by
 * the cost, whose last digits are rounding noise.
 *
 * Documented rules (scaled norms ‖δ‖_D = ‖diag(‖Jⱼ‖)·δ‖):
 *  - at most `maxSteps` (default 30) steps;
 *  - stop when ‖δ‖_D ≤ ε·‖θ‖_D (ε = 2⁻⁵²): nothing left to resolve;
 *  - a trial point θ + δ is kept when it lies inside the bounds (strictly
 *    inside after the interior reflective method), its
 *    residuals and Jacobian are finite, the cost did not grow by more than
 *    GROWTH = 1e-10 relative (beyond any rounding noise, which reaches ~1e-11
 *    for small-residual fits) and the next step contracts: ‖δ⁺‖_D ≤ 0.9·‖δ‖_D
 *    (Gauss–Newton converges linearly on large-residual fits, with rates up
 *    to ~0.8 on the NIST problems);
 *  - otherwise the previous point is kept and polishing ends (its Jacobian
 *    is then evaluated again into the state's buffer, which held the trial's).
 *
 * Tall problems (n ≥ STREAMED_MIN_ROWS, `linalg/streamed-qr.ts`) take each
 * step from the streamed factor of [J | r] (one pass over the rows, no m×p
 * copy, no Householder vectors, the same backward error bound) followed by one
 * correction by the corrected seminormal equations with the residual in
 * double-double (`seminormal.ts`, one more pass), instead of the pivoted QR of
 * J plus one augmented refinement step (a copy, the factorisation and two
 * applications of Q: about four times the passes). Measured on the 1e6-point
 * 4-parameter logistic of benchmark 14 (2026-12-03, CPU profiles under load):
 * the result is bit for bit that of the pivoted-QR polish (JSON compared, sorted
 * and shuffled rows) and its steps take about half the time (324 vs 658 ms).
 * No factorisation of J is then returned (the statistics factor J once).
 * Every NIST StRD problem (n ≤ 250) keeps the pivoted QR and its refinement.
 */
import type { LeastSquaresProblem } from './problem';
import { PivotedQR } from '../linalg/qr';
import { norm2, EPSILON } from '../linalg/norm';
import { refineLeastSquares, refineWorkspace, type RefineWorkspace } from './refine';
import { allFinite } from './types';
import { StreamedQR, STREAMED_MIN_ROWS } from '../linalg/streamed-qr';
import { refineSeminormal } from './seminormal';

/** Largest accepted ratio of successive scaled Gauss–Newton steps. */
const CONTRACTION = 0.9;
/** Largest accepted relative cost growth of a polishing step. */
const GROWTH = 1e-10;

export interface PolishState {
  x: Float64Array;
  r: Float64Array;
  /** Jacobian at x on entry; kept current on exit. */
  jac: Float64Array;
}

export interface PolishCount {
  steps: number;
  evaluations: number;
  jacobianEvaluations: number;
  /** The last factorisation when it is of J at the returned x (see SolveOutcome.factor), else null. */
  factor: PivotedQR | null;
}

/** Gauss–Newton step at (r, J) into `delta`; returns its scaled norm and ‖θ‖_D in `norms`, or false if rank deficient. */
function gaussNewtonStep(qr: PivotedQR, n: number, p: number, x: Float64Array, r: Float64Array, jac: Float64Array, b: Float64Array, delta: Float64Array, w: Float64Array, rw: RefineWorkspace): [number, number] | null {
  qr.factor(jac, n, p, { pivot: true, scale: true });
  if (qr.rank < p) return null;
  for (let i = 0; i < n; i++) b[i] = -r[i];
  qr.solveLeastSquares(b, delta);
  for (let i = 0; i < n; i++) b[i] = -r[i];
  refineLeastSquares({ qr, n, p, aHi: jac, aLo: null, bHi: b, bLo: null, maxSteps: 1, workspace: rw }, delta);
  for (let j = 0; j < p; j++) w[j] = delta[j] / qr.scale[j];
  const step = norm2(w);
  for (let j = 0; j < p; j++) w[j] = x[j] / qr.scale[j];
  return [step, norm2(w)];
}

/**
 * The same step from the streamed factor of [J | r] (module comment): δ = −P·R₂⁻¹·(Q·Q₂)ᵀr, then one
 * seminormal correction against b = −r in double-double; null if rank deficient.
 */
function streamedStep(sq: StreamedQR, n: number, p: number, x: Float64Array, r: Float64Array, jac: Float64Array, b: Float64Array, delta: Float64Array, w: Float64Array): [number, number] | null {
  sq.factor(jac, r, n);
  const f = sq.small;
  if (f.rank < p) return null;
  for (let j = 0; j < p; j++) w[j] = -sq.qtr[j];
  f.solveR(w, p);
  f.toOriginal(w, delta, p);
  for (let i = 0; i < n; i++) b[i] = -r[i];
  refineSeminormal({ qr: f, n, p, aHi: jac, aLo: null, bHi: b, bLo: null, maxSteps: 1 }, delta);
  for (let j = 0; j < p; j++) w[j] = delta[j] * sq.norms[j];
  const step = norm2(w);
  for (let j = 0; j < p; j++) w[j] = x[j] * sq.norms[j];
  return [step, norm2(w)];
}

/**
 * Optional workspace lent by the caller (e.g. Levenberg–Marquardt's own QR
 * buffer and two n-vectors it no longer needs), so that polishing allocates
 * no n×p array besides the trial Jacobian. Contents are overwritten.
 */
export interface PolishWorkspace {
  /** A factorisation object with maxRows ≥ n and maxCols ≥ p. */
  qr: PivotedQR;
  /** Two distinct n-vectors, distinct from the state's arrays. */
  b: Float64Array;
  rt: Float64Array;
}

/** `strictInterior`: trial points must lie strictly inside the bounds (the interior reflective method), not merely inside. */
export function polishGaussNewton(problem: LeastSquaresProblem, s: PolishState, maxSteps = 30, work?: PolishWorkspace, strictInterior = false): PolishCount {
  const { n, p, lower, upper } = problem;
  const count: PolishCount = { steps: 0, evaluations: 0, jacobianEvaluations: 0, factor: null };
  if (n === 0 || p === 0 || n < p) return count;
  const tall = n >= STREAMED_MIN_ROWS;
  const fits = work !== undefined && (tall || (work.qr.maxRows >= n && work.qr.maxCols >= p)) && work.b.length >= n && work.rt.length >= n;
  const qr = tall ? null : fits ? work.qr : new PivotedQR(n, p);
  const sq = tall ? new StreamedQR(p) : null;
  const b = fits ? work.b : new Float64Array(n);
  const delta = new Float64Array(p);
  const deltaT = new Float64Array(p);
  const xt = new Float64Array(p);
  const rt = fits ? work.rt : new Float64Array(n);
  // The trial Jacobian is written into s.jac itself (no second n×p buffer);
  // J(x) is recomputed there if the trial is not kept (`jacAtX`).
  const jt = s.jac;
  let jacAtX = true;
  const w = new Float64Array(p);
  const rw = tall ? null : refineWorkspace(n);
  const stepAt = (at: Float64Array, res: Float64Array, j: Float64Array, d: Float64Array) =>
    sq ? streamedStep(sq, n, p, at, res, j, b, d, w) : gaussNewtonStep(qr!, n, p, at, res, j, b, d, w, rw!);
  let cur = stepAt(s.x, s.r, s.jac, delta);
  const combined = tall ? problem.residualsAndJacobian?.bind(problem) : undefined;
  /** `qr` holds the factorisation of J(s.x) (not of a trial's Jacobian). */
  let factorAtX = true;
  let ss = 0;
  for (let i = 0; i < n; i++) ss += s.r[i] * s.r[i];
  for (let step = 0; step < maxSteps && cur; step++) {
    if (cur[0] <= EPSILON * cur[1]) break;
    let inside = true;
    for (let j = 0; j < p; j++) {
      xt[j] = s.x[j] + delta[j];
      if ((lower && xt[j] < lower[j]) || (upper && xt[j] > upper[j])) inside = false;
      if (strictInterior && ((lower && xt[j] === lower[j]) || (upper && xt[j] === upper[j]))) inside = false;
    }
    if (!inside) break;
    let st = 0;
    if (combined) {
      // tall problems: r and J of the trial in one model pass (the cost test below rejects few trials)
      const checked = combined(xt, rt, jt) === true;
      count.evaluations++;
      count.jacobianEvaluations++;
      jacAtX = false;
      if (!checked && (!allFinite(rt) || !allFinite(jt))) break;
      for (let i = 0; i < n; i++) st += rt[i] * rt[i];
      if (!(st <= (1 + GROWTH) * ss)) break;
    } else {
      problem.residuals(xt, rt);
      count.evaluations++;
      if (!allFinite(rt)) break;
      for (let i = 0; i < n; i++) st += rt[i] * rt[i];
      if (!(st <= (1 + GROWTH) * ss)) break;
      problem.jacobian(xt, jt);
      count.jacobianEvaluations++;
      jacAtX = false;
      if (!allFinite(jt)) break;
    }
    const next = stepAt(xt, rt, jt, deltaT);
    factorAtX = false;
    if (!next || !(next[0] <= CONTRACTION * cur[0])) break;
    factorAtX = true;
    s.x.set(xt);
    s.r.set(rt);
    jacAtX = true;
    ss = st;
    delta.set(deltaT);
    cur = next;
    count.steps++;
  }
  if (!jacAtX) {
    problem.jacobian(s.x, s.jac);
    count.jacobianEvaluations++;
  }
  if (factorAtX && qr) count.factor = qr;
  return count;
}
