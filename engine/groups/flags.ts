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
 *   - skipped (not flagged) when ν ≤ 0 or the statistic is not finite.
 */
import { chiSquareCdf, chiSquareUpper } from '../stats/distributions';
import { THRESHOLDS } from '../thresholds';
import type { FitResult } from '../result';

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
    if (!(g.dof > 0) || !Number.isFinite(g.chi2)) return false;
    return chiSquareCdf(g.chi2, g.dof) < alpha || chiSquareUpper(g.chi2, g.dof) < alpha;
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
