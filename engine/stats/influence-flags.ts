/**
 * Rows named by the influence and outlier rules, and the warnings of the
 * influence, lack-of-fit and curvature checks. Thresholds and their reasons:
 * engine/thresholds.ts (INFLUENCE_THRESHOLDS); texts: engine/messages.ts (warningText).
 *
 * Rules (n rows, k = rank of the Jacobian, ν = n − k):
 * - leverage one: 1 − hᵢ ≤ τ (engine/stats/influence.ts) → `exact_point`;
 * - high leverage: hᵢ > 2k/n (common practice), listed in `highLeverage`; a warning
 *   `high_leverage` only for those rows that also move the fit (Dᵢ > 4/n): the ends of
 *   a well-spread design always have high leverage, and a warning on every clean
 *   calibration would teach users to skip warnings (it fired on 5 of the 10 samples);
 * - influential: Dᵢ > 1 (common practice) → `influential_point`; Dᵢ > 4/n is listed in
 *   `notable` without a warning;
 * - outlier: Bonferroni-adjusted p = min(1, n·2·P(T > |tᵢ|)) < 0.05, T Student t with
 *   ν − 1 dof, tᵢ the studentized deleted residual (Weisberg 2005, Applied Linear
 *   Regression, §9.1.3; Cook & Weisberg 1982, §2.2.2) → `outlier`; equivalently
 *   |tᵢ| > t_{1 − 0.05/(2n), ν − 1} (`outlierCritical`);
 * - lack of fit: F test p < 0.05 (engine/stats/lack-of-fit.ts) → `lack_of_fit`;
 * - curvature: two-sided p < 0.01 (engine/stats/curvature.ts) → `curvature`.
 * When the residuals are at rounding level (an exact fit) only the leverage rules
 * apply: Cook's distances and residual tests would read noise of the arithmetic.
 * For a nonlinear model every figure is of its tangent-plane linearisation, and the
 * texts say so.
 */
import type { CurvatureTest, FitWarning, InfluenceReport, LackOfFitTest } from '../result';
import { warningText } from '../messages';
import type { Influence } from './influence';
import { INFLUENCE_THRESHOLDS as T } from '../thresholds';
import { tQuantile, tUpper } from './distributions';

/** Rows whose value a warning text can quote (engine/messages.ts shows at most 5). */
const QUOTED_ROWS = 10;

export interface FlagInput {
  inf: Influence;
  /** Data row (file line) of each point. */
  rows: ArrayLike<number>;
  /** Rank of the Jacobian (the trace of the hat matrix). */
  rank: number;
  linear: boolean;
  /** Residuals at rounding level: only the leverage rules apply. */
  exactFit: boolean;
}

export function influenceReport(input: FlagInput): InfluenceReport {
  const { inf, rows, rank: k } = input;
  const n = inf.leverage.length;
  const nu = n - k;
  const leverageCutoff = (T.leverageFactor * k) / n;
  const cooksNotice = T.cooksNoticeNumerator / n;
  const dofDeleted = nu - 1;
  const outlierCritical = dofDeleted >= 1 && n > 0 ? tQuantile(1 - T.outlierLevel / (2 * n), dofDeleted) : null;
  const critical = outlierCritical !== null && Number.isFinite(outlierCritical) ? outlierCritical : null;
  const exact = inf.exact.map((i) => rows[i]);
  const exactSet = new Set(inf.exact);
  const highLeverage: number[] = [];
  const influential: number[] = [];
  const notable: number[] = [];
  const outliers: InfluenceReport['outliers'] = [];
  for (let i = 0; i < n; i++) {
    if (exactSet.has(i)) continue;
    if (inf.leverage[i] > leverageCutoff) highLeverage.push(rows[i]);
    if (input.exactFit) continue;
    const d = inf.cooksDistance[i];
    if (d > T.cooksWarning) influential.push(rows[i]);
    if (d > cooksNotice) notable.push(rows[i]);
    const t = inf.deletedStudentized[i];
    // |t| ≤ the critical value means an adjusted p ≥ the level: the tail (a beta function) is evaluated only beyond it,
    // with a margin of 1e-9 relative so a p at the level is decided by the tail itself
    if (dofDeleted >= 1 && Number.isFinite(t) && !(Math.abs(t) <= (critical ?? Infinity) * (1 - 1e-9))) {
      const adjusted = Math.min(1, n * 2 * tUpper(Math.abs(t), dofDeleted));
      if (adjusted < T.outlierLevel) outliers.push({ row: rows[i], t, pValue: adjusted });
    }
  }
  return {
    linearised: !input.linear, leverageCutoff, cooksCutoff: T.cooksWarning, cooksNotice, outlierLevel: T.outlierLevel,
    outlierCritical: critical,
    exact, highLeverage, influential, notable, outliers,
  };
}

/** The warnings of the report and of the two residual tests, in the order exact, leverage, influence, outliers, lack of fit, curvature. */
export function influenceWarnings(report: InfluenceReport, inf: Influence, rows: ArrayLike<number>, lackOfFit: LackOfFitTest | undefined, curvature: CurvatureTest | null | undefined, dofDeleted: number): FitWarning[] {
  const out: FitWarning[] = [];
  // the index of each row a text quotes a value of (only the first few of each list: no map over every row)
  const quoted = new Set([...report.highLeverage, ...report.influential.slice(0, QUOTED_ROWS)]);
  const indexOf = new Map<number, number>();
  if (quoted.size) for (let i = 0; i < rows.length; i++) if (quoted.has(rows[i]) && !indexOf.has(rows[i])) indexOf.set(rows[i], i);
  const at = (row: number) => indexOf.get(row) ?? -1;
  const lin = report.linearised;
  if (report.exact.length) out.push({ code: 'exact_point', message: warningText.exact_point(report.exact), rows: report.exact });
  const notable = new Set(report.notable);
  const leaning = report.highLeverage.filter((r) => notable.has(r));
  if (leaning.length) {
    const values = leaning.slice(0, QUOTED_ROWS).map((r) => inf.leverage[at(r)]);
    out.push({ code: 'high_leverage', message: warningText.high_leverage(leaning, values, report.leverageCutoff, report.cooksNotice, lin), rows: leaning });
  }
  if (report.influential.length) {
    const values = report.influential.slice(0, QUOTED_ROWS).map((r) => inf.cooksDistance[at(r)]);
    out.push({ code: 'influential_point', message: warningText.influential_point(report.influential, values, report.cooksCutoff, lin), rows: report.influential });
  }
  if (report.outliers.length) {
    const rs = report.outliers.map((o) => o.row);
    out.push({ code: 'outlier', message: warningText.outlier(report.outliers, report.outlierLevel, rows.length, dofDeleted, lin), rows: rs });
  }
  if (lackOfFit && lackOfFit.pValue !== null && lackOfFit.f !== null && lackOfFit.pValue < T.lackOfFitLevel) {
    out.push({ code: 'lack_of_fit', message: warningText.lack_of_fit(lackOfFit.f, lackOfFit.dfLackOfFit, lackOfFit.dfPureError, lackOfFit.pValue, T.lackOfFitLevel) });
  }
  if (curvature && curvature.pValue < T.curvatureLevel) {
    out.push({ code: 'curvature', message: warningText.curvature(curvature.t, curvature.dof, curvature.pValue, T.curvatureLevel, lin) });
  }
  return out;
}
