/**
 * Profile-likelihood intervals of a joint fit's parameters (engine/run/joint-profile.ts):
 * whether they are computed, and their rows in the groups' results and in the
 * joint estimates, with the `profile_differs` warning as for a single fit
 * (engine/run/profile-fit.ts).
 *
 * Policy (the `profile` option): `never` switches them off; `auto` (default)
 * computes them when the joint fit converged with degrees of freedom left and
 * n·P ≤ PROFILE_WORK_BOUND (n rows of all groups, P = pₛ + G·p_l free
 * parameters): the bound of single fits read with the joint P, since each of
 * the P profiles refits all groups (joint-profile.ts, cost); `always` computes
 * them whatever the size. The profiles of the shared parameters are computed
 * once and shown in every group (they are one number for all groups); each
 * group's own parameters get their own. A fit whose residuals are at rounding
 * level gets none (profile-fit.ts, same test).
 */
import type { FitPlan } from '../../parser/plan';
import type { CancelToken } from '../solve/problem';
import type { FitResult, FitWarning, JointEstimate, ProfileInterval, ProfileSummary } from '../result';
import { tCritical } from '../stats/distributions';
import { jointIntervalText, num, profileIntervalText, profileText, warningText } from '../messages';
import { PROFILE_ROUNDING, PROFILE_WORK_BOUND } from './profile-limits';
import { materiallyDifferent } from './profile-fit';
import type { JointSolved } from './joint';
import { heldEntry, jointStandardErrors, jointVector, profileJointQuantity, type JointProfileContext } from './joint-profile';

export interface JointProfiles {
  /** The kept groups' results (same order as `solved.setup.data`) with their profile rows and summary. */
  results: FitResult[];
  estimates: JointEstimate[];
  /** The context the derived quantities' profiles reuse, when profiles were computed. */
  context: JointProfileContext | null;
}

/** Block-solver options of the fit (its iteration limit and tolerance). */
export function jointSolveOptions(fit: FitPlan): JointProfileContext['options'] {
  const o = fit.options;
  return {
    ...(o.maxIterations !== undefined ? { maxIterations: o.maxIterations } : {}),
    ...(o.tolerance !== undefined ? { reductionTolerance: o.tolerance, stepTolerance: o.tolerance, gradientTolerance: o.tolerance } : {}),
  };
}

export function jointProfiles(fit: FitPlan, solved: JointSolved, results: FitResult[], estimates: JointEstimate[], s2: number, ok: boolean, cancel?: CancelToken): JointProfiles {
  const asked = fit.options.profile ?? 'auto';
  const setup = solved.setup;
  const ps = setup.sharedIdx.length;
  const pl = setup.localIdx.length;
  const G = setup.data.length;
  const P = ps + G * pl;
  const withSummary = (summary: ProfileSummary | null): JointProfiles => ({
    results: summary ? results.map((r) => ({ ...r, profile: summary })) : results,
    estimates,
    context: null,
  });
  const skipped = (note: string) => withSummary({ status: 'skipped', note, critical: null, refits: 0 });
  if (!ok) return withSummary(null);
  if (asked === 'never') return skipped(profileText.never);
  if (!(solved.dof > 0)) return skipped(profileText.noDof);
  if (solved.n * P > PROFILE_WORK_BOUND && asked !== 'always') return skipped(jointIntervalText.profileOverBound(solved.n * P, PROFILE_WORK_BOUND));
  const seX = jointStandardErrors(solved, s2);
  if (!seX.every((v) => v > 0 && Number.isFinite(v))) return skipped(profileText.rankDeficient);
  let ymax = 0;
  for (const d of setup.data) for (let i = 0; i < d.n; i++) ymax = Math.max(ymax, Math.abs(d.y[i]) * (d.weights ? Math.sqrt(d.weights[i]) : 1));
  if (Math.sqrt(solved.ssr / Math.max(1, solved.n)) <= PROFILE_ROUNDING * ymax) return skipped(profileText.exact);

  const critical = tCritical(fit.options.level, solved.dof);
  const sigmaAbsolute = setup.data[0]?.sigmaAbsolute ?? false;
  // a cancelled run stops each constrained fit (its end then reads `failed`, and the run reports the cancellation)
  const context: JointProfileContext = { scale: sigmaAbsolute ? 1 : Math.sqrt(s2), critical, options: { ...jointSolveOptions(fit), ...(cancel ? { cancel } : {}) } };
  const x = jointVector(solved);
  const t = critical;
  const intervalOf = (o: number): ProfileInterval | null => {
    const out = profileJointQuantity(solved, heldEntry(o), x[o], seX[o], seX, context);
    if (!out) return null;
    const wald = { lower: x[o] - t * seX[o], upper: x[o] + t * seX[o] };
    const { lower, upper, refits } = out.profile;
    const differs = materiallyDifferent(lower, wald.lower, wald) || materiallyDifferent(upper, wald.upper, wald);
    return { lower, upper, differs, refits };
  };
  const shared = Array.from({ length: ps }, (_, j) => intervalOf(j));
  let refits = shared.reduce((a, iv) => a + (iv?.refits ?? 0), 0);
  const own = Array.from({ length: G }, (_, g) => Array.from({ length: pl }, (_, m) => intervalOf(ps + g * pl + m)));
  for (const list of own) for (const iv of list) refits += iv?.refits ?? 0;
  const summary: ProfileSummary = { status: 'computed', note: jointIntervalText.profileComputed(fit.options.level, critical, solved.dof), critical, refits };
  const sharedNames = setup.sharedIdx.map((j) => setup.free[j]);
  const localNames = setup.localIdx.map((j) => setup.free[j]);
  const out = results.map((r, g) => {
    const warnings: FitWarning[] = [];
    const parameters = r.parameters.map((row) => {
      if (row.fixed) return row;
      const js = sharedNames.indexOf(row.name);
      const jl = localNames.indexOf(row.name);
      const iv = js >= 0 ? shared[js] : jl >= 0 ? own[g][jl] : null;
      if (!iv) return row;
      if (iv.differs) {
        warnings.push({
          code: 'profile_differs',
          message: warningText.profile_differs(row.name, profileIntervalText(iv.lower, iv.upper), `[${num(row.lower ?? NaN)}, ${num(row.upper ?? NaN)}]`),
          parameters: [row.name],
        });
      }
      return { ...row, profile: iv };
    });
    return { ...r, parameters, profile: summary, warnings: [...r.warnings, ...warnings] };
  });
  const withEstimates = estimates.map((e) => {
    const iv = shared[sharedNames.indexOf(e.name)];
    return iv ? { ...e, profile: iv } : e;
  });
  return { results: out, estimates: withEstimates, context };
}
