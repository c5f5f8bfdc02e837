/**
 * Profile-likelihood interval of a derived quantity g(θ) of one fit
 * (Bates & Watts 1988, Nonlinear Regression Analysis and Its Applications,
 * §6.1; Venzon & Moolgavkar 1988, "A method for computing
 * profile-likelihood-based confidence intervals", Applied Statistics 37:87–94,
 * who profile a function of the parameters by constrained minimisation).
 * The profile sum of squares is
 *   S̃(v) = min S(θ) subject to g(θ) = v,
 * and the interval is { v : |τ(v)| ≤ t(n − p, 1 − α/2) } with
 * τ(v) = sign(v − ĝ)·√(S̃(v) − S(θ̂))/s, as for a parameter (engine/run/profile.ts,
 * whose end search it uses).
 *
 * The constraint is met exactly by elimination: the parameter θₖ with the
 * largest |∂g/∂θₖ·seₖ| at θ̂ (the one g depends on most, so ∂g/∂θₖ stays away
 * from 0 near θ̂) is solved from g(θ) = v for the other parameters φ by a
 * damped Newton iteration, and the reduced problem over φ has the residuals
 * r(φ, θₖ(φ)) and, by the implicit function theorem (∂θₖ/∂φᵢ = −gᵢ/gₖ), the
 * Jacobian columns Jᵢ − Jₖ·gᵢ/gₖ. For a quantity that is one parameter this
 * holds that parameter at v: the parameter's own profile.
 *
 * Newton stops when the step is at most NEWTON_XTOL·(|θₖ| + seₖ); a step that
 * does not reduce |g − v| is halved (up to 30 times); no convergence in
 * NEWTON_MAX steps, a zero or non-finite ∂g/∂θₖ, or a θₖ outside its bounds
 * make the residuals NaN there, which the solver rejects like any failed
 * evaluation, and the end says why.
 */
import type { FitPlan } from '../../parser/plan';
import type { FitResult } from '../result';
import type { LeastSquaresProblem } from '../solve';
import { tCritical } from '../stats/distributions';
import { derivedProfileText } from '../messages';
import type { DerivedFunction } from './derived';
import type { FitData } from './fit-data';
import { profileCurve, type ParameterProfile } from './profile';
import { refitModel, refitProblem } from './refit-problem';
import { defaultSolvers } from './solvers';

/** Newton's stopping tolerance on θₖ, relative to |θₖ| + seₖ (well below reported digits, above rounding of g). */
export const NEWTON_XTOL = 1e-13;
/** Newton steps at most per evaluation. */
export const NEWTON_MAX = 60;

export interface DerivedProfileInput {
  fit: FitPlan;
  data: FitData;
  result: FitResult;
  g: DerivedFunction;
  /** ĝ and its (delta-method) standard error. */
  value: number;
  stderr: number;
}

export interface DerivedProfileOutput {
  profile: ParameterProfile;
  /** The parameter eliminated. */
  eliminated: string;
  critical: number;
}

export function profileDerived(input: DerivedProfileInput): DerivedProfileOutput | null {
  const { fit, data, result, g } = input;
  const free = result.parameters.filter((q) => !q.fixed);
  const p = free.length;
  const theta = Float64Array.from(free, (q) => q.estimate);
  const se = free.map((q) => q.stderr ?? NaN);
  const m = refitModel(fit, data);
  const { problem, scale: c } = refitProblem(m, data);
  const g0 = g.at(theta);
  let k = -1;
  let best = 0;
  for (let j = 0; j < p; j++) {
    const w = Math.abs(g0.grad[j] * se[j]);
    if (Number.isFinite(w) && w > best) {
      best = w;
      k = j;
    }
  }
  if (k < 0) return null;
  const at = { v: input.value };
  let why: string | undefined;
  const lastK = { value: theta[k] };
  const th = new Float64Array(theta);
  const seK = Number.isFinite(se[k]) ? se[k] : Math.abs(theta[k]);
  const gradAt = new Float64Array(p);

  /** θ with φ inserted and θₖ solved from g = at.v; false when it cannot be solved. */
  const expand = (phi: Float64Array): boolean => {
    for (let j = 0, i = 0; j < p; j++) if (j !== k) th[j] = phi[i++];
    let x = lastK.value;
    th[k] = x;
    let cur = g.at(th);
    let f = cur.value - at.v;
    for (let it = 0; it < NEWTON_MAX; it++) {
      const d = cur.grad[k];
      if (!Number.isFinite(f) || !Number.isFinite(d) || d === 0) break;
      let step = f / d;
      let tries = 0;
      let nx = x - step;
      th[k] = nx;
      let nxt = g.at(th);
      while (!(Math.abs(nxt.value - at.v) <= Math.abs(f)) && tries++ < 30) {
        step /= 2;
        nx = x - step;
        th[k] = nx;
        nxt = g.at(th);
      }
      x = nx;
      cur = nxt;
      f = cur.value - at.v;
      if (Math.abs(step) <= NEWTON_XTOL * (Math.abs(x) + seK)) {
        if (x < m.lower[k] || x > m.upper[k]) {
          why = derivedProfileText.outsideBounds(free[k].name);
          return false;
        }
        if (!Number.isFinite(cur.value) || !cur.grad.every(Number.isFinite) || cur.grad[k] === 0) break;
        lastK.value = x;
        gradAt.set(cur.grad);
        return true;
      }
    }
    why = derivedProfileText.notSolvable(free[k].name);
    return false;
  };
  const jacFull = new Float64Array(problem.n * p);
  const reducedJac = (out: Float64Array) => {
    const n = problem.n;
    for (let j = 0, i = 0; j < p; j++) {
      if (j === k) continue;
      const ratio = gradAt[j] / gradAt[k];
      for (let r = 0; r < n; r++) out[i * n + r] = jacFull[j * n + r] - jacFull[k * n + r] * ratio;
      i++;
    }
  };
  const reduced: LeastSquaresProblem = {
    n: problem.n,
    p: p - 1,
    residuals: (phi, out) => {
      if (!expand(phi)) out.fill(NaN);
      else problem.residuals(th, out);
    },
    jacobian: (phi, out) => {
      if (!expand(phi)) {
        out.fill(NaN);
        return;
      }
      problem.jacobian(th, jacFull);
      reducedJac(out);
    },
  };
  const drop = (b: Float64Array) => Float64Array.from(Array.from(b).filter((_, j) => j !== k));
  if (m.lower.some((v) => v > -Infinity)) reduced.lower = drop(m.lower);
  if (m.upper.some((v) => v < Infinity)) reduced.upper = drop(m.upper);

  const r = new Float64Array(problem.n);
  problem.residuals(theta, r);
  let ss = 0;
  for (let i = 0; i < r.length; i++) ss += r[i] * r[i];
  const dof = result.goodness.dof;
  const critical = tCritical(result.level, dof);
  const scale = data.sigmaAbsolute ? 1 / c : Math.sqrt(ss / dof);
  const o = fit.options;
  const options = {
    ...(o.maxIterations !== undefined ? { maxIterations: o.maxIterations } : {}),
    ...(o.tolerance !== undefined ? { reductionTolerance: o.tolerance, stepTolerance: o.tolerance, gradientTolerance: o.tolerance } : {}),
  };
  const profile = profileCurve(
    {
      reduced,
      at,
      rest0: drop(theta),
      center: input.value,
      se: input.stderr,
      lower: -Infinity,
      upper: Infinity,
      why: () => {
        const w = why;
        why = undefined;
        return w;
      },
    },
    { scale, critical, solve: (pr, t, opts) => defaultSolvers.levenbergMarquardt(pr, t, opts), options },
    ss,
  );
  return { profile, eliminated: free[k].name, critical };
}
