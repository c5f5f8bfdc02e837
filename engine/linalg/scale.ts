/**
 * Scaling by powers of two, so least-squares arithmetic on data near 1e-300
 * or 1e+300 neither underflows nor overflows in its squares.
 *
 * Why powers of two: multiplying a double by 2^k is exact (unless the result
 * leaves the normal range), so a scaled problem is the same problem, bit for
 * bit, in other units; its results scale back exactly.
 *
 * The response scale c (`responseScale`) is 1 while max|√wᵢ·yᵢ| lies in
 * [SAFE_LOW, SAFE_HIGH] = [2^-400, 2^400] (so data in everyday units are
 * untouched), else the power of two nearest that maximum. Why that range:
 * sums of squares underflow below about 2^-1022 and overflow above 2^1024;
 * inside it, residuals down to 10^-16 of the response (the rounding level,
 * 2^-53) have squares above 2^-906, and n ≤ 2^30 squared responses sum
 * below 2^830.
 */

export const SAFE_LOW = 2 ** -400;
export const SAFE_HIGH = 2 ** 400;

/** 2^k for the integer k nearest log₂|x| (clamped to [-1000, 1000]); 1 for 0 or non-finite x. */
export function powerOfTwoNear(x: number): number {
  const a = Math.abs(x);
  if (!(a > 0) || !Number.isFinite(a)) return 1;
  const k = Math.max(-1000, Math.min(1000, Math.round(Math.log2(a))));
  return 2 ** k;
}

/** The response scale c of weighted responses √wᵢ·yᵢ (module comment): 1 in the safe range. */
export function responseScale(y: ArrayLike<number>, sqrtW: ArrayLike<number> | null, n = y.length): number {
  let big = 0;
  for (let i = 0; i < n; i++) {
    const v = Math.abs(sqrtW ? sqrtW[i] * y[i] : y[i]);
    if (v > big && v < Infinity) big = v;
  }
  if (big === 0 || (big >= SAFE_LOW && big <= SAFE_HIGH)) return 1;
  return powerOfTwoNear(big);
}

/**
 * √(vᵀ·ρ·v) for a p-vector v and a p×p matrix ρ (a correlation matrix,
 * flat, symmetric), without squaring the entries of v: with m = max|vⱼ|,
 * √(vᵀρv) = m·√((v/m)ᵀρ(v/m)). NaN when an entry of v (or a needed ρ) is NaN;
 * a slightly negative form (rounding, when it is ~0) counts as 0.
 */
export function quadraticFormRoot(v: ArrayLike<number>, rho: ArrayLike<number>, p: number): number {
  let m = 0;
  for (let j = 0; j < p; j++) {
    const a = Math.abs(v[j]);
    if (Number.isNaN(a)) return NaN;
    if (a > m) m = a;
  }
  if (m === 0) return 0;
  if (m === Infinity) return Infinity;
  let q = 0;
  for (let j = 0; j < p; j++) {
    const vj = v[j] / m;
    if (vj === 0) continue;
    let row = 0;
    for (let k = 0; k < p; k++) {
      const vk = v[k] / m;
      if (vk !== 0) row += rho[j * p + k] * vk;
    }
    q += vj * row;
  }
  if (Number.isNaN(q)) return NaN;
  return m * Math.sqrt(Math.max(q, 0));
}
