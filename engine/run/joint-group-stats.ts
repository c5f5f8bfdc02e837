/**
 * The statistics of one group of a joint fit, made consistent with the joint
 * fit they come from. The joint fit estimates one residual variance from all
 * groups, s² = SSR/(n − P) with P = pₛ + G·p_l, and every standard error,
 * interval and band of a group uses it with n − P degrees of freedom. A
 * group's rows do not have pₛ + p_l parameters of their own: the shared ones
 * are spread over all groups. Their share is the trace of the joint hat
 * matrix over the group's rows, p_g = Σ_{i∈g} hᵢ (engine/run/joint-leverage.ts;
 * Σ_g p_g = P, and E[SSR_g] = σ²(n_g − p_g) for a model linear in its
 * parameters, Seber & Lee 2003, *Linear Regression Analysis*, §3.3: E[eᵀAe] =
 * σ² tr(A(I − H)) with A selecting the group's rows).
 *
 * So a group's result reports (LANGUAGE.md, *Shared parameters*):
 * - n, SSR and R² of its own rows (descriptive), p = pₛ + p_l (the parameters
 *   of its curve), and dof and RMSE of the joint fit (n − P and the pooled s,
 *   the numbers behind its intervals);
 * - `jointShare`: p_g, n_g − p_g and √(SSR_g/(n_g − p_g)), the group's own
 *   residual standard deviation, to compare with the pooled s (one group much
 *   noisier than the others breaks the equal-variance assumption of pooling);
 * - adjusted R² and, with absolute σ, the reduced χ² on n_g − p_g;
 * - no log-likelihood, AIC, AICc or BIC (NaN): a group's rows with shared
 *   parameters are not a model of their own, so information criteria belong
 *   to the joint fit;
 * - leverages of the joint fit, studentized and deleted studentized residuals
 *   with the pooled s and n − P degrees of freedom, Cook's distance with P
 *   (Cook & Weisberg 1982, §3.3–3.4, applied to the joint problem's rows);
 * - no lack-of-fit test of its own (its numerator would need the
 *   non-integer m_g − p_g degrees of freedom): the joint fit carries the pooled
 *   test over all groups (`jointLackOfFit`, exact degrees of freedom Σm_g − P
 *   and n − Σm_g), and no curvature test (it regresses on the group's own
 *   Jacobian, to which the group's residuals are not orthogonal when
 *   parameters are shared).
 */
import type { FitResult, FitWarning, LackOfFitTest } from '../result';
import { INFLUENCE_THRESHOLDS as T } from '../thresholds';
import { influence } from '../stats/influence';
import { lackOfFit } from '../stats/lack-of-fit';
import { jointIntervalText, warningText } from '../messages';
import type { JointSolved } from './joint';

export function jointGroupStatistics(solved: JointSolved, k: number, r: FitResult, leverage: Float64Array, s2: number, ok: boolean, pooledLackOfFit: LackOfFitTest | null): FitResult {
  if (!ok) return r;
  // the group's own lack-of-fit and curvature warnings go with its own tests (module comment); the pooled test's, when it fails, stands in every group
  const warnings: FitWarning[] = r.warnings.filter((w) => w.code !== 'lack_of_fit' && w.code !== 'curvature');
  const lf = pooledLackOfFit;
  if (lf && lf.f !== null && lf.pValue !== null && lf.pValue < T.lackOfFitLevel) {
    warnings.push({ code: 'lack_of_fit', message: jointIntervalText.lackOfFitPooledWarning(warningText.lack_of_fit(lf.f, lf.dfLackOfFit, lf.dfPureError, lf.pValue, T.lackOfFitLevel)) });
  }
  const P = solved.n - solved.dof;
  const n = r.goodness.n;
  let share = 0;
  for (const h of leverage) share += h;
  const ownDof = n - share;
  const ssr = r.goodness.ssr;
  const sigmaAbsolute = solved.setup.data[0]?.sigmaAbsolute ?? false;
  const adjR2 = ownDof > 0 && n > 1 ? 1 - ((1 - r.goodness.r2) * (n - 1)) / ownDof : NaN;
  const pooled = Math.sqrt(solved.ssr / solved.dof);
  const data = solved.setup.data[k];
  // weighted residuals of the group's rows, in the scale of the joint problem
  const e = Float64Array.from(r.points.residual, (v, i) => v * (data.weights ? Math.sqrt(data.weights[i]) : 1));
  const inf = influence(e, leverage, pooled, P, solved.dof);
  const lof = r.residuals.lackOfFit;
  const pooledNote: LackOfFitTest | undefined = lof ? { ...lof, ssLackOfFit: null, ssPureError: null, f: null, pValue: null, note: jointIntervalText.lackOfFitPooled } : undefined;
  const { curvature: _c, ...residuals } = r.residuals;
  void _c;
  return {
    ...r,
    goodness: {
      ...r.goodness,
      dof: solved.dof,
      rmse: sigmaAbsolute ? Math.sqrt(s2) : pooled,
      adjR2,
      chi2Reduced: sigmaAbsolute && ownDof > 0 ? ssr / ownDof : r.goodness.chi2Reduced === null ? null : NaN,
      logLikelihood: NaN,
      aic: NaN,
      aicc: NaN,
      bic: NaN,
    },
    warnings,
    jointShare: { parameters: share, dof: ownDof, rmse: ownDof > 0 ? Math.sqrt(ssr / ownDof) : NaN, pooledRmse: pooled, pooledDof: solved.dof },
    residuals: { ...residuals, ...(pooledNote ? { lackOfFit: pooledNote } : {}) },
    points: {
      ...r.points,
      leverage: Array.from(leverage),
      standardized: Array.from(inf.standardized),
      studentized: Array.from(inf.studentized),
      cooksDistance: Array.from(inf.cooksDistance),
      ...(r.points.deletedStudentized ? { deletedStudentized: Array.from(inf.deletedStudentized) } : {}),
    },
  };
}

/** The lack-of-fit test pooled over the groups of a joint fit: settings distinct within each group, rank P. */
export function jointLackOfFit(solved: JointSolved, residuals: readonly Float64Array[]): LackOfFitTest {
  const { setup } = solved;
  const cols = setup.data[0].columns.length;
  const n = solved.n;
  const columns = Array.from({ length: cols + 1 }, () => new Float64Array(n));
  const r = new Float64Array(n);
  const weighted = setup.data.some((d) => d.weights);
  const w = weighted ? new Float64Array(n) : null;
  let off = 0;
  setup.data.forEach((d, g) => {
    for (let i = 0; i < d.n; i++) {
      for (let c = 0; c < cols; c++) columns[c][off + i] = d.columns[c][i];
      columns[cols][off + i] = g;
      r[off + i] = residuals[g][i];
      if (w) w[off + i] = d.weights ? d.weights[i] : 1;
    }
    off += d.n;
  });
  return lackOfFit(columns, r, w, n - solved.dof);
}
