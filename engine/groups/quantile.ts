/**
 * Order statistics for summaries across groups: median, quartiles, IQR.
 *
 * Quantiles use linear interpolation between order statistics, definition 7
 * of Hyndman & Fan (1996), "Sample quantiles in statistical packages",
 * The American Statistician 50(4), 361-365: for sorted x₍₁₎ ≤ … ≤ x₍ₙ₎ and
 * h = (n − 1)·q, Q(q) = x₍⌊h⌋+1₎ + (h − ⌊h⌋)·(x₍⌊h⌋+2₎ − x₍⌊h⌋+1₎).
 * Non-finite values are ignored (callers count them separately).
 */

export interface Spread {
  /** Number of finite values the figures are computed from. */
  count: number;
  median: number | null;
  q1: number | null;
  q3: number | null;
  /** Interquartile range q3 − q1. */
  iqr: number | null;
  min: number | null;
  max: number | null;
}

/** Sorted copy of the finite values. */
export function sortedFinite(values: readonly number[]): Float64Array {
  const finite = values.filter((v) => Number.isFinite(v));
  return Float64Array.from(finite).sort();
}

/** Quantile q ∈ [0, 1] of sorted values (Hyndman & Fan definition 7); null when empty. */
export function quantileSorted(sorted: Float64Array, q: number): number | null {
  const n = sorted.length;
  if (n === 0 || !(q >= 0 && q <= 1)) return null;
  const h = (n - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, n - 1);
  return sorted[lo] + (h - lo) * (sorted[hi] - sorted[lo]);
}

/** Median, quartiles, IQR, min and max of the finite values. */
export function spreadOf(values: readonly number[]): Spread {
  const s = sortedFinite(values);
  if (s.length === 0) return { count: 0, median: null, q1: null, q3: null, iqr: null, min: null, max: null };
  const q1 = quantileSorted(s, 0.25) as number;
  const q3 = quantileSorted(s, 0.75) as number;
  return { count: s.length, median: quantileSorted(s, 0.5), q1, q3, iqr: q3 - q1, min: s[0], max: s[s.length - 1] };
}
