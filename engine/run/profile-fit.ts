/**
 * Profile-likelihood intervals for one solved fit: whether they are computed
 * (the `profile` option, plan.ts FitOptions), the reduced fits
 * (engine/run/profile.ts), the rows of the result and the `profile_differs`
 * warning.
 *
 * Default (`profile auto`): computed for a converged single fit (not a group
 * of a per-group fit) with the squared loss, a model nonlinear in its
 * parameters and n·p ≤ PROFILE_WORK_BOUND; a model linear in its parameters
 * gets status `linear` (its profile interval is the Wald interval, exact
 * theory), nothing is computed. `profile always` computes for every converged
 * squared-loss fit, groups, large fits and linear models included (for a
 * linear model this shows the two agree); `profile never` switches it off.
 */
import type { FitPlan } from '../../parser/plan';
import type { FitResult, FitWarning, ParameterResult, ProfileEnd, ProfileSummary } from '../result';
import type { LeastSquaresProblem, SolveOptions, SolveOutcome } from '../solve';
import { tCritical } from '../stats/distributions';
import { profileIntervals, type ProfileSolve } from './profile';
import { PROFILE_ROUNDING, PROFILE_WORK_BOUND } from './profile-limits';
import { PROFILE_MATERIAL } from '../thresholds';
import { profileIntervalText, profileText } from '../messages';
import { num, warningText } from '../messages';

export interface ProfileFitInput {
  fit: FitPlan;
  /** The group, for a group of a per-group fit. */
  group?: string;
  problem: LeastSquaresProblem;
  outcome: SolveOutcome;
  /** The model is linear in its free parameters. */
  linear: boolean;
  lower: Float64Array;
  upper: Float64Array;
  /** Response scale c of the problem (engine/linalg/scale.ts). */
  responseScale: number;
  sigmaAbsolute: boolean;
  /** The response and the weights wᵢ (data units; null: unweighted), for the exact-fit test. */
  response: Float64Array;
  weights: Float64Array | null;
  /** Parameter rows and degrees of freedom of the fit (engine/run/fit-stats.ts). */
  parameters: ParameterResult[];
  dof: number;
  solve: ProfileSolve;
  options: SolveOptions;
}

export interface ProfileFitOutput {
  summary?: ProfileSummary;
  parameters: ParameterResult[];
  warnings: FitWarning[];
}

export function profileForFit(input: ProfileFitInput): ProfileFitOutput {
  const { fit, outcome, parameters } = input;
  const asked = fit.options.profile ?? 'auto';
  const none = (summary?: ProfileSummary): ProfileFitOutput => ({ ...(summary ? { summary } : {}), parameters, warnings: [] });
  const skipped = (note: string) => none({ status: 'skipped', note, critical: null, refits: 0 });
  if (!outcome.stop.converged) return none();
  if (asked === 'never') return skipped(profileText.never);
  if (input.linear && asked !== 'always') return none({ status: 'linear', note: profileText.linear, critical: null, refits: 0 });
  if (fit.options.loss !== 'squared') return skipped(profileText.robust);
  if (!(input.dof > 0)) return skipped(profileText.noDof);
  if (input.group !== undefined && asked !== 'always') return skipped(profileText.group);
  const { n, p } = input.problem;
  if (n * p > PROFILE_WORK_BOUND && asked !== 'always') return skipped(profileText.overBound(n * p, PROFILE_WORK_BOUND));
  const freeRows = parameters.filter((q) => !q.fixed);
  const se = freeRows.map((q) => q.stderr ?? NaN);
  if (se.some((v) => !(v > 0 && Number.isFinite(v)))) return skipped(profileText.rankDeficient);

  const critical = tCritical(fit.options.level, input.dof);
  let ss = 0;
  for (let i = 0; i < n; i++) ss += outcome.residuals[i] * outcome.residuals[i];
  if (atRoundingLevel(ss, input)) return skipped(profileText.exact);
  // s in the problem's residual units: residuals of the scaled problem are those of the data divided by c
  const scale = input.sigmaAbsolute ? 1 / input.responseScale : Math.sqrt(ss / input.dof);
  const profiles = profileIntervals({
    problem: input.problem,
    theta: outcome.theta,
    se,
    scale,
    critical,
    lower: input.lower,
    upper: input.upper,
    solve: input.solve,
    options: input.options,
  });

  const warnings: FitWarning[] = [];
  let refits = 0;
  let j = 0;
  const rows = parameters.map((row) => {
    if (row.fixed) return row;
    const pr = profiles[j++];
    if (!pr) return row;
    refits += pr.refits;
    const wald = { lower: row.lower ?? NaN, upper: row.upper ?? NaN };
    const differs = materiallyDifferent(pr.lower, wald.lower, wald) || materiallyDifferent(pr.upper, wald.upper, wald);
    if (differs) {
      warnings.push({
        code: 'profile_differs',
        message: warningText.profile_differs(row.name, profileIntervalText(pr.lower, pr.upper), `[${num(wald.lower)}, ${num(wald.upper)}]`),
        parameters: [row.name],
      });
    }
    return { ...row, profile: { lower: pr.lower, upper: pr.upper, differs, refits: pr.refits } };
  });
  return { summary: { status: 'computed', note: profileText.computed(fit.options.level, critical), critical, refits }, parameters: rows, warnings };
}

/**
 * An exact fit: √(S/n) ≤ PROFILE_ROUNDING·max|√wᵢ·yᵢ| (S of the scaled problem, times c²). Its sum of squares is
 * rounding noise, so the reduced fits have nothing to measure (NIST StRD Lanczos1: they stop without progress).
 */
function atRoundingLevel(ssScaled: number, input: ProfileFitInput): boolean {
  const { response: y, weights: w } = input;
  let ymax = 0;
  for (let i = 0; i < y.length; i++) ymax = Math.max(ymax, Math.abs(y[i]) * (w ? Math.sqrt(w[i]) : 1));
  return Math.sqrt(ssScaled / Math.max(1, y.length)) * input.responseScale <= PROFILE_ROUNDING * ymax;
}

/**
 * An end differs materially from the Wald end when it is open while the Wald end is a number, or
 * further from it than PROFILE_MATERIAL Wald half-widths (engine/thresholds.ts). A failed end
 * is not compared (the row says it was not found).
 */
export function materiallyDifferent(end: ProfileEnd, waldEnd: number, wald: { lower: number; upper: number }): boolean {
  const half = (wald.upper - wald.lower) / 2;
  if (!Number.isFinite(waldEnd) || !(half > 0)) return false;
  if (end.kind === 'failed' || end.value === null) return false;
  if (end.kind === 'not_reached') return true;
  return Math.abs(end.value - waldEnd) > PROFILE_MATERIAL * half;
}

/** The profile fields of a fit result (additive). */
export type ProfileFields = Pick<FitResult, 'profile'>;
