/**
 * Interior reflective trust-region method for bound-constrained least
 * squares, min ½‖r(θ)‖² subject to l ≤ θ ≤ u: T. F. Coleman & Y. Li, "An
 * interior trust region approach for nonlinear minimization subject to
 * bounds", SIAM J. Optim. 6 (1996) 418-445, in the least-squares form of
 * M. A. Branch, T. F. Coleman & Y. Li, SIAM J. Sci. Comput. 21 (1999) 1-23.
 * Iterates stay strictly inside the box, so a model that is singular on a
 * bound (a potency ec = 0 in (dose/ec)^h) is never evaluated there.
 *
 * Each iteration, at a strictly feasible θ with r, J, g = Jᵀr:
 *  1. Coleman–Li scaling |vⱼ| (`bounds.ts`): the distance to the bound the
 *     gradient points at, 1 when there is none; cⱼ = |gⱼ|/|vⱼ| for those
 *     bounded directions (0 otherwise), the diagonal of the affine-scaling
 *     Newton system.
 *  2. Trust-region scaling Dⱼ = σⱼ/√|vⱼ| with σⱼ the Jacobian column norm,
 *     never decreasing (Moré 1978 eq. (6.3)); without bounds in play D is
 *     Moré's scaling and the step is the Levenberg–Marquardt step.
 *  3. One pivoted QR of J (`linalg/qr.ts`; no normal equations). The model
 *     ψ(s) = gᵀs + ½‖Js‖² + ½Σcⱼsⱼ² is minimised in ‖Ds‖ ≤ Δ as the damped
 *     least-squares problem min ‖[J; diag(√c); √λ·D] s + [r; 0; 0]‖: the p×p
 *     factor R of J is stacked on diag(√c) and refactored (a 2p×p QR), and
 *     λ comes from Moré's iteration (`lm-parameter.ts`) on that factor.
 *  4. Step selection at the bounds (`reflective-step.ts`): the full step if
 *     strictly inside, else the best on ψ of the truncated step, the
 *     reflected path and the scaled gradient step, each stepped back from
 *     the bound by θ_b = max(0.995, 1 − γ), γ the scaled gradient measure
 *     below (so θ_b → 1 near a solution, as Coleman & Li require for fast
 *     local convergence, and never closer than 0.5 % of the remaining
 *     distance otherwise). Rounding cannot put a trial on a bound: a
 *     component that would land on or beyond one is kept at (1 − θ_b) of its
 *     distance, or where it is when that distance is below the spacing of
 *     doubles at the bound.
 *  5. Acceptance (Coleman & Li 1996 §3): ρ = (f(θ) − f(θ+s) − ½Σcⱼsⱼ²)/(−ψ(s));
 *     the step is taken when ρ ≥ 1e-4 and r and J are finite at θ + s; a
 *     non-finite trial is a failed step. Δ update: for the full step Moré's
 *     rules (as in `lm.ts`); for a step shortened at a bound, Δ ← ½·min(Δ, ‖Ds‖/0.1)
 *     when ρ ≤ ¼ (a tenth after a non-finite trial) and Δ ← max(Δ, 2‖Ds‖)
 *     when ρ ≥ ¾. Initial Δ = ‖Dθ₀‖ (or 1 if zero), cut to the first
 *     step's length: Moré's 100·‖Dθ₀‖ let the first step of 2 in 1,000
 *     exponential-rise curves of the robustness suite (start k = 1, true k
 *     ≈ 0.06) throw the rate into the flat region k → ∞.
 *
 * Start: the starting values are projected onto the box and moved off a
 * bound they sit on (`makeStrictlyFeasible`: 1e-10·max(1, |bound|), at most
 * 1 % of the box).
 *
 * Stopping tests (defaults 1e-10, inequalities as in `lm.ts`):
 *  small_gradient:  γ = max_j γⱼ ≤ gradientTolerance, γⱼ = |gⱼ|/(‖Jⱼ‖·‖r‖)
 *                   (the cosine of LM's test) times min(1, ‖Jⱼ‖·|vⱼ|/‖r‖) for a
 *                   parameter whose gradient points at a bound: the share of
 *                   the residual its remaining distance can still change (→ 0
 *                   as it converges to that bound, the first-order condition
 *                   vⱼ·gⱼ = 0 of Coleman & Li);
 *  small_reduction: |actred| ≤ reductionTolerance, prered ≤ reductionTolerance, ρ ≤ 2,
 *                   for a full step only (a step cut short at a bound is
 *                   small because of the bound, not because the cost is flat);
 *  small_step:      Δ ≤ stepTolerance·‖Dθ‖;
 *  either of the two with γ > 1e-3 and prered ≤ reductionTolerance is not a
 *  minimum (`stagnation.ts` DEAD_GRADIENT): `non_finite` when non-finite
 *  trials were met, else `stagnated`, not converged;
 *  the machine-precision forms, stagnated (`stagnation.ts`, 50 accepted
 *  iterations), max_iterations (1000), max_evaluations, non_finite (the
 *  trust region collapsed on non-finite trials, or non-finite values at the
 *  start), cancelled, failed (invalid option).
 * After a converged stop, Gauss–Newton polishing (`polish.ts`) with strictly
 * interior trial points settles the last digits of an interior solution.
 *
 * Measured choice (README "Accuracy", benchmark 11, `npm run strd -- --solver
 * reflective|projection --bounds sign`), against the projection with an
 * active set of `lm.ts`:
 *   robustness suite, 12,000 curves from typed-in starts: 0 failures and 6
 *     wrong minima (local minima of 4-parameter logistic wells with the
 *     potency at or below the lowest dose), 0.83 ms per fit; projection 2,156
 *     failures (wells walking onto ec = 0, Michaelis–Menten onto km = 0) and
 *     4 wrong minima, 2.19 ms per fit;
 *   NIST StRD with sign bounds, 27 problems × 2 starts: 53 at the certified
 *     minimum (RSS ≥ 10.0 digits, parameters ≥ 10.3 digits up to swapped
 *     interchangeable terms), MGH17 start 1 reported not converged;
 *     projection 50, and MGH17 start 1 reported converged at a wrong point;
 *   NIST StRD without bounds: 53 of 54 at ≥ 9.9 digits (Thurber start 2 8.3)
 *     against 54 for Levenberg–Marquardt, which therefore stays the path of
 *     unbounded fits (`nonlinear.ts`).
 */
import type { LeastSquaresProblem } from './problem';
import { type SolveOptions, type SolveOutcome, type NonFiniteReport, allFinite, nonFiniteReport } from './types';
import type { StopCode } from '../result';
import { PivotedQR } from '../linalg/qr';
import { StreamedQR, STREAMED_MIN_ROWS } from '../linalg/streamed-qr';
import { copyR } from '../linalg/damped';
import { norm2, EPSILON } from '../linalg/norm';
import { LMParameter } from './lm-parameter';
import { colemanLiScaling, makeStrictlyFeasible } from './bounds';
import { finishSolve } from './finish';
import { stopText } from './messages';
import { trustRegionSettings, validateSolveOptions } from './options';
import { DEAD_GRADIENT, LM_STAGNATION, StagnationWatch } from './stagnation';
import { TraceRecorder, finiteOrNull } from './trace';
import { StepWork, modelValue, selectStep, type StepModel } from './reflective-step';
import { workArray } from '../linalg/work-array';

/** Initial trust radius factor: Δ₀ = STEP_FACTOR·‖Dθ₀‖ (module comment, step 5; Moré 1978 §6 uses 100). */
const STEP_FACTOR = 1;
/** Smallest ratio ρ of an accepted step. */
const ACCEPT_RATIO = 1e-4;
/** Smallest step-back factor θ_b (module comment, step 4). */
export const STEP_BACK = 0.995;

/** Floor of a bound distance |vⱼ| in the scaling (the smallest normal double). */
const MIN_DISTANCE = 2.2250738585072014e-308;

export function reflectiveTrustRegion(problem: LeastSquaresProblem, theta0: Float64Array, options: SolveOptions = {}): SolveOutcome {
  const { n, p, lower, upper } = problem;
  const { ftol, xtol, gtol, maxIter, maxFev } = trustRegionSettings(options, p);

  const x = Float64Array.from(theta0);
  makeStrictlyFeasible(x, lower, upper);
  let r = workArray(n);
  const jac = workArray(n * p);
  let nfev = 0;
  let njev = 0;
  let iterations = 0;
  const recorder = options.trace ? new TraceRecorder('reflective_trust_region') : null;
  let nonFinite: NonFiniteReport | null = null;
  /** The last non-finite trial of the run (kept after later acceptances, for a dead-region stop). */
  let lastNonFinite: NonFiniteReport | null = null;
  /** A trial step was evaluated (a non-finite stop is then not about the starting values). */
  let started = false;
  let qr: PivotedQR | null = null;
  let rt = workArray(n);
  const wa = workArray(n);

  const finish = (code: StopCode, message: string, jacobianCurrent: boolean): SolveOutcome => finishSolve(code, message, {
    problem, x, r, jac, jacobianCurrent, iterations, evaluations: nfev, jacobianEvaluations: njev, started,
    polish: options.polish !== false, strictInterior: true, workspace: qr !== null ? { qr, b: wa, rt } : undefined, recorder, nonFinite,
  });
  const invalid = validateSolveOptions(options);
  if (invalid !== null) return finish('failed', stopText.invalidOption(invalid), true);
  if (n === 0) return finish('failed', stopText.noRows, true);

  const combined = problem.residualsAndJacobian?.bind(problem);
  const evaluateAt = (at: Float64Array, out: Float64Array): boolean => {
    // `true`: the problem checked r and J for finiteness in its own passes (LeastSquaresProblem.residualsAndJacobian)
    let checked = false;
    if (combined) checked = combined(at, out, jac) === true;
    else {
      problem.residuals(at, out);
      if (allFinite(out)) problem.jacobian(at, jac);
    }
    nfev++;
    njev++;
    if (checked) return true;
    if (!allFinite(out)) {
      nonFinite = lastNonFinite = nonFiniteReport('residuals', out, n, 1, at);
      return false;
    }
    if (!allFinite(jac)) {
      nonFinite = lastNonFinite = nonFiniteReport('jacobian', jac, n, p, at);
      return false;
    }
    return true;
  };
  // r and J at the start (J(x) stays in `jac` whenever jacAtX)
  if (!evaluateAt(x, r)) return finish('non_finite', stopText.startNotFinite(nonFinite!.what), true);
  let jacAtX = true;
  if (p === 0) return finish('small_gradient', stopText.noFreeParameters, true);
  let fnorm = norm2(r);

  // Tall problems: R, P and Qᵀr in one pass over the rows (`streamed-qr.ts`, STREAMED_MIN_ROWS).
  const streamed = n >= STREAMED_MIN_ROWS ? new StreamedQR(p) : null;
  const qrf = streamed ? null : new PivotedQR(n, p);
  qr = qrf;
  /** The factorisation whose R and permutation the step uses (that of R itself when streamed). */
  const fac = streamed ? streamed.small : qrf!;
  const small = new PivotedQR(2 * p, p);
  const stack = workArray(2 * p * p);
  const stackRhs = new Float64Array(2 * p);
  const rj = workArray(p * p);
  const r2 = workArray(p * p);
  const qtf = new Float64Array(p);
  const qtb = new Float64Array(p);
  const g = new Float64Array(p);
  const v = new Float64Array(p);
  const toward = new Uint8Array(p);
  const c = new Float64Array(p);
  const sigma = new Float64Array(p);
  const dscale = new Float64Array(p);
  const xF = new Float64Array(p);
  const step = new Float64Array(p);
  const xt = new Float64Array(p);
  const lmpar = new LMParameter(p);
  const work = new StepWork(p);
  const model: StepModel = { p, r: rj, perm: fac.perm, g, c, d: dscale };
  const watch = new StagnationWatch(p, { ...LM_STAGNATION, costTolerance: Math.max(LM_STAGNATION.costTolerance, ftol) });
  let par = 0;
  let delta = 0;
  let first = true;
  let initialised = false;

  for (;;) {
    if (options.cancel?.cancelled) return finish('cancelled', stopText.cancelled(iterations), jacAtX);
    if (iterations >= maxIter) return finish('max_iterations', stopText.maxIterations(maxIter), jacAtX);
    if (!jacAtX) {
      problem.jacobian(x, jac);
      njev++;
      jacAtX = true;
    }
    for (let j = 0; j < p; j++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += jac[j * n + i] * r[i];
      g[j] = s;
    }
    colemanLiScaling(x, g, lower, upper, v, toward);
    if (streamed) streamed.factor(jac, r, n);
    else qrf!.factor(jac, n, p, { pivot: true });
    const norms = streamed ? streamed.norms : qrf!.norms;
    if (!initialised) {
      initialised = true;
      for (let j = 0; j < p; j++) sigma[j] = norms[j] === 0 ? 1 : norms[j];
    }
    for (let j = 0; j < p; j++) sigma[j] = Math.max(sigma[j], norms[j]);
    // scaled gradient measure γ (stop test and step-back factor)
    let gamma = 0;
    if (fnorm !== 0) {
      for (let j = 0; j < p; j++) {
        const cn = norms[j];
        if (cn === 0) continue;
        let gj = Math.abs(g[j]) / (cn * fnorm);
        if (toward[j]) gj *= Math.min(1, (cn * v[j]) / fnorm);
        gamma = Math.max(gamma, gj);
      }
    }
    if (gamma <= gtol) return finish('small_gradient', stopText.smallGradient(gamma, gtol), true);
    const stepBack = Math.max(STEP_BACK, 1 - gamma);

    let anyC = false;
    for (let j = 0; j < p; j++) {
      // (a distance below the smallest normal double is treated as that: D stays finite)
      const vj = Math.max(v[j], MIN_DISTANCE);
      c[j] = toward[j] ? Math.abs(g[j]) / vj : 0;
      if (!Number.isFinite(c[j])) c[j] = 0;
      if (c[j] > 0) anyC = true;
      dscale[j] = toward[j] ? sigma[j] / Math.sqrt(vj) : sigma[j];
    }
    if (streamed) qtf.set(streamed.qtr);
    else {
      wa.set(r);
      qrf!.applyQt(wa);
      qtf.fill(0);
      for (let k = 0; k < Math.min(n, p); k++) qtf[k] = wa[k];
    }
    copyR(fac, rj);
    let perm2 = fac.perm;
    if (anyC) {
      // [R·Pᵀ; diag(√c)] (2p×p, original column order), refactored; right-hand side [Qᵀr; 0]
      stack.fill(0);
      for (let k = 0; k < p; k++) {
        const col = fac.perm[k];
        for (let i = 0; i <= k; i++) stack[i + col * 2 * p] = rj[i + k * p];
      }
      for (let j = 0; j < p; j++) stack[p + j + j * 2 * p] = Math.sqrt(c[j]);
      small.factor(stack, 2 * p, p, { pivot: true });
      stackRhs.fill(0);
      stackRhs.set(qtf);
      small.applyQt(stackRhs);
      for (let k = 0; k < p; k++) qtb[k] = stackRhs[k];
      copyR(small, r2);
      perm2 = small.perm;
    } else {
      r2.set(rj);
      qtb.set(qtf);
    }
    let xnorm = 0;
    for (let j = 0; j < p; j++) xnorm += (dscale[j] * x[j]) ** 2;
    xnorm = Math.sqrt(xnorm);
    if (first && iterations === 0 && delta === 0) delta = STEP_FACTOR * xnorm || STEP_FACTOR;

    // Inner loop: trial steps until one is accepted.
    for (;;) {
      par = lmpar.compute(p, r2, perm2, dscale, qtb, delta, par, xF);
      for (let j = 0; j < p; j++) step[j] = -xF[j];
      const choice = selectStep(model, work, x, step, lower, upper, delta, stepBack);
      let guarded = false;
      for (let j = 0; j < p; j++) {
        xt[j] = x[j] + step[j];
        // rounding must not put the trial on (or past) a bound
        if ((lower && !(xt[j] > lower[j])) || (upper && !(xt[j] < upper[j]))) {
          const bound = lower && !(xt[j] > lower[j]) ? lower[j] : upper![j];
          xt[j] = bound + (1 - stepBack) * (x[j] - bound);
          // below the spacing of doubles at the bound that lands on it: the component stays
          if ((lower && !(xt[j] > lower[j])) || (upper && !(xt[j] < upper[j]))) xt[j] = x[j];
          step[j] = xt[j] - x[j];
          guarded = true;
        }
      }
      const value = guarded ? modelValue(model, step, work) : choice.value;
      let pn = 0;
      let cs = 0;
      for (let j = 0; j < p; j++) {
        pn += (dscale[j] * step[j]) ** 2;
        cs += c[j] * step[j] * step[j];
      }
      const pnorm = Math.sqrt(pn);
      if (first) delta = Math.min(delta, pnorm);

      const finite = evaluateAt(xt, rt);
      started = true;
      jacAtX = false;
      const fnorm1 = finite ? norm2(rt) : Infinity;
      const f2 = fnorm * fnorm;
      const actred = 0.1 * fnorm1 < fnorm ? 1 - (fnorm1 / fnorm) ** 2 : -1;
      // predicted reduction of the linear model (without the Coleman–Li term), relative as in lm.ts
      const prered = (-2 * value - cs) / f2;
      const model2 = -2 * value / f2;
      const ccorr = cs / f2;
      const ratio = model2 !== 0 ? (actred - ccorr) / model2 : 0;

      if (choice.kind === 'full') {
        if (ratio <= 0.25) {
          // Moré's interpolation factor needs the LM step's directional derivative: with ψ, dirder = gᵀs/‖r‖²
          let gs = 0;
          for (let j = 0; j < p; j++) gs += g[j] * step[j];
          const dirder = gs / f2;
          let t = actred >= 0 ? 0.5 : (0.5 * dirder) / (dirder + 0.5 * actred);
          if (0.1 * fnorm1 >= fnorm || !(t >= 0.1)) t = 0.1;
          delta = t * Math.min(delta, pnorm / 0.1);
          par /= t;
        } else if (par === 0 || ratio >= 0.75) {
          delta = pnorm / 0.5;
          par *= 0.5;
        }
      } else if (ratio <= 0.25) {
        const t = finite ? 0.5 : 0.1;
        delta = t * Math.min(delta, pnorm / 0.1);
        par /= t;
      } else if (ratio >= 0.75) delta = Math.max(delta, 2 * pnorm);
      const accepted = finite && ratio >= ACCEPT_RATIO;
      recorder?.add({
        iteration: iterations, cost: 0.5 * f2, trialCost: finiteOrNull(0.5 * fnorm1 * fnorm1), gradient: gamma, step: pnorm,
        radius: delta, ratio: finite ? ratio : null, accepted, kind: choice.kind, stepBack: choice.stepBack, bounds: choice.hits,
        active: activeList(toward),
      });
      if (accepted) {
        x.set(xt);
        const swap = r;
        r = rt;
        rt = swap;
        fnorm = fnorm1;
        iterations++;
        first = false;
        jacAtX = true;
        nonFinite = null;
        options.onIteration?.(iterations, 0.5 * fnorm * fnorm);
        const stalled = watch.record(0.5 * fnorm * fnorm, x);
        if (stalled) return finish('stagnated', stopText.stagnated(stalled, watch.settings.costTolerance, watch.settings.stepTolerance), true);
        xnorm = 0;
        for (let j = 0; j < p; j++) xnorm += (dscale[j] * x[j]) ** 2;
        xnorm = Math.sqrt(xnorm);
      }
      // (a step shortened at a bound is small because of the bound, not because the cost is flat: no reduction stop on it)
      const full = choice.kind === 'full';
      // a large gradient measure the model cannot reduce: not a minimum (stagnation.ts DEAD_GRADIENT)
      const dead = gamma > DEAD_GRADIENT && prered <= ftol;
      const deadStop = (): SolveOutcome => {
        if (lastNonFinite) {
          nonFinite = lastNonFinite;
          return finish('non_finite', stopText.noFiniteStep(lastNonFinite.what, delta), jacAtX);
        }
        return finish('stagnated', stopText.deadRegion(gamma, prered), jacAtX);
      };
      if (full && Math.abs(actred) <= ftol && prered <= ftol && 0.5 * ratio <= 1) {
        if (dead) return deadStop();
        return finish('small_reduction', stopText.smallReduction(Math.abs(actred), ftol, prered), jacAtX);
      }
      if (delta <= xtol * xnorm) {
        if (!accepted && nonFinite) return finish('non_finite', stopText.noFiniteStep(nonFinite.what, delta), jacAtX);
        if (dead) return deadStop();
        return finish('small_step', stopText.smallRadius(delta, xtol * xnorm), jacAtX);
      }
      if (nfev >= maxFev) return finish('max_evaluations', stopText.maxEvaluations(maxFev), jacAtX);
      if (full && Math.abs(actred) <= EPSILON && prered <= EPSILON && 0.5 * ratio <= 1) {
        return finish('small_reduction', stopText.smallReductionRounding(Math.abs(actred)), jacAtX);
      }
      if (delta <= EPSILON * xnorm) {
        if (!accepted && nonFinite) return finish('non_finite', stopText.noFiniteStep(nonFinite.what, delta), jacAtX);
        if (dead) return deadStop();
        return finish('small_step', stopText.smallRadiusRounding(delta, xnorm), jacAtX);
      }
      if (accepted) break;
    }
  }
}

function activeList(toward: Uint8Array): number[] {
  const out: number[] = [];
  for (let j = 0; j < toward.length; j++) if (toward[j]) out.push(j);
  return out;
}
