/**
 * The probability distributions the statistics need, all from @stdlib (no
 * hand-written special functions here): the `@stdlib/stats-base-dists-*`
 * distribution functions, and for upper tails the regularized incomplete
 * beta and gamma functions with their `upper` flag
 * (`@stdlib/math-base-special-betainc`, `-gammainc`). Every t, F, χ² and
 * normal tail probability and quantile of the engine and its views goes
 * through this module.
 *
 * Upper tails are never `1 − cdf`: when the upper tail is below about 1e-16
 * the cdf rounds to 1 and `1 − cdf` gives 0 (or a few ulps of noise), losing
 * every digit. The `…Upper` functions compute the small tail directly.
 *
 * Each wrapper returns NaN for invalid arguments (e.g. non-positive degrees of freedom).
 */
import tCdfStd from '@stdlib/stats-base-dists-t-cdf';
import tQuantileStd from '@stdlib/stats-base-dists-t-quantile';
import fCdfStd from '@stdlib/stats-base-dists-f-cdf';
import chisqCdfStd from '@stdlib/stats-base-dists-chisquare-cdf';
import normalCdfStd from '@stdlib/stats-base-dists-normal-cdf';
import normalQuantileStd from '@stdlib/stats-base-dists-normal-quantile';
import betainc from '@stdlib/math-base-special-betainc';
import gammainc from '@stdlib/math-base-special-gammainc';

/** Student t cumulative distribution P(T ≤ x) with `dof` degrees of freedom. */
export function tCdf(x: number, dof: number): number {
  return tCdfStd(x, dof);
}

/**
 * Student t upper tail P(T > x). By symmetry P(T > x) = P(T ≤ −x); for a
 * negative argument @stdlib's t cdf returns its incomplete-beta value
 * I_{ν/(ν+x²)}(ν/2, ½)/2 (or the x²/(ν+x²) form) without a subtraction, so
 * the small tail keeps its digits.
 */
export function tUpper(x: number, dof: number): number {
  return tCdfStd(-x, dof);
}

/** Two-sided t probability P(|T| ≥ |x|) = 2·P(T > |x|), at most 1. */
export function tTwoSided(x: number, dof: number): number {
  return Math.min(1, 2 * tUpper(Math.abs(x), dof));
}

/**
 * Student t quantile: the x with P(T ≤ x) = p. Remembered by (p, dof), at
 * most QUANTILE_MEMO_SIZE pairs (then forgotten all at once): the groups of a
 * per-group fit ask for the same few quantiles (interval level, outlier cut
 * at their n) thousands of times, and one costs about 20 µs (@stdlib inverts
 * the incomplete beta function). The function is deterministic, so a
 * remembered value is the one computed again.
 */
export function tQuantile(p: number, dof: number): number {
  let byDof = tQuantiles.get(p);
  if (!byDof) {
    if (tQuantiles.size >= QUANTILE_MEMO_SIZE) tQuantiles.clear();
    byDof = new Map();
    tQuantiles.set(p, byDof);
  }
  let q = byDof.get(dof);
  if (q === undefined) {
    if (byDof.size >= QUANTILE_MEMO_SIZE) byDof.clear();
    q = tQuantileStd(p, dof);
    byDof.set(dof, q);
  }
  return q;
}
/** Pairs (p, dof) per memo level of `tQuantile`. */
const QUANTILE_MEMO_SIZE = 256;
const tQuantiles = new Map<number, Map<number, number>>();

/**
 * Two-sided critical value t_{(1+level)/2, dof} for a confidence interval at
 * `level` (e.g. 0.95 → 97.5 % quantile). NaN when dof ≤ 0 or level ∉ (0, 1).
 */
export function tCritical(level: number, dof: number): number {
  if (!(level > 0 && level < 1) || !(dof > 0)) return NaN;
  return tQuantile((1 + level) / 2, dof);
}

/** F cumulative distribution P(F ≤ x) with (d1, d2) degrees of freedom. */
export function fCdf(x: number, d1: number, d2: number): number {
  return fCdfStd(x, d1, d2);
}

/**
 * F upper tail P(F > x) with (d1, d2) degrees of freedom:
 * 1 − I_z(d1/2, d2/2) with z = d1·x/(d1·x + d2) (Abramowitz & Stegun 26.6.2),
 * taken as the upper regularized incomplete beta, or as I_{1−z}(d2/2, d1/2)
 * when z is above ½ (1 − z = d2/(d1·x + d2) is then formed without
 * cancellation, the same split @stdlib's F cdf makes).
 */
export function fUpper(x: number, d1: number, d2: number): number {
  if (Number.isNaN(x) || !(d1 > 0) || !(d2 > 0)) return NaN;
  if (x <= 0) return 1;
  if (x === Infinity) return 0;
  const d1x = d1 * x;
  return d1x > d2 ? betainc(d2 / (d2 + d1x), d2 / 2, d1 / 2, true, false) : betainc(d1x / (d2 + d1x), d1 / 2, d2 / 2, true, true);
}

/** χ² cumulative distribution P(X ≤ x) with k degrees of freedom. */
export function chiSquareCdf(x: number, k: number): number {
  return chisqCdfStd(x, k);
}

/** χ² upper tail P(X > x) = Q(k/2, x/2), the upper regularized incomplete gamma function (A&S 26.4.19). */
export function chiSquareUpper(x: number, k: number): number {
  if (Number.isNaN(x) || !(k > 0)) return NaN;
  if (x <= 0) return 1;
  return gammainc(x / 2, k / 2, true, true);
}

/** Normal cumulative distribution Φ((x − mean)/sd). */
export function normalCdf(x: number, mean = 0, sd = 1): number {
  return normalCdfStd(x, mean, sd);
}

/** Normal upper tail P(X > x) = Φ(−z) with z = (x − mean)/sd, which @stdlib computes as ½·erfc(z/√2) without a subtraction. */
export function normalUpper(x: number, mean = 0, sd = 1): number {
  if (!(sd > 0)) return NaN;
  return normalCdfStd(-(x - mean) / sd, 0, 1);
}

/** Normal quantile: the x with Φ((x − mean)/sd) = p. */
export function normalQuantile(p: number, mean = 0, sd = 1): number {
  return normalQuantileStd(p, mean, sd);
}
