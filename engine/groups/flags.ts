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
 *     shape and need not lie in [0, 1]); instead by the engine's residual
 *     tests, i.e. the fit carries a `residual_pattern` warning (runs test or
 *     Durbin–Watson beyond engine/thresholds.ts): the residuals run in long
 *     stretches of one sign, the mark of a curve that misses the data's shape;
 *   - skipped (not flagged) when ν ≤ 0 or the statistic is not finite.
 */
import chisquareCdf from '@stdlib/stats-base-dists-chisquare-cdf';
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
    const lower = chisquareCdf(g.chi2, g.dof);
    return lower < alpha || 1 - lower < alpha;
  }
  if (fit.warnings.some((w) => w.code === 'r2_nonlinear')) return fit.warnings.some((w) => w.code === 'residual_pattern');
  const minR2 = options.minR2 ?? THRESHOLDS.groupMinR2;
  return Number.isFinite(g.r2) && g.r2 < minR2;
}
