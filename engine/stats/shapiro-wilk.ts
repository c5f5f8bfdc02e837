/**
 * Shapiro–Wilk W test of normality with Royston's approximations:
 * - coefficients aᵢ from normal scores mᵢ = Φ⁻¹((i − 3/8)/(n + 1/4)) with
 *   polynomial corrections for the two extreme coefficients
 *   (Royston 1992, "Approximating the Shapiro–Wilk W-test for non-normality",
 *   Statistics and Computing 2:117–119, §2);
 * - the p-value from a normalising transformation of W: for 4 ≤ n ≤ 11,
 *   −ln(γ − ln(1 − W)) with γ = −2.273 + 0.459n; for n ≥ 12, ln(1 − W); each
 *   treated as normal with polynomial mean and log-sd in n or ln n (Royston 1992, §3);
 * - n = 3: the exact p-value (6/π)(asin√W − asin√(3/4)) (Royston 1995, AS R94);
 * as published in Royston (1995), "Remark AS R94: A remark on Algorithm AS 181:
 * the W-test for normality", Applied Statistics 44(4):547–551.
 * Valid for 3 ≤ n ≤ 5000; null outside, or when the data have zero range.
 */
import { normalQuantile, normalUpper } from './distributions';

/** Coefficients of Royston (1995, AS R94), constant term first. */
const C1 = [0, 0.221157, -0.147981, -2.07119, 4.434685, -2.706056];
const C2 = [0, 0.042981, -0.293762, -1.752461, 5.682633, -3.582633];
const C3 = [0.544, -0.39978, 0.025054, -6.714e-4];
const C4 = [1.3822, -0.77857, 0.062767, -0.0020322];
const C5 = [-1.5861, -0.31082, -0.083751, 0.0038915];
const C6 = [-0.4803, -0.082676, 0.0030302];
const G = [-2.273, 0.459];

/** Relative range below which the sample counts as constant: (max − min) ≤ 1e-12·max(|max|, |min|, 1e-300). */
const ZERO_RANGE = 1e-12;

function poly(c: readonly number[], x: number): number {
  let r = 0;
  for (let k = c.length - 1; k >= 0; k--) r = r * x + c[k];
  return r;
}

/** The ⌊n/2⌋ positive coefficients a₁ ≥ a₂ ≥ … applied to x₍ₙ₊₁₋ᵢ₎ − x₍ᵢ₎. */
export function shapiroWilkCoefficients(n: number): Float64Array {
  const half = Math.floor(n / 2);
  const a = new Float64Array(half);
  if (n === 3) {
    a[0] = Math.SQRT1_2;
    return a;
  }
  const m = new Float64Array(half); // upper-tail normal scores, positive
  let summ2 = 0;
  for (let i = 0; i < half; i++) {
    m[i] = -normalQuantile((i + 1 - 0.375) / (n + 0.25));
    summ2 += m[i] * m[i];
  }
  summ2 *= 2;
  const ssumm2 = Math.sqrt(summ2);
  const rsn = 1 / Math.sqrt(n);
  const a1 = poly(C1, rsn) + m[0] / ssumm2;
  let first: number;
  let fac: number;
  if (n > 5) {
    const a2 = poly(C2, rsn) + m[1] / ssumm2;
    fac = Math.sqrt((summ2 - 2 * m[0] * m[0] - 2 * m[1] * m[1]) / (1 - 2 * a1 * a1 - 2 * a2 * a2));
    a[1] = a2;
    first = 2;
  } else {
    fac = Math.sqrt((summ2 - 2 * m[0] * m[0]) / (1 - 2 * a1 * a1));
    first = 1;
  }
  a[0] = a1;
  for (let i = first; i < half; i++) a[i] = m[i] / fac;
  return a;
}

export interface ShapiroWilkResult {
  w: number;
  pValue: number;
}

/** Shapiro–Wilk W and its p-value for a sample (any order; non-finite values make the result null). */
export function shapiroWilk(sample: ArrayLike<number>): ShapiroWilkResult | null {
  const n = sample.length;
  if (n < 3 || n > 5000) return null;
  const x = Float64Array.from(sample).sort();
  if (!x.every(Number.isFinite)) return null;
  const range = x[n - 1] - x[0];
  if (!(range > ZERO_RANGE * Math.max(Math.abs(x[0]), Math.abs(x[n - 1]), 1e-300))) return null;
  const a = shapiroWilkCoefficients(n);
  let mean = 0;
  for (let i = 0; i < n; i++) mean += x[i] / range;
  mean /= n;
  let ss = 0;
  for (let i = 0; i < n; i++) {
    const d = x[i] / range - mean;
    ss += d * d;
  }
  let b = 0;
  for (let i = 0; i < a.length; i++) b += a[i] * (x[n - 1 - i] - x[i]) / range;
  const w = Math.min(1, (b * b) / ss);
  return { w, pValue: shapiroWilkPValue(w, n) };
}

/** Upper-tail p-value of W for sample size n (Royston 1992 §3; exact for n = 3). */
export function shapiroWilkPValue(w: number, n: number): number {
  if (n === 3) {
    const p = (6 / Math.PI) * (Math.asin(Math.sqrt(w)) - Math.PI / 3);
    return Math.min(1, Math.max(0, p));
  }
  const w1 = 1 - w;
  if (!(w1 > 0)) return 1;
  let y = Math.log(w1);
  let mean: number;
  let sd: number;
  if (n <= 11) {
    const gamma = poly(G, n);
    if (y >= gamma) return 0; // beyond the range of the transformation: W is extremely small
    y = -Math.log(gamma - y);
    mean = poly(C3, n);
    sd = Math.exp(poly(C4, n));
  } else {
    const ln = Math.log(n);
    mean = poly(C5, ln);
    sd = Math.exp(poly(C6, ln));
  }
  return normalUpper(y, mean, sd);
}
