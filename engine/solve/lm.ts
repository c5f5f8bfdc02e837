/**
 * Levenberg–Marquardt as a trust-region method with diagonal scaling, after
 * J. J. Moré, "The Levenberg-Marquardt algorithm: implementation and theory",
 * Numerical Analysis (Dundee 1977), LNM 630 (1978) 105-116; the design:
 *  - D = diag of Jacobian column norms, never decreasing (eq. (6.3));
 *  - each iteration factors J·P = Q·R once (pivoted Householder QR); trial
 *    steps solve min‖[J; √λD]p + [r; 0]‖ by Givens updates of R (§3) with λ
 *    from Moré's iteration for ‖Dp‖ ≈ Δ (§5, `lm-parameter.ts`); JᵀJ is never
 *    formed or inverted;
 *  - ρ = actual/predicted reduction; Δ is shrunk (by a factor from quadratic
 *    interpolation, clamped to [0.1, 0.5]) when ρ ≤ 1/4, doubled-ish
 *    (Δ = 2‖Dp‖) when ρ ≥ 3/4 or λ = 0 (§4, eq. (4.2)-(4.4)); a step is
 *    accepted when ρ ≥ 1e-4. Initial Δ = 100·‖Dθ₀‖ (or 100 if zero).
 * Bounds: projection with an active set (`bounds.ts`); when the projected
 * step differs from the LM step, ρ uses the predicted reduction of the
 * projected step, −(2rᵀJs + ‖Js‖²)/‖r‖².
 *
 * Stopping tests (all relative; defaults ftol = xtol = gtol = 1e-10):
 *  small_reduction: |actred| ≤ ftol and prered ≤ ftol and ρ ≤ 2, where
 *                   actred = 1 − (‖r⁺‖/‖r‖)², prered its linear-model prediction;
 *  small_step:      Δ ≤ xtol·‖Dθ‖;
 *  small_gradient:  max_j |Jⱼᵀr| / (‖Jⱼ‖·‖r‖) ≤ gtol (cosine of the angle
 *                   between r and each Jacobian column; 0 at a zero residual);
 *  the same three with the tolerance replaced by ε = 2⁻⁵² mean that no
 *  further progress is possible in double precision (reported as such);
 *  max_iterations (Jacobian evaluations, default 200), max_evaluations
 *  (residual evaluations, default max(1000, 100·(p+1))), cancelled,
 *  non_finite (r or J at an accepted point not finite; a non-finite trial
 *  point is treated as a failed step and shrinks Δ).
 * After a converged stop, Gauss–Newton polishing (`polish.ts`) settles the
 * last digits unless `polish: false`.
 */
import type { LeastSquaresProblem } from './problem';
import { type SolveOptions, type SolveOutcome, DEFAULT_TOLERANCE, stopReason, fmt, allFinite } from './types';
import type { StopCode } from '../result';
import { PivotedQR } from '../linalg/qr';
import { copyR } from '../linalg/damped';
import { norm2, EPSILON } from '../linalg/norm';
import { LMParameter } from './lm-parameter';
import { project, freeSet } from './bounds';
import { polishGaussNewton } from './polish';

/** Initial trust radius factor (Moré 1978 §6: 100). */
const STEP_FACTOR = 100;

export function levenbergMarquardt(problem: LeastSquaresProblem, theta0: Float64Array, options: SolveOptions = {}): SolveOutcome {
  const { n, p, lower, upper } = problem;
  const ftol = options.ftol ?? DEFAULT_TOLERANCE;
  const xtol = options.xtol ?? DEFAULT_TOLERANCE;
  const gtol = options.gtol ?? DEFAULT_TOLERANCE;
  const maxIter = options.maxIterations ?? 1000;
  const maxFev = options.maxEvaluations ?? Math.max(2000, 2 * maxIter, 100 * (p + 1));

  const x = Float64Array.from(theta0);
  project(x, lower, upper);
  const r = new Float64Array(n);
  const jac = new Float64Array(n * p);
  let nfev = 0;
  let njev = 0;
  let iterations = 0;
  const finish = (code: StopCode, message: string, jacobianCurrent: boolean): SolveOutcome => {
    if (!jacobianCurrent && n > 0 && p > 0 && code !== 'non_finite') {
      problem.jacobian(x, jac);
      njev++;
    }
    const stop = stopReason(code, message);
    if (code === 'small_step' && iterations === 0) {
      // Every trial step from the start was rejected until the trust region
      // collapsed: the point never moved, so this is not evidence of an optimum.
      stop.converged = false;
      stop.message += '; no step was accepted from the starting values (try other starting values or a tighter tolerance)';
    }
    if (stop.converged && options.polish !== false) {
      // Workspace shared with polishing (its QR buffer and two n-vectors), so no
      // further n×p array is allocated for it.
      const c = polishGaussNewton(problem, { x, r, jac }, 30, qr !== null ? { qr, b: wa, rt } : undefined);
      nfev += c.evaluations;
      njev += c.jacobianEvaluations;
      if (c.steps > 0) stop.message += `; then ${c.steps} Gauss–Newton polishing step(s)`;
    }
    let ss = 0;
    for (let i = 0; i < n; i++) ss += r[i] * r[i];
    return { theta: x, residuals: r, jacobian: jac, cost: 0.5 * ss, stop, iterations, evaluations: nfev, jacobianEvaluations: njev };
  };
  // Work arrays, allocated once (qr, wa, rt before the first `finish` that may polish).
  let qr: PivotedQR | null = null;
  const wa = new Float64Array(n);
  const rt = new Float64Array(n);
  if (n === 0) return finish('failed', 'no data rows to fit', true);

  problem.residuals(x, r);
  nfev++;
  if (!allFinite(r)) return finish('non_finite', 'residuals at the starting values are not finite', true);
  if (p === 0) return finish('small_gradient', 'no free parameters to fit', true);
  let fnorm = norm2(r);

  const qrf = new PivotedQR(n, p);
  qr = qrf;
  /** Free columns of J when some parameters are held at bounds: allocated on first need only (n×p). */
  let jf: Float64Array | null = null;
  const rq = new Float64Array(p * p);
  const qtf = new Float64Array(p);
  const diag = new Float64Array(p);
  const dF = new Float64Array(p);
  const xF = new Float64Array(p);
  const xt = new Float64Array(p);
  const grad = new Float64Array(p);
  const free = new Int32Array(p);
  const blocked = new Uint8Array(p);
  const lmpar = new LMParameter(p);
  const bounded = lower !== undefined || upper !== undefined;

  let par = 0;
  let delta = 0;
  let xnorm = 0;
  /** Before the first accepted step (Moré's iter = 1). */
  let first = true;
  let initialised = false;
  /** A new point was accepted (its Jacobian not yet checked and factored). */
  let needJacobian = true;
  /** `jac` holds J(x). False after x moved without a combined evaluation, or after a rejected combined trial. */
  let jacAtX = false;
  /**
   * Combined trial evaluation: when the problem offers `residualsAndJacobian`,
   * each (unclipped) trial point's Jacobian is computed with its residuals,
   * written straight into `jac`: an accepted step then needs no separate
   * Jacobian pass, and no second n×p buffer is kept. A rejected trial leaves
   * J(trial) in `jac`, recomputed at x only when J(x) is read again.
   */
  const combined = problem.residualsAndJacobian?.bind(problem);

  for (;;) {
    if (options.cancel?.cancelled) return finish('cancelled', `cancelled after ${iterations} iteration(s)`, jacAtX);
    if (needJacobian && iterations >= maxIter) return finish('max_iterations', `reached the iteration limit ${maxIter}`, jacAtX);
    if (!jacAtX) {
      problem.jacobian(x, jac);
      njev++;
      jacAtX = true;
    }
    if (needJacobian) {
      if (!allFinite(jac)) return finish('non_finite', `Jacobian not finite at iteration ${iterations}`, true);
      blocked.fill(0);
      needJacobian = false;
    }
    // Gradient Jᵀr (for the active set) and the free columns.
    for (let j = 0; j < p; j++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += jac[j * n + i] * r[i];
      grad[j] = s;
    }
    const q = bounded ? freeSet(x, grad, lower, upper, blocked, free) : p;
    if (!bounded) for (let j = 0; j < p; j++) free[j] = j;
    if (q === 0) return finish('small_gradient', 'every parameter is held at a bound by the gradient (projected gradient 0)', true);
    if (q === p) qrf.factor(jac, n, p, { pivot: true });
    else {
      jf ??= new Float64Array(n * p);
      for (let k = 0; k < q; k++) {
        const from = free[k] * n;
        const to = k * n;
        for (let i = 0; i < n; i++) jf[to + i] = jac[from + i];
      }
      qrf.factor(jf, n, q, { pivot: true });
    }

    if (!initialised) {
      initialised = true;
      for (let j = 0; j < p; j++) {
        const c = norm2(jac, j * n, n);
        diag[j] = c === 0 ? 1 : c;
      }
      let s = 0;
      for (let j = 0; j < p; j++) s += (diag[j] * x[j]) ** 2;
      xnorm = Math.sqrt(s);
      delta = STEP_FACTOR * xnorm || STEP_FACTOR;
    }
    wa.set(r);
    qrf.applyQt(wa);
    qtf.fill(0);
    for (let k = 0; k < Math.min(n, q); k++) qtf[k] = wa[k];
    copyR(qrf, rq);
    // Scaled gradient norm: max_k |(Rᵀ Qᵀr)_k| / (‖J_k‖·‖r‖).
    let gnorm = 0;
    if (fnorm !== 0) {
      for (let k = 0; k < q; k++) {
        const cn = qrf.norms[qrf.perm[k]];
        if (cn === 0) continue;
        let s = 0;
        for (let i = 0; i <= k; i++) s += rq[i + k * q] * (qtf[i] / fnorm);
        gnorm = Math.max(gnorm, Math.abs(s / cn));
      }
    }
    if (gnorm <= gtol) return finish('small_gradient', `scaled gradient ${fmt(gnorm)} <= gtol ${fmt(gtol)}`, jacAtX);
    // Column norms: the factorisation computed them (same norm2 on the same numbers) when every column is free.
    for (let j = 0; j < p; j++) diag[j] = Math.max(diag[j], q === p ? qrf.norms[j] : norm2(jac, j * n, n));
    for (let k = 0; k < q; k++) dF[k] = diag[free[k]];

    // Inner loop: trial steps until one is accepted.
    for (;;) {
      par = lmpar.compute(q, rq, qrf.perm, dF, qtf, delta, par, xF);
      xt.set(x);
      for (let k = 0; k < q; k++) xt[free[k]] -= xF[k];
      const clipped = bounded && project(xt, lower, upper);
      if (clipped) {
        // A parameter on its bound whose LM step points outwards: hold it and recompute the step.
        let newlyBlocked = false;
        for (let k = 0; k < q; k++) {
          const j = free[k];
          if (xt[j] === x[j] && xF[k] !== 0) { blocked[j] = 1; newlyBlocked = true; }
        }
        if (newlyBlocked) break;
      }
      let pn = 0;
      for (let j = 0; j < p; j++) pn += (diag[j] * (xt[j] - x[j])) ** 2;
      const pnorm = Math.sqrt(pn);
      if (first) delta = Math.min(delta, pnorm);

      // A clipped step reads J(x) below, so it is evaluated without the Jacobian.
      const withJacobian = combined !== undefined && !clipped;
      if (clipped && !jacAtX) {
        problem.jacobian(x, jac);
        njev++;
        jacAtX = true;
      }
      if (withJacobian) {
        combined(xt, rt, jac);
        njev++;
        jacAtX = false;
      } else problem.residuals(xt, rt);
      nfev++;
      const fnorm1 = allFinite(rt) ? norm2(rt) : Infinity;
      const actred = 0.1 * fnorm1 < fnorm ? 1 - (fnorm1 / fnorm) ** 2 : -1;

      let prered: number;
      let dirder: number;
      if (!clipped) {
        // ‖J·p‖ = ‖R·Pᵀp‖ for the LM step p = −x.
        let s1 = 0;
        for (let j = 0; j < q; j++) {
          let s = 0;
          for (let i = j; i < q; i++) s += rq[j + i * q] * xF[qrf.perm[i]];
          s1 += s * s;
        }
        const t1 = Math.sqrt(s1) / fnorm;
        const t2 = (Math.sqrt(par) * pnorm) / fnorm;
        prered = t1 * t1 + 2 * t2 * t2;
        dirder = -(t1 * t1 + t2 * t2);
      } else {
        let rjs = 0;
        let js2 = 0;
        for (let i = 0; i < n; i++) {
          let s = 0;
          for (let j = 0; j < p; j++) s += jac[j * n + i] * (xt[j] - x[j]);
          rjs += r[i] * s;
          js2 += s * s;
        }
        const f2 = fnorm * fnorm;
        prered = -(2 * rjs + js2) / f2;
        dirder = rjs / f2;
      }
      const ratio = prered !== 0 ? actred / prered : 0;

      if (ratio <= 0.25) {
        let t = actred >= 0 ? 0.5 : (0.5 * dirder) / (dirder + 0.5 * actred);
        if (0.1 * fnorm1 >= fnorm || t < 0.1) t = 0.1;
        delta = t * Math.min(delta, pnorm / 0.1);
        par /= t;
      } else if (par === 0 || ratio >= 0.75) {
        delta = pnorm / 0.5;
        par *= 0.5;
      }
      const accepted = ratio >= 1e-4;
      if (accepted) {
        x.set(xt);
        r.set(rt);
        fnorm = fnorm1;
        let s = 0;
        for (let j = 0; j < p; j++) s += (diag[j] * x[j]) ** 2;
        xnorm = Math.sqrt(s);
        iterations++;
        first = false;
        needJacobian = true;
        jacAtX = withJacobian;
        options.onIteration?.(iterations, 0.5 * fnorm * fnorm);
      }
      const current = jacAtX;
      if (Math.abs(actred) <= ftol && prered <= ftol && 0.5 * ratio <= 1) {
        return finish('small_reduction', `relative reduction ${fmt(Math.abs(actred))} <= ftol ${fmt(ftol)} (predicted ${fmt(prered)})`, current);
      }
      if (delta <= xtol * xnorm) {
        return finish('small_step', `trust-region radius ${fmt(delta)} <= xtol·‖Dθ‖ = ${fmt(xtol * xnorm)}`, current);
      }
      if (nfev >= maxFev) return finish('max_evaluations', `reached the evaluation limit ${maxFev}`, current);
      if (Math.abs(actred) <= EPSILON && prered <= EPSILON && 0.5 * ratio <= 1) {
        return finish('small_reduction', `relative reduction ${fmt(Math.abs(actred))} at machine precision`, current);
      }
      if (delta <= EPSILON * xnorm) return finish('small_step', `trust-region radius ${fmt(delta)} at machine precision of ‖Dθ‖ = ${fmt(xnorm)}`, current);
      if (gnorm <= EPSILON) return finish('small_gradient', `scaled gradient ${fmt(gnorm)} at machine precision`, current);
      if (accepted) break;
    }
  }
}
