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
 */
import type { LeastSquaresProblem } from './problem';
import { PivotedQR } from '../linalg/qr';
import { norm2, EPSILON } from '../linalg/norm';
import { refineLeastSquares, refineWorkspace, type RefineWorkspace } from './refine';
import { allFinite } from './types';

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
  const fits = work !== undefined && work.qr.maxRows >= n && work.qr.maxCols >= p && work.b.length >= n && work.rt.length >= n;
  const qr = fits ? work.qr : new PivotedQR(n, p);
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
  const rw = refineWorkspace(n);
  let cur = gaussNewtonStep(qr, n, p, s.x, s.r, s.jac, b, delta, w, rw);
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
    problem.residuals(xt, rt);
    count.evaluations++;
    if (!allFinite(rt)) break;
    let st = 0;
    for (let i = 0; i < n; i++) st += rt[i] * rt[i];
    if (!(st <= (1 + GROWTH) * ss)) break;
    problem.jacobian(xt, jt);
    count.jacobianEvaluations++;
    jacAtX = false;
    if (!allFinite(jt)) break;
    const next = gaussNewtonStep(qr, n, p, xt, rt, jt, b, deltaT, w, rw);
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
  if (factorAtX) count.factor = qr;
  return count;
}
