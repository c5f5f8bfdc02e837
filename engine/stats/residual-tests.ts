/**
 * Serial-pattern checks on residuals taken in predictor order.
 *
 * - Durbin–Watson d = Σᵢ₌₂ⁿ (eᵢ − eᵢ₋₁)² / Σᵢ₌₁ⁿ eᵢ² (Durbin & Watson 1950,
 *   Biometrika 37:409–428, eq. for d). Near 2 without serial correlation,
 *   towards 0 for positive and towards 4 for negative correlation.
 * - Wald–Wolfowitz runs test on residual signs (Wald & Wolfowitz 1940, Ann.
 *   Math. Statist. 11:147–162) with the normal approximation
 *   E[R] = 2n₊n₋/N + 1, Var[R] = 2n₊n₋(2n₊n₋ − N) / (N²(N − 1)),
 *   z = (R − E[R]) / √Var[R], two-sided p = 2Φ(−|z|) (no continuity correction;
 *   as in the NIST/SEMATECH e-Handbook of Statistical Methods, §1.3.5.13 "Runs test").
 *   Residuals exactly 0 carry no sign and are left out.
 */
import { normalUpper } from './distributions';
import { radixOrder } from './radix-order';

/**
 * Indices that put `x` in ascending order; ties keep their original (row) order.
 * Non-finite x sort last.
 */
export function orderBy(x: ArrayLike<number>): number[] {
  const idx = Array.from({ length: x.length }, (_, i) => i);
  let sorted = true;
  for (let i = 1; i < x.length && sorted; i++) sorted = x[i - 1] <= x[i];
  if (sorted) return idx; // common case (data in predictor order): no sort needed
  // (the order of `idx.sort((a, b) => key(a) − key(b) || a − b)`, in linear time: radix-order.ts)
  const keys = new Float64Array(x.length);
  for (let i = 0; i < x.length; i++) keys[i] = Number.isFinite(x[i]) ? x[i] : Infinity;
  const order = radixOrder([keys], x.length);
  for (let i = 0; i < x.length; i++) idx[i] = order[i];
  return idx;
}

/** Durbin–Watson statistic of residuals in the given order; null for n < 2 or all-zero residuals. */
export function durbinWatson(residuals: ArrayLike<number>, order?: readonly number[]): number | null {
  const n = residuals.length;
  if (n < 2) return null;
  const at = (k: number) => residuals[order ? order[k] : k];
  let num = 0;
  let den = at(0) * at(0);
  for (let k = 1; k < n; k++) {
    const d = at(k) - at(k - 1);
    num += d * d;
    den += at(k) * at(k);
  }
  if (!(den > 0) || !Number.isFinite(num)) return null;
  return num / den;
}

export interface RunsTestResult {
  observed: number;
  expected: number;
  pValue: number;
}

/** Runs test on the signs of residuals in the given order; null when one sign is absent (no test possible). */
export function runsTest(residuals: ArrayLike<number>, order?: readonly number[]): RunsTestResult | null {
  let nPos = 0;
  let nNeg = 0;
  let runs = 0;
  let last = 0;
  for (let k = 0; k < residuals.length; k++) {
    const r = residuals[order ? order[k] : k];
    if (!Number.isFinite(r)) return null;
    const s = Math.sign(r);
    if (s === 0) continue;
    if (s > 0) nPos++;
    else nNeg++;
    if (s !== last) runs++;
    last = s;
  }
  const total = nPos + nNeg;
  if (nPos === 0 || nNeg === 0) return null;
  const prod = 2 * nPos * nNeg;
  const expected = prod / total + 1;
  const variance = (prod * (prod - total)) / (total * total * (total - 1));
  if (!(variance > 0)) return { observed: runs, expected, pValue: 1 };
  const z = (runs - expected) / Math.sqrt(variance);
  return { observed: runs, expected, pValue: Math.min(1, 2 * normalUpper(Math.abs(z))) };
}
