/**
 * Flags that mark a group's fit for attention in a group table.
 *
 * - `failed`: the fit could not run (stop code `failed`, e.g. fewer usable
 *   rows than free parameters, or an error inside the fit). Exclusive: a failed
 *   group carries no other flag.
 * - `not_converged`: the solver stopped without meeting a convergence test
 *   (`stop.converged` false: iteration or evaluation limit, non-finite values,
 *   cancellation).
 * - `no_dof`: no degrees of freedom left, ν = n − p ≤ 0 (as many rows as free
 *   parameters, or fewer left after the fit): the curve can pass through every
 *   point, so there is no standard error, no interval and no test of fit.
 * - `few_dof`: 0 < ν < `minDof` (default 3, the engine's `few_dof` warning
 *   threshold, THRESHOLDS.minDof): intervals are wide and tests weak.
 * - `at_bound`: at least one parameter estimate sits on a bound.
 * - `poor_fit`:
 *   - with absolute σ (`sigma` given): the χ² statistic is implausible for its
 *     degrees of freedom ν, i.e. P(χ²_ν ≥ χ²) < α (misfit or σ too small) or
 *     P(χ²_ν ≤ χ²) < α (σ too large), each tail at α = `chi2TailProbability`
 *     (default THRESHOLDS.groupChi2Tail, 0.001);
 *   - without absolute σ, a model linear in its parameters: R² < `minR2`
 *     (default THRESHOLDS.groupMinR2, 0.9), a rough screen, most useful when
 *     groups share one model shape;
 *   - without absolute σ, a model nonlinear in its parameters (the fit carries
 *     the engine's `r2_nonlinear` warning): not by R², which the engine itself
 *     says is no measure of fit there (R² can be high for a curve of the wrong
 *     shape, and low for the right curve under large scatter); instead by the
 *     runs test of its residual signs (Wald & Wolfowitz 1940): too few runs,
 *     i.e. long stretches of one sign, is the mark of a curve that misses the
 *     data's shape. The test runs on every group, so it is decided across the
 *     fit's groups with Holm's step-down procedure (Holm 1979, "A simple
 *     sequentially rejective multiple test procedure", Scand. J. Statist. 6)
 *     at family-wise level THRESHOLDS.groupFamilyAlpha (0.05): chance alone
 *     then flags a group of a right model in at most 1 of 20 plates, not 1 of
 *     100 wells. A fit judged alone (`isPoorFit` without `runsRejected`) is a
 *     family of one: runs p ≤ 0.05;
 *   - skipped (not flagged) when ν ≤ 0 or the statistic is not finite;
 *   - a group of a joint fit is judged on its own χ² and its own ν (its rows
 *     less its share of the joint parameters, `jointShare.dof`).
 */
import { chiSquareCdf, chiSquareUpper, normalUpper } from '../stats/distributions';
import { INFLUENCE_THRESHOLDS, isSerialDurbinWatson, THRESHOLDS } from '../thresholds';
import type { FitResult, FitWarning, WarningAdjustment, WarningCode } from '../result';
import { adjustedText } from '../messages';

export type GroupFlag = 'failed' | 'not_converged' | 'no_dof' | 'few_dof' | 'at_bound' | 'poor_fit';
export const GROUP_FLAGS: readonly GroupFlag[] = ['failed', 'not_converged', 'no_dof', 'few_dof', 'at_bound', 'poor_fit'];

export function isGroupFlag(value: unknown): value is GroupFlag {
  return typeof value === 'string' && (GROUP_FLAGS as readonly string[]).includes(value);
}

export interface FlagOptions {
  /** Poor fit of a model linear in its parameters, without absolute σ, when R² < minR2. Default THRESHOLDS.groupMinR2 (0.9). */
  minR2?: number;
  /** Per-tail probability of the two-sided χ² test with absolute σ. Default THRESHOLDS.groupChi2Tail (0.001). */
  chi2TailProbability?: number;
  /** `few_dof` when 0 < ν < minDof. Default THRESHOLDS.minDof (3). */
  minDof?: number;
  /**
   * Whether the runs test of this fit is rejected by Holm's procedure across
   * the fit's groups (`holmRejected`, computed by engine/groups/table.ts).
   * Default: the fit as a family of one.
   */
  runsRejected?: boolean;
}

/** The flags of one group's fit, in `GROUP_FLAGS` order. */
export function flagsOf(fit: FitResult, options: FlagOptions = {}): GroupFlag[] {
  if (fit.stop.code === 'failed') return ['failed'];
  const flags: GroupFlag[] = [];
  if (!fit.stop.converged) flags.push('not_converged');
  const dof = fit.goodness.dof;
  if (!(dof > 0)) flags.push('no_dof');
  else if (dof < (options.minDof ?? THRESHOLDS.minDof)) flags.push('few_dof');
  if (fit.parameters.some((p) => p.atBound !== null)) flags.push('at_bound');
  if (isPoorFit(fit, options)) flags.push('poor_fit');
  return flags;
}

/** The poor-fit test described in the module comment. */
export function isPoorFit(fit: FitResult, options: FlagOptions = {}): boolean {
  const g = fit.goodness;
  if (fit.sigmaAbsolute && g.chi2 !== null) {
    const alpha = options.chi2TailProbability ?? THRESHOLDS.groupChi2Tail;
    // a group of a joint fit: its own χ² against its own degrees of freedom (its rows less its share of the
    // joint parameters, engine/run/joint-group-stats.ts), not the pooled fit's ν
    const dof = fit.jointShare ? fit.jointShare.dof : g.dof;
    if (!(dof > 0) || !Number.isFinite(g.chi2)) return false;
    return chiSquareCdf(g.chi2, dof) < alpha || chiSquareUpper(g.chi2, dof) < alpha;
  }
  if (isNonlinear(fit)) return options.runsRejected ?? holmRejected([runsP(fit)], THRESHOLDS.groupFamilyAlpha)[0];
  const minR2 = options.minR2 ?? THRESHOLDS.groupMinR2;
  return Number.isFinite(g.r2) && g.r2 < minR2;
}

/** The model is nonlinear in its parameters: the engine gave the fit its `r2_nonlinear` warning (engine/stats/warnings.ts). */
export function isNonlinear(fit: FitResult): boolean {
  return fit.warnings.some((w) => w.code === 'r2_nonlinear');
}

/** The runs test p-value of a fit's residuals, or null when it has none. */
export function runsP(fit: FitResult): number | null {
  const p = fit.residuals.runs?.pValue;
  return typeof p === 'number' && Number.isFinite(p) ? p : null;
}

/**
 * Holm's step-down procedure (Holm 1979): with the m usable p-values sorted,
 * p₍₁₎ ≤ … ≤ p₍ₘ₎, reject the hypotheses of p₍₁₎ … p₍ₖ₎ where k is the last
 * index with p₍ⱼ₎ ≤ α/(m − j + 1) for every j ≤ k. Controls the family-wise
 * error rate at α under any dependence. Nulls are not tested (false).
 */
export function holmRejected(pValues: readonly (number | null)[], alpha: number): boolean[] {
  const order = pValues.map((p, i) => ({ p, i })).filter((e): e is { p: number; i: number } => e.p !== null).sort((a, b) => a.p - b.p);
  const out = pValues.map(() => false);
  const m = order.length;
  for (let j = 0; j < m; j++) {
    if (!(order[j].p <= alpha / (m - j))) break;
    out[order[j].i] = true;
  }
  return out;
}

/**
 * The residual tests whose per-fit warnings are decided across the groups of
 * a per-group fit (`adjustGroupWarnings`), each with the warning it gives, the
 * level a single fit uses and the group's p-value:
 * - the serial checks (`residual_pattern`, THRESHOLDS.residualP): the runs
 *   test of the residual signs and the Durbin–Watson band; the group's p is
 *   the smaller of the p-values of the checks that tripped, the runs test's
 *   own and, for d, the large-sample normal approximation d ~ N(2, 4/n) under
 *   no serial correlation (d ≈ 2(1 − r₁), r₁ ~ N(0, 1/n); common practice —
 *   the exact distribution of d depends on the design, Durbin & Watson 1950,
 *   Biometrika 37, 409–428), p = 2·P(Z > |d − 2|·√n/2);
 * - Shapiro–Wilk (`non_normal_residuals`, THRESHOLDS.residualP);
 * - curvature (`curvature`, INFLUENCE_THRESHOLDS.curvatureLevel);
 * - lack of fit (`lack_of_fit`, INFLUENCE_THRESHOLDS.lackOfFitLevel);
 * - the Bonferroni outlier test (`outlier`, INFLUENCE_THRESHOLDS.outlierLevel;
 *   the group's p is its smallest Bonferroni-adjusted row p, and only groups
 *   with a flagged row carry one, which is all Holm needs: a test with
 *   p ≥ α is never rejected and only counts in m).
 */
export const ADJUSTED_TESTS: readonly AdjustedTest[] = [
  { test: 'serial', code: 'residual_pattern', level: () => THRESHOLDS.residualP, p: serialP, tested: (f) => finiteP(f.residuals.runs?.pValue) !== null || finiteP(f.residuals.durbinWatson) !== null },
  { test: 'shapiro_wilk', code: 'non_normal_residuals', level: () => THRESHOLDS.residualP, p: (f) => finiteP(f.residuals.shapiroWilk?.pValue), tested: (f) => finiteP(f.residuals.shapiroWilk?.pValue) !== null },
  { test: 'curvature', code: 'curvature', level: () => INFLUENCE_THRESHOLDS.curvatureLevel, p: (f) => finiteP(f.residuals.curvature?.pValue), tested: (f) => finiteP(f.residuals.curvature?.pValue) !== null },
  { test: 'lack_of_fit', code: 'lack_of_fit', level: () => INFLUENCE_THRESHOLDS.lackOfFitLevel, p: (f) => finiteP(f.residuals.lackOfFit?.pValue), tested: (f) => finiteP(f.residuals.lackOfFit?.pValue) !== null },
  {
    test: 'outlier', code: 'outlier', level: () => INFLUENCE_THRESHOLDS.outlierLevel,
    p: (f) => (f.influence?.outliers.length ? Math.min(...f.influence.outliers.slice(0, 1000).map((o) => o.pValue)) : null),
    tested: (f) => f.influence !== undefined && f.influence.outlierCritical !== null,
  },
];

export interface AdjustedTest {
  test: 'serial' | 'shapiro_wilk' | 'curvature' | 'lack_of_fit' | 'outlier';
  code: WarningCode;
  level: () => number;
  /** The p-value this warning rests on, or null when the warning does not rest on this test alone. */
  p: (fit: FitResult) => number | null;
  /** The test ran on this fit (it counts in the family). */
  tested: (fit: FitResult) => boolean;
}

const finiteP = (p: number | null | undefined): number | null => (typeof p === 'number' && Number.isFinite(p) ? p : null);

/** The p of the serial checks that tripped (see ADJUSTED_TESTS): the runs test's, and Durbin–Watson's by d ~ N(2, 4/n). */
function serialP(f: FitResult): number | null {
  const ps: number[] = [];
  const runs = finiteP(f.residuals.runs?.pValue);
  if (runs !== null && runs < THRESHOLDS.residualP) ps.push(runs);
  const d = finiteP(f.residuals.durbinWatson);
  if (d !== null && isSerialDurbinWatson(d) && f.goodness.n > 0) ps.push(durbinWatsonP(d, f.goodness.n));
  return ps.length ? Math.min(...ps) : null;
}

/** Two-sided p of Durbin–Watson d by the large-sample approximation d ~ N(2, 4/n) (common practice; see ADJUSTED_TESTS). */
export function durbinWatsonP(d: number, n: number): number {
  return Math.min(1, 2 * normalUpper(Math.abs(d - 2), 0, 2 / Math.sqrt(n)));
}

/**
 * The residual warnings of a per-group fit's groups, decided across the groups
 * (a multiple-testing adjustment): with 96 wells, each residual test at 1 %
 * warns about one well of a right model by chance alone; decided as one
 * family per test by Holm's step-down procedure (Holm 1979; `holmRejected`) at
 * the level a single fit uses, chance alone warns about any well of the plate
 * at most that often. A warning the family upholds keeps its text, with the
 * method, the family size and the level added (`adjusted`); one it does not
 * uphold is moved to the fit's `setAside` with the same record, so the group's
 * own residual diagnostics stay as they are and nothing is lost. Idempotent:
 * set-aside warnings are restored first, so a gathered run (engine/runner/
 * gather.ts) decides over all its groups again. Fits of one group, and
 * groups that did not converge (they have no residual warnings), are left
 * as they are. The influence rules (`high_leverage`, `influential_point`:
 * rules of thumb on leverage and Cook's distance, not tests) have no p-value
 * and are not adjusted.
 */
export function adjustGroupWarnings(results: readonly FitResult[]): FitResult[] {
  const restored = results.map(restore);
  if (restored.length < 2) return restored;
  let out = restored;
  for (const spec of ADJUSTED_TESTS) {
    const family = out.filter((f) => f.stop.converged && spec.tested(f));
    const m = family.length;
    if (m < 2) continue;
    const level = spec.level();
    const ps = out.map((f) => (f.stop.converged && spec.tested(f) && f.warnings.some((w) => w.code === spec.code) ? spec.p(f) : null));
    // Holm over m tests: the p-values of the warned groups, the others (p ≥ level, never rejected) filling m
    const padded = [...ps, ...Array.from({ length: Math.max(0, m - ps.filter((p) => p !== null).length) }, () => 1)];
    const rejected = holmRejected(padded, level);
    out = out.map((f, i) => {
      const p = ps[i];
      if (p === null) return f;
      const adjusted: WarningAdjustment = { method: 'holm', family: m, level, pValue: p };
      const keep = rejected[i];
      const warnings: FitWarning[] = [];
      const aside: FitWarning[] = [...(f.setAside ?? [])];
      for (const w of f.warnings) {
        if (w.code !== spec.code) warnings.push(w);
        else if (keep) warnings.push({ ...w, message: adjustedText.keptMessage(w.message, adjusted), adjusted });
        else aside.push({ ...w, message: adjustedText.setAsideMessage(w.message, adjusted), adjusted });
      }
      return { ...f, warnings, ...(aside.length ? { setAside: aside } : {}) };
    });
  }
  return out;
}

/** A fit with its set-aside warnings back and the adjustment texts removed. */
function restore(f: FitResult): FitResult {
  if (!f.setAside?.length && !f.warnings.some((w) => w.adjusted)) return f;
  const plain = (w: FitWarning, suffix: (a: WarningAdjustment) => string): FitWarning => {
    if (!w.adjusted) return w;
    const { adjusted, ...rest } = w;
    const s = suffix(adjusted);
    return { ...rest, message: rest.message.endsWith(s) ? rest.message.slice(0, -s.length) : rest.message };
  };
  const warnings = [...f.warnings.map((w) => plain(w, adjustedText.kept)), ...(f.setAside ?? []).map((w) => plain(w, adjustedText.setAside))];
  const { setAside: _, ...rest } = f;
  return { ...rest, warnings };
}
