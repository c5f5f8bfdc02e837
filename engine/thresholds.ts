/**
 * The thresholds behind what a user is told about a fit: warnings
 * (engine/stats/warnings.ts), notes beside numbers in the views
 * (engine/front/views/summary.ts), the results panel
 * (extension/logic/panel-model.ts) and the flags of per-group fits
 * (engine/groups/flags.ts). One copy, so the CLI, the report, the panel and
 * the editor's diagnostics never disagree about when a number is "large".
 *
 * Each value states its inequality, its reason and its source: a citation,
 * "common practice" for a rule of thumb of the trade, or the arithmetic that
 * fixes it. A shared leaf: imports nothing.
 *
 * Not here: numerical tolerances of the solvers (engine/solve, each documented
 * where it is used), limits of the parser (parser/limits.ts), the display floor
 * of p-values (engine/format.ts), and the automatic worker-thread rule of
 * per-group fits (engine/groups/threads.ts), which is about speed, not about a
 * fit's quality.
 */
export const THRESHOLDS = {
  /**
   * A pair of free parameters is strongly correlated when |ρⱼₖ| > 0.99
   * (warning `high_correlation`, the panel's correlation list). Reason: the
   * variance of one parameter is then inflated by 1/(1 − ρ²) > 50 over what it
   * would be with the other held fixed (its standard error by more than 7×),
   * i.e. the data hardly separate the two. Common practice (a rule of thumb;
   * levels between 0.95 and 0.99 are in use; the higher one keeps the warning
   * for pairs that really are nearly redundant, as happens in any polynomial).
   */
  correlation: 0.99,
  /**
   * A fit is ill-conditioned when the 2-norm condition number κ of the
   * column-scaled Jacobian exceeds 1e8 (warning `ill_conditioned`, the note
   * beside the condition number). Reason: the forward error of a
   * least-squares solution is bounded by about ε·(2κ + κ²·tan θ), θ the angle
   * between the response and the model's column space (Golub & Van Loan,
   * "Matrix Computations", 4th ed., §5.3.7 — from memory). With ε = 2⁻⁵² ≈ 2.2e-16,
   * κ = 1e8 makes the κ² term reach order 1 for any fit with residuals that
   * are not tiny: estimates and standard errors may then carry no reliable
   * digit, while below it the covariance keeps at least ~8 of 16 digits (κ·ε).
   */
  condition: 1e8,
  /**
   * Fewer than 3 degrees of freedom (ν = n − p < 3) make intervals wide and
   * tests weak (warning `few_dof`, group flag `few_dof`). Reason: the two-sided
   * 95 % Student-t quantile is 4.30 at ν = 2 and 12.7 at ν = 1, against 1.96
   * for large ν (any t table). Common practice.
   */
  minDof: 3,
  /**
   * A residual test (runs test, Shapiro–Wilk) flags a pattern or
   * non-normality when its p < 0.01 (warnings `residual_pattern`,
   * `non_normal_residuals`). Reason: the tests run on every fit unasked, so a
   * level stricter than the usual 0.05 keeps false alarms to 1 fit in 100 when
   * the model is right. Common practice.
   */
  residualP: 0.01,
  /**
   * Durbin–Watson d shows serial correlation of the residuals (in row order)
   * when |d − 2| > 1, i.e. d < 1 or d > 3 (warning `residual_pattern`, the
   * note beside d). Reason: d ≈ 2(1 − r₁), r₁ the lag-1 autocorrelation, so
   * the band is |r₁| < 0.5. Common practice (a rule of thumb; the exact
   * bounds of Durbin & Watson 1951 depend on n and p).
   */
  durbinWatsonDistance: 1,
  /**
   * An estimate θ is at a bound b when |θ − b| ≤ 1e-8·max(1, |b|) (warning
   * `at_bound`, group flag `at_bound`). Reason: it lies well above the
   * solvers' default relative step tolerance 1e-10 (engine/solve/types.ts
   * `DEFAULT_TOLERANCE`), so an estimate the solver pressed against the bound
   * counts as on it, and far below the digits a view prints for an estimate.
   */
  boundRelative: 1e-8,
  /**
   * A parameter is noted as poorly determined when its relative standard
   * error SE/|θ| > 0.5 (the note of the parameter table). Reason: |t| = |θ|/SE
   * < 2 then, about the 95 % critical value, so the data do not tell the
   * parameter from 0. Common practice.
   */
  relativeStderr: 0.5,
  /**
   * Group flag `poor_fit` for a model linear in its parameters, without
   * absolute σ: R² < 0.9. A rough screen, most useful when the groups share
   * one model shape. Common practice. Not used for models nonlinear in their
   * parameters, where R² is not a measure of fit (warning `r2_nonlinear`);
   * those are flagged by the runs test instead (`groupFamilyAlpha`).
   */
  groupMinR2: 0.9,
  /**
   * Group flag `poor_fit` for a model nonlinear in its parameters, without
   * absolute σ: the runs tests of the fit's groups are decided as one family
   * by Holm's step-down procedure at family-wise level 0.05 (Holm 1979,
   * Scand. J. Statist. 6, 65–70), so that chance alone flags a group of a
   * right model in at most 1 run in 20, however many groups there are. 0.05:
   * common practice for a family-wise level.
   */
  groupFamilyAlpha: 0.05,
  /**
   * Group flag `poor_fit` with absolute σ: the χ² statistic is implausible for
   * its degrees of freedom, P(χ²_ν ≥ χ²) < 0.001 or P(χ²_ν ≤ χ²) < 0.001 (each
   * tail). Common practice for a goodness-of-fit test; see e.g. Bevington &
   * Robinson, "Data Reduction and Error Analysis", 3rd ed., §11.1.
   */
  groupChi2Tail: 0.001,
} as const;

export type ThresholdName = keyof typeof THRESHOLDS;

/** |ρ| beyond `THRESHOLDS.correlation`: the one test of the warning and the panel's list. */
export function isHighCorrelation(rho: number): boolean {
  return Number.isFinite(rho) && Math.abs(rho) > THRESHOLDS.correlation;
}

/** κ beyond `THRESHOLDS.condition` (an infinite κ counts: the rank-deficient case). */
export function isLargeCondition(condition: number): boolean {
  return !Number.isNaN(condition) && condition > THRESHOLDS.condition;
}

/** Durbin–Watson d outside 2 ± `THRESHOLDS.durbinWatsonDistance`. */
export function isSerialDurbinWatson(d: number): boolean {
  return Number.isFinite(d) && Math.abs(d - 2) > THRESHOLDS.durbinWatsonDistance;
}

/** The symbol views use for a correlation coefficient between parameters (CLI, report, panel, warnings). */
export const CORRELATION_SYMBOL = 'ρ';

/**
 * Thresholds of the influence, outlier, lack-of-fit, curvature and serial
 * checks (engine/stats/influence.ts, influence-flags.ts, lack-of-fit.ts,
 * curvature.ts), each with the reason for its value. Kept together here
 * until they join the project's one thresholds module.
 */
export const INFLUENCE_THRESHOLDS = {
  /**
   * Leverage hᵢ > leverageFactor·p/n flags a row of high leverage. The mean leverage is p/n; twice the mean is the
   * rule of thumb of Hoaglin & Welsch (1978, Amer. Statist. 32:17–22) and Belsley, Kuh & Welsch (1980, §2.1):
   * common practice, not a test.
   */
  leverageFactor: 2,
  /**
   * Cook's distance Dᵢ > cooksWarning flags an influential row (a warning). Removing such a row moves the estimates
   * beyond about the median of F(p, n − p), the edge of a 50 % confidence region (Cook & Weisberg 1982, Residuals
   * and Influence in Regression, §3.5): common practice.
   */
  cooksWarning: 1,
  /**
   * Dᵢ > cooksNoticeNumerator/n lists a row as worth a look, without a warning: the 4/n rule of thumb (common
   * practice, e.g. Bollen & Jackman 1990). On clean data of 20 points about one set in two has such a row
   * (a normal residual with |eᵢ*| > 2 at average leverage already reaches it), which is why it does not warn.
   */
  cooksNoticeNumerator: 4,
  /**
   * Family-wise level of the outlier test: each row's studentized deleted residual is tested two-sided at
   * outlierLevel/n with t on n − p − 1 degrees of freedom (Bonferroni; Weisberg 2005, Applied Linear Regression,
   * 3rd ed., §9.1.3; Cook & Weisberg 1982, §2.2.2). On data with normal errors and a right model the chance of any
   * false flag in a fit is at most this level.
   */
  outlierLevel: 0.05,
  /** Lack-of-fit F test: p below this warns (the 5 % level of the NIST/SEMATECH e-Handbook §4.4.4.4 examples; common practice). */
  lackOfFitLevel: 0.05,
  /**
   * Curvature test: two-sided p below this warns. Reason: the same level as the other residual-pattern tests
   * (runs test, Shapiro–Wilk: THRESHOLDS.residualP above), so each residual check flags a clean fit at most 1 % of
   * the time.
   */
  curvatureLevel: 0.01,
  /**
   * Durbin–Watson hints: d within durbinWatsonNear of 2 reads as "no sign of serial correlation", beyond it as a
   * hint of positive (below 2) or negative (above 2) serial correlation, and beyond the warning's distance
   * (THRESHOLDS.durbinWatsonDistance, 1) as serial correlation. The 1.5…2.5 band is a
   * rule of thumb (common practice); the exact bounds depend on n and p (Durbin & Watson 1951, Biometrika 38:159–178),
   * which a hint does not try to reproduce.
   */
  durbinWatsonNear: 0.5,
  /** Runs test: p below this gives the hint "fewer (or more) runs than expected" (5 %, common practice). */
  runsHintLevel: 0.05,
} as const;

/**
 * A profile end differs "materially" from the Wald end when
 * |profile end − Wald end| > PROFILE_MATERIAL · (Wald half-width), or when it
 * is open while the Wald end is a number. 10 %: a change of the interval's
 * width at its second significant digit, which is where a reported interval
 * changes; below it the symmetric interval is a fair summary. Our choice (the
 * comparison itself follows Bates & Watts 1988, §6.1.2: a straight profile t
 * plot means the linear approximation is adequate).
 */
export const PROFILE_MATERIAL = 0.1;

/** ΔAICc at or below this: the data do not tell the two fits apart (Burnham & Anderson 2002, §2.6). */
export const AICC_TIE = 2;

/** ΔAICc above this: the fit with the higher AICc has essentially no support (Burnham & Anderson 2002, §2.6). */
export const AICC_CLEAR = 10;

/**
 * How far inverse prediction (engine/stats/inverse.ts) follows the curve beyond the data range [lo, hi].
 * - `estimateMargin`: the predictor value read off the curve may lie up to this fraction of the range
 *   beyond an end (10 %), reported as extrapolated: a standard at the end of a calibration reads back just
 *   outside it when its residual carries it there. Farther out the answer is refused as before (no standard
 *   supports it). Our choice.
 * - `intervalReach`: an interval end is sought up to this many data ranges beyond the data (1: one range; for
 *   a log-spaced range, one decade per unit), reported as extrapolated when it lies outside the data; not found
 *   within it, the interval is reported open on that side. Our choice: enough for the end standards of a
 *   calibration, short of reading the curve where nothing was measured.
 */
export const INVERSE_REACH = { estimateMargin: 0.1, intervalReach: 1 } as const;
