/**
 * Profile-likelihood intervals of the free parameters of a least-squares fit
 * (Bates & Watts 1988, Nonlinear Regression Analysis and Its Applications,
 * §6.1.1–6.1.2). For parameter θⱼ the profile sum of squares is
 *   S̃(v) = min over θ₋ⱼ of S(θ) with θⱼ = v,
 * the profile t statistic
 *   τ(v) = sign(v − θ̂ⱼ)·√(S̃(v) − S(θ̂)) / s,   s² = S(θ̂)/(n − p)
 * (s = 1 when σ is absolute, the same scale as the Wald interval), and the
 * interval at level 1 − α is { v : |τ(v)| ≤ t(n − p, 1 − α/2) }. For a model
 * linear in its parameters τ is linear in v and the interval is the Wald one.
 *
 * Each end is found by stepping out from θ̂ⱼ (first step: the Wald
 * half-width; then a secant step on τ, clamped to ½–4 times the last step)
 * until |τ| passes the t level, then by Brent's method on the bracket
 * (engine/stats/root.ts; Brent 1973, ch. 4). Each S̃(v) is a reduced fit by the
 * project's solver (`solve`, Levenberg–Marquardt or, with bounds, the interior
 * reflective trust region) with θⱼ held at v, started from the reduced fit of
 * the nearest profile point evaluated so far (warm start). An end that meets
 * the parameter's bound before the t level is open at the bound; one that
 * stays below the t level out to PROFILE_REACH half-widths is open (not
 * reached); one whose reduced fit fails says where. Limits and tolerances:
 * profile-limits.ts.
 */
import type { LeastSquaresProblem, SolveOptions, SolveOutcome } from '../solve';
import { brentRoot } from '../stats/root';
import { PROFILE_LOWER_SSR, PROFILE_MAX_STEPS, PROFILE_REACH, PROFILE_XTOL } from './profile-limits';

export type ProfileSolve = (problem: LeastSquaresProblem, theta0: Float64Array, options: SolveOptions) => SolveOutcome;

export interface ProfileInput {
  /** The fit's problem (as solved: weighted, possibly response-scaled residuals). */
  problem: LeastSquaresProblem;
  /** The estimate θ̂ (free parameters). */
  theta: Float64Array;
  /** Standard errors of θ̂ (parameter units), for step sizes and tolerances. */
  se: ArrayLike<number>;
  /** s in the problem's residual units (√(S(θ̂)/dof), or the unit of σ when σ is absolute). */
  scale: number;
  /** The t level t(n − p, 1 − α/2). */
  critical: number;
  lower: Float64Array;
  upper: Float64Array;
  solve: ProfileSolve;
  options: SolveOptions;
  /** Which parameters to profile (default: all). */
  only?: readonly number[];
}

/** One end of a profile interval: `reached` (a number), open at the parameter's `bound`, `not_reached` within the search, or `failed`. */
export type ProfileEndKind = 'reached' | 'bound' | 'not_reached' | 'failed';

export interface ProfileEnd {
  kind: ProfileEndKind;
  /** The end (kind `reached`); the bound (kind `bound`); the farthest value searched (`not_reached`); where a reduced fit failed (`failed`, null when it failed at once). */
  value: number | null;
  /** Why a failed end failed (the reduced fit's stop, or a lower minimum found). */
  reason?: string;
}

export interface ParameterProfile {
  lower: ProfileEnd;
  upper: ProfileEnd;
  /** Reduced fits solved for this parameter (with one free parameter: evaluations of S). */
  refits: number;
}

interface Point {
  v: number;
  tau: number;
  /** The other parameters at the reduced optimum. */
  rest: Float64Array;
}

/** The problem with parameter j held at a value `at.v` (p − 1 free parameters). */
function reducedProblem(full: LeastSquaresProblem, j: number, theta: Float64Array, at: { v: number }): LeastSquaresProblem {
  const { n, p } = full;
  const q = p - 1;
  const th = new Float64Array(theta);
  const jacFull = new Float64Array(n * p);
  const expand = (phi: Float64Array) => {
    for (let k = 0, m = 0; k < p; k++) th[k] = k === j ? at.v : phi[m++];
    return th;
  };
  const copyColumns = (out: Float64Array) => {
    for (let k = 0, m = 0; k < p; k++) {
      if (k === j) continue;
      out.set(jacFull.subarray(k * n, (k + 1) * n), m * n);
      m++;
    }
  };
  const drop = (b: Float64Array | undefined) => (b ? Float64Array.from(Array.from(b).filter((_, k) => k !== j)) : undefined);
  const reduced: LeastSquaresProblem = {
    n,
    p: q,
    residuals: (phi, out) => full.residuals(expand(phi), out),
    jacobian: (phi, out) => {
      full.jacobian(expand(phi), jacFull);
      copyColumns(out);
    },
    residualsAndJacobian: (phi, out, jac) => {
      const t = expand(phi);
      if (full.residualsAndJacobian) full.residualsAndJacobian(t, out, jacFull);
      else {
        full.residuals(t, out);
        full.jacobian(t, jacFull);
      }
      copyColumns(jac);
    },
  };
  const lo = drop(full.lower);
  const hi = drop(full.upper);
  if (lo) reduced.lower = lo;
  if (hi) reduced.upper = hi;
  return reduced;
}

function sumSquares(r: Float64Array): number {
  let s = 0;
  for (let i = 0; i < r.length; i++) s += r[i] * r[i];
  return s;
}

/** Profiles of the free parameters (one entry per parameter; null for those not in `only`). */
export function profileIntervals(input: ProfileInput): (ParameterProfile | null)[] {
  const { problem, theta } = input;
  const r = new Float64Array(problem.n);
  problem.residuals(theta, r);
  const sHat = sumSquares(r);
  const wanted = new Set(input.only ?? Array.from({ length: problem.p }, (_, j) => j));
  return Array.from({ length: problem.p }, (_, j) => (wanted.has(j) ? profileOne(input, j, sHat) : null));
}

function profileOne(input: ProfileInput, j: number, sHat: number): ParameterProfile {
  const { problem, theta } = input;
  const at = { v: theta[j] };
  const reduced = reducedProblem(problem, j, theta, at);
  const rest0 = Float64Array.from(Array.from(theta).filter((_, k) => k !== j));
  return profileCurve({ reduced, at, rest0, center: theta[j], se: input.se[j], lower: input.lower[j], upper: input.upper[j] }, input, sHat);
}

/**
 * A profile over the value v of one quantity: `reduced` is the problem of the
 * other p − 1 free numbers with the quantity held at `at.v` (set before each
 * evaluation), `rest0` their values at the estimate, `center` the estimate of
 * the quantity, `se` its standard error, `lower`/`upper` its bounds. A
 * parameter's profile (above) holds the parameter; a derived quantity's
 * (engine/run/derived-profile.ts) eliminates one parameter through it.
 */
export interface ProfileCurve {
  reduced: LeastSquaresProblem;
  at: { v: number };
  rest0: Float64Array;
  center: number;
  se: number;
  lower: number;
  upper: number;
  /** Why the last reduced fit failed, when the curve knows better than the solver's stop (e.g. the eliminated parameter could not be solved). */
  why?: () => string | undefined;
}

/** Both ends of the profile interval of a quantity (the search of the module comment), with `sHat` = S(θ̂). */
export function profileCurve(curve: ProfileCurve, input: Pick<ProfileInput, 'scale' | 'critical' | 'solve' | 'options'>, sHat: number): ParameterProfile {
  const { reduced, at, rest0 } = curve;
  const theta = [curve.center];
  const j = 0;
  const buf = new Float64Array(reduced.n);
  let refits = 0;
  const points: Point[] = [{ v: curve.center, tau: 0, rest: rest0 }];

  /** τ at v, or a failure reason. Warm start: the evaluated point nearest to v. */
  const tauAt = (v: number): Point | { failed: string } => {
    at.v = v;
    let near = points[0];
    for (const pt of points) if (Math.abs(pt.v - v) < Math.abs(near.v - v)) near = pt;
    let s: number;
    let rest: Float64Array;
    refits++;
    if (reduced.p === 0) {
      // one free parameter: nothing left to fit, S̃(v) = S(v)
      reduced.residuals(rest0, buf);
      s = sumSquares(buf);
      rest = rest0;
    } else {
      const out = input.solve(reduced, new Float64Array(near.rest), input.options);
      if (!out.stop.converged) return { failed: curve.why?.() ?? out.stop.message };
      s = sumSquares(out.residuals);
      rest = out.theta;
    }
    if (!Number.isFinite(s)) return { failed: 'the sum of squares is not finite there' };
    const excess = s - sHat;
    if (excess < -PROFILE_LOWER_SSR * sHat) return { failed: `a lower sum of squares than the fit's was found there (${s} < ${sHat}): the fit is not at the minimum` };
    const tau = Math.sign(v - theta[j]) * Math.sqrt(Math.max(0, excess)) / input.scale;
    const pt = { v, tau, rest: new Float64Array(rest) };
    points.push(pt);
    return pt;
  };

  const end = (dir: 1 | -1): ProfileEnd => {
    const se = curve.se;
    const c = input.critical;
    if (!(se > 0) || !Number.isFinite(se) || !(c > 0)) return { kind: 'failed', value: null, reason: 'no standard error to step by' };
    const bound = dir > 0 ? curve.upper : curve.lower;
    const h0 = c * se;
    let prev: Point = points[0];
    let step = h0;
    for (let k = 0; k < PROFILE_MAX_STEPS; k++) {
      if (prev.v === bound) return { kind: 'bound', value: bound };
      if (Math.abs(prev.v - theta[j]) >= PROFILE_REACH * h0) return { kind: 'not_reached', value: prev.v };
      let v = prev.v + dir * step;
      if (dir > 0 ? v > bound : v < bound) v = bound;
      const got = tauAt(v);
      if ('failed' in got) return { kind: 'failed', value: k === 0 ? null : prev.v, reason: got.failed };
      if (Math.abs(got.tau) >= c) {
        const lo = Math.min(prev.v, got.v);
        const hi = Math.max(prev.v, got.v);
        let failure: string | null = null;
        const root = brentRoot((x) => {
          if (x === prev.v) return Math.abs(prev.tau) - c;
          if (x === got.v) return Math.abs(got.tau) - c;
          const t = tauAt(x);
          if ('failed' in t) {
            failure = t.failed;
            return NaN;
          }
          return Math.abs(t.tau) - c;
        }, lo, hi, PROFILE_XTOL * se);
        if (root === null) return { kind: 'failed', value: prev.v, reason: failure ?? 'no sign change of the profile t statistic' };
        return { kind: 'reached', value: root };
      }
      const last = Math.abs(got.v - prev.v);
      const rise = Math.abs(got.tau) - Math.abs(prev.tau);
      // secant step to the t level, overshooting by half so the next point likely brackets it
      step = rise > 0 ? Math.min(4 * last, Math.max(0.5 * last, (1.5 * (c - Math.abs(got.tau)) * last) / rise)) : 4 * last;
      prev = got;
    }
    return { kind: 'not_reached', value: prev.v };
  };

  const lower = end(-1);
  const upper = end(1);
  return { lower, upper, refits };
}
