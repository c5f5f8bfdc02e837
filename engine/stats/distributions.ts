/**
 * The probability distributions the statistics need, all from
 * @stdlib/stats-base-dists-* (no hand-written special functions here).
 * Each wrapper returns NaN for invalid arguments (e.g. non-positive degrees of freedom).
 */
import tCdfStd from '@stdlib/stats-base-dists-t-cdf';
import tQuantileStd from '@stdlib/stats-base-dists-t-quantile';
import fCdfStd from '@stdlib/stats-base-dists-f-cdf';
import chisqCdfStd from '@stdlib/stats-base-dists-chisquare-cdf';
import normalCdfStd from '@stdlib/stats-base-dists-normal-cdf';
import normalQuantileStd from '@stdlib/stats-base-dists-normal-quantile';

/** Student t cumulative distribution P(T ≤ x) with `dof` degrees of freedom. */
export function tCdf(x: number, dof: number): number {
  return tCdfStd(x, dof);
}

/** Student t quantile: the x with P(T ≤ x) = p. */
export function tQuantile(p: number, dof: number): number {
  return tQuantileStd(p, dof);
}

/**
 * Two-sided critical value t_{(1+level)/2, dof} for a confidence interval at
 * `level` (e.g. 0.95 → 97.5 % quantile). NaN when dof ≤ 0 or level ∉ (0, 1).
 */
export function tCritical(level: number, dof: number): number {
  if (!(level > 0 && level < 1) || !(dof > 0)) return NaN;
  return tQuantileStd((1 + level) / 2, dof);
}

/** F cumulative distribution P(F ≤ x) with (d1, d2) degrees of freedom. */
export function fCdf(x: number, d1: number, d2: number): number {
  return fCdfStd(x, d1, d2);
}

/** χ² cumulative distribution P(X ≤ x) with k degrees of freedom. */
export function chiSquareCdf(x: number, k: number): number {
  return chisqCdfStd(x, k);
}

/** Standard normal cumulative distribution Φ(x). */
export function normalCdf(x: number, mean = 0, sd = 1): number {
  return normalCdfStd(x, mean, sd);
}

/** Standard normal quantile Φ⁻¹(p). */
export function normalQuantile(p: number, mean = 0, sd = 1): number {
  return normalQuantileStd(p, mean, sd);
}

/**
 * Upper tail P(T > x) of Student t, as the lower tail at −x (t is symmetric), so a small tail is not lost to
 * the subtraction 1 − P(T ≤ x).
 */
export function tUpper(x: number, dof: number): number {
  return tCdfStd(-x, dof);
}

/**
 * Upper tail P(F > x) of F(d1, d2), as the lower tail of F(d2, d1) at 1/x (1/F has that distribution), so a small
 * tail is not lost to the subtraction 1 − P(F ≤ x).
 */
export function fUpper(x: number, d1: number, d2: number): number {
  if (Number.isNaN(x)) return NaN;
  if (x <= 0) return d1 > 0 && d2 > 0 ? 1 : NaN;
  return fCdfStd(1 / x, d2, d1);
}
