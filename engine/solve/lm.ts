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
 *    accepted when ρ ≥ 1e-4 and both r and J are finite at the trial point.
 *    Initial Δ = 100·‖Dθ₀‖ (or 100 if zero).
 * Non-finite values: a trial point whose residuals or Jacobian are not finite
 * is a failed step (ρ < 0: Δ shrinks to at most a tenth), never the end of
 * the fit; when Δ then collapses with the last trial non-finite, the stop is
 * `non_finite` (not converged) with the rows and parameter values
 * (`nonFinite` of the outcome). Non-finite residuals or Jacobian at the
 * starting values leave no step to take: `non_finite` at once.
 * Bounds: this module is the projection method, with an active set
 * (`bounds.ts`); when the projected step differs from the LM step, ρ uses the
 * predicted reduction of the projected step, −(2rᵀJs + ‖Js‖²)/‖r‖². Bounded
 * problems go to the interior reflective method by default (`reflective.ts`,
 * chosen in `index.ts`).
 *
 * Stopping tests (all relative; tolerances default to 1e-10):
 *  small_reduction: |actred| ≤ reductionTolerance and prered ≤ reductionTolerance
 *                   and ρ ≤ 2, where actred = 1 − (‖r⁺‖/‖r‖)², prered its
 *                   linear-model prediction;
 *  small_step:      Δ ≤ stepTolerance·‖Dθ‖;
 *  small_gradient:  max_j |Jⱼᵀr| / (‖Jⱼ‖·‖r‖) ≤ gradientTolerance (cosine of the
 *                   angle between r and each Jacobian column; 0 at a zero residual);
 *  the same three with the tolerance replaced by ε = 2⁻⁵² mean that no
 *  further progress is possible in double precision (reported as such);
 *  a reduction or step stop with the scaled gradient above 1e-3 and
 *  prered ≤ reductionTolerance is not a minimum (`stagnation.ts`
 *  DEAD_GRADIENT): `non_finite` when non-finite trials were met (the trust
 *  region was cut at the edge of the model's domain), else `stagnated`;
 *  stagnated (`stagnation.ts`: over 50 accepted iterations the cost fell by
 *  ≤ 1e-10 relative and no parameter moved by more than 1e-6 relative; not
 *  converged), max_iterations (accepted steps, default 1000), max_evaluations
 *  (residual evaluations, default max(2000, 2·maxIterations, 100·(p+1))),
 *  cancelled, non_finite (above), failed (an invalid option, `options.ts`).
 * After a converged stop, Gauss–Newton polishing (`polish.ts`) settles the
 * last digits unless `polish: false`.
 */
import type { LeastSquaresProblem } from './problem';
import { type SolveOptions, type SolveOutcome, type NonFiniteReport, allFinite, nonFiniteReport } from './types';
import type { StopCode } from '../result';
import { PivotedQR } from '../linalg/qr';
import { StreamedQR, STREAMED_MIN_ROWS } from '../linalg/streamed-qr';
import { copyR } from '../linalg/damped';
import { norm2, EPSILON } from '../linalg/norm';
import { LMParameter } from './lm-parameter';
import { project, freeSet } from './bounds';
import { finishSolve } from './finish';
import { stopText } from './messages';
import { trustRegionSettings, validateSolveOptions } from './options';
import { DEAD_GRADIENT, LM_STAGNATION, StagnationWatch } from './stagnation';
import { TraceRecorder, finiteOrNull } from './trace';
import { workArray } from '../linalg/work-array';

/** Initial trust radius factor (Moré 1978 §6: 100). */
const STEP_FACTOR = 100;
/** Smallest ratio ρ of an accepted step (Moré 1978 §4: 1e-4). */
const ACCEPT_RATIO = 1e-4;

export function levenbergMarquardt(problem: LeastSquaresProblem, theta0: Float64Array, options: SolveOptions = {}): SolveOutcome {
  const { n, p, lower, upper } = problem;
  const { ftol, xtol, gtol, maxIter, maxFev } = trustRegionSettings(options, p);

  const x = Float64Array.from(theta0);
  project(x, lower, upper);
  const r = workArray(n);
  const jac = workArray(n * p);
  let nfev = 0;
  let njev = 0;
  let iterations = 0;
  const recorder = options.trace ? new TraceRecorder('levenberg_marquardt') : null;
  let nonFinite: NonFiniteReport | null = null;
  /** The last non-finite trial of the run (kept after later acceptances, for a dead stop). */
  let lastNonFinite: NonFiniteReport | null = null;
  /** A trial step was evaluated (a non-finite stop is then not about the starting values). */
  let started = false;
  const finish = (code: StopCode, message: string, jacobianCurrent: boolean): SolveOutcome => finishSolve(code, message, {
    problem, x, r, jac, jacobianCurrent, iterations, evaluations: nfev, jacobianEvaluations: njev, started,
    polish: options.polish !== false, strictInterior: false, workspace: qr !== null ? { qr, b: wa, rt } : undefined, recorder, nonFinite,
  });
  // Work arrays, allocated once (qr, wa, rt before the first `finish` that may polish).
  let qr: PivotedQR | null = null;
  const wa = workArray(n);
  const rt = workArray(n);
  const invalid = validateSolveOptions(options);
  if (invalid !== null) return finish('failed', stopText.invalidOption(invalid), true);
  if (n === 0) return finish('failed', stopText.noRows, true);

  problem.residuals(x, r);
  nfev++;
  if (!allFinite(r)) {
    nonFinite = nonFiniteReport('residuals', r, n, 1, x);
    return finish('non_finite', stopText.startNotFinite('residuals'), true);
  }
  if (p === 0) return finish('small_gradient', stopText.noFreeParameters, true);
  let fnorm = norm2(r);

  /** Free columns of J when some parameters are held at bounds: allocated on first need only (n×p). */
  let jf: Float64Array | null = null;
  const rq = workArray(p * p);
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
  // Tall unbounded problems: R, P and Qᵀr in one pass over the rows (`streamed-qr.ts` STREAMED_MIN_ROWS; a held parameter needs the factor of J's free columns).
  const streamed = !bounded && n >= STREAMED_MIN_ROWS ? new StreamedQR(p) : null;
  const qrf = streamed ? null : new PivotedQR(n, p);
  qr = qrf;
  /** The factorisation whose R and permutation the step uses (that of R itself when streamed). */
  const fac = streamed ? streamed.small : qrf!;
  const watch = new StagnationWatch(p, { ...LM_STAGNATION, costTolerance: Math.max(LM_STAGNATION.costTolerance, ftol) });

  let par = 0;
  let delta = 0;
  let xnorm = 0;
  /** Before the first accepted step (Moré's iter = 1). */
  let first = true;
  let initialised = false;
  /** A new point was accepted (its Jacobian not yet factored). */
  let needJacobian = true;
  /** `jac` holds J(x). False after a rejected combined trial (it then holds J(trial)). */
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
    if (options.cancel?.cancelled) return finish('cancelled', stopText.cancelled(iterations), jacAtX);
    if (needJacobian && iterations >= maxIter) return finish('max_iterations', stopText.maxIterations(maxIter), jacAtX);
    if (!jacAtX) {
      problem.jacobian(x, jac);
      njev++;
      jacAtX = true;
      // Only the starting point can get here with a non-finite J: accepted points have a finite one.
      if (!allFinite(jac)) {
        nonFinite = nonFiniteReport('jacobian', jac, n, p, x);
        return finish('non_finite', stopText.startNotFinite('jacobian'), true);
      }
    }
    if (needJacobian) {
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
    if (q === 0) return finish('small_gradient', stopText.allAtBounds, true);
    if (streamed) streamed.factor(jac, r, n);
    else if (q === p) qrf!.factor(jac, n, p, { pivot: true });
    else {
      jf ??= new Float64Array(n * p);
      for (let k = 0; k < q; k++) {
        const from = free[k] * n;
        const to = k * n;
        for (let i = 0; i < n; i++) jf[to + i] = jac[from + i];
      }
      qrf!.factor(jf, n, q, { pivot: true });
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
    if (streamed) qtf.set(streamed.qtr);
    else {
      wa.set(r);
      qrf!.applyQt(wa);
      qtf.fill(0);
      for (let k = 0; k < Math.min(n, q); k++) qtf[k] = wa[k];
    }
    copyR(fac, rq);
    const norms = streamed ? streamed.norms : qrf!.norms;
    // Scaled gradient norm: max_k |(Rᵀ Qᵀr)_k| / (‖J_k‖·‖r‖).
    let gnorm = 0;
    if (fnorm !== 0) {
      for (let k = 0; k < q; k++) {
        const cn = norms[fac.perm[k]];
        if (cn === 0) continue;
        let s = 0;
        for (let i = 0; i <= k; i++) s += rq[i + k * q] * (qtf[i] / fnorm);
        gnorm = Math.max(gnorm, Math.abs(s / cn));
      }
    }
    if (gnorm <= gtol) return finish('small_gradient', stopText.smallGradient(gnorm, gtol), jacAtX);
    // Column norms: the factorisation computed them (same norm2 on the same numbers) when every column is free.
    for (let j = 0; j < p; j++) diag[j] = Math.max(diag[j], q === p ? norms[j] : norm2(jac, j * n, n));
    for (let k = 0; k < q; k++) dF[k] = diag[free[k]];

    // Inner loop: trial steps until one is accepted.
    for (;;) {
      par = lmpar.compute(q, rq, fac.perm, dF, qtf, delta, par, xF);
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
      // `true`: the problem checked r and J for finiteness in its own passes (LeastSquaresProblem.residualsAndJacobian)
      let checked = false;
      if (withJacobian) {
        checked = combined(xt, rt, jac) === true;
        njev++;
        jacAtX = false;
      } else problem.residuals(xt, rt);
      nfev++;
      started = true;
      let trialFinite = checked || allFinite(rt);
      if (!trialFinite) nonFinite = lastNonFinite = nonFiniteReport('residuals', rt, n, 1, xt);
      else if (withJacobian && !checked && !allFinite(jac)) {
        trialFinite = false;
        nonFinite = lastNonFinite = nonFiniteReport('jacobian', jac, n, p, xt);
      }
      let fnorm1 = trialFinite ? norm2(rt) : Infinity;
      let actred = 0.1 * fnorm1 < fnorm ? 1 - (fnorm1 / fnorm) ** 2 : -1;

      let prered: number;
      let dirder: number;
      if (!clipped) {
        // ‖J·p‖ = ‖R·Pᵀp‖ for the LM step p = −x.
        let s1 = 0;
        for (let j = 0; j < q; j++) {
          let s = 0;
          for (let i = j; i < q; i++) s += rq[j + i * q] * xF[fac.perm[i]];
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
      let ratio = prered !== 0 ? actred / prered : 0;
      if (ratio >= ACCEPT_RATIO && !withJacobian) {
        // A step about to be accepted needs a finite Jacobian at its point (J(x) is no longer read).
        problem.jacobian(xt, jac);
        njev++;
        jacAtX = false;
        if (!allFinite(jac)) {
          nonFinite = lastNonFinite = nonFiniteReport('jacobian', jac, n, p, xt);
          fnorm1 = Infinity;
          actred = -1;
          ratio = prered !== 0 ? actred / prered : 0;
        }
      }

      if (ratio <= 0.25) {
        let t = actred >= 0 ? 0.5 : (0.5 * dirder) / (dirder + 0.5 * actred);
        if (0.1 * fnorm1 >= fnorm || t < 0.1) t = 0.1;
        delta = t * Math.min(delta, pnorm / 0.1);
        par /= t;
      } else if (par === 0 || ratio >= 0.75) {
        delta = pnorm / 0.5;
        par *= 0.5;
      }
      const accepted = ratio >= ACCEPT_RATIO;
      recorder?.add({
        iteration: iterations, cost: 0.5 * fnorm * fnorm, trialCost: finiteOrNull(0.5 * fnorm1 * fnorm1), gradient: gnorm,
        step: pnorm, radius: delta, ratio: Number.isFinite(fnorm1) ? ratio : null, accepted,
      });
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
        // jac holds J(x): from the combined evaluation or the acceptance check above
        jacAtX = true;
        nonFinite = null;
        options.onIteration?.(iterations, 0.5 * fnorm * fnorm);
        const stalled = watch.record(0.5 * fnorm * fnorm, x);
        if (stalled) return finish('stagnated', stopText.stagnated(stalled, watch.settings.costTolerance, watch.settings.stepTolerance), true);
      }
      const current = jacAtX;
      // a large gradient measure the model cannot reduce: not a minimum (stagnation.ts DEAD_GRADIENT)
      const dead = gnorm > DEAD_GRADIENT && prered <= ftol;
      const deadStop = (): SolveOutcome => {
        if (lastNonFinite) {
          nonFinite = lastNonFinite;
          return finish('non_finite', stopText.noFiniteStep(lastNonFinite.what, delta), current);
        }
        return finish('stagnated', stopText.deadRegion(gnorm, prered), current);
      };
      if (Math.abs(actred) <= ftol && prered <= ftol && 0.5 * ratio <= 1) {
        if (dead) return deadStop();
        return finish('small_reduction', stopText.smallReduction(Math.abs(actred), ftol, prered), current);
      }
      if (delta <= xtol * xnorm) {
        if (!accepted && nonFinite) return finish('non_finite', stopText.noFiniteStep(nonFinite.what, delta), current);
        if (dead) return deadStop();
        return finish('small_step', stopText.smallRadius(delta, xtol * xnorm), current);
      }
      if (nfev >= maxFev) return finish('max_evaluations', stopText.maxEvaluations(maxFev), current);
      if (Math.abs(actred) <= EPSILON && prered <= EPSILON && 0.5 * ratio <= 1) {
        if (dead) return deadStop();
        return finish('small_reduction', stopText.smallReductionRounding(Math.abs(actred)), current);
      }
      if (delta <= EPSILON * xnorm) {
        if (!accepted && nonFinite) return finish('non_finite', stopText.noFiniteStep(nonFinite.what, delta), current);
        if (dead) return deadStop();
        return finish('small_step', stopText.smallRadiusRounding(delta, xnorm), current);
      }
      if (gnorm <= EPSILON) return finish('small_gradient', stopText.smallGradientRounding(gnorm), current);
      if (accepted) break;
    }
  }
}
