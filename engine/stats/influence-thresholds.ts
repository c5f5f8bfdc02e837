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
   * Curvature test: two-sided p below this warns. The same level as the project's other residual-pattern tests
   * (runs test, Shapiro–Wilk: THRESHOLDS.residualP, engine/thresholds.ts), so each residual check flags a clean fit at most 1 % of the
   * time.
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
