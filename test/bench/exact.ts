/**
 * Exact least-squares reference for the polynomial benchmark.
 *
 * The data are built so that every value is an exactly representable
 * dyadic rational: xᵢ = tᵢ/2^XS and yᵢ = Yᵢ/2^YS with integers tᵢ and Yᵢ
 * (|Yᵢ| < 2^53). In the integer basis the normal equations (TᵀT)γ = TᵀY,
 * T = [tᵢʲ], are solved exactly with BigInt rationals (Cramer's rule), and
 * β_j = γ_j·2^(XS·j)/2^YS are the exact least-squares coefficients of the
 * double data (no rounding anywhere). Sums are taken per distinct t (counts
 * and ΣY per t are exact in doubles while below 2^53, checked).
 *
 * LRE (log relative error, as used for the NIST StRD certified values):
 * LRE = −log10(|β̂ − β|/|β|), computed exactly from the rationals, capped at 16.
 */

export type Rational = [bigint, bigint];

export interface ExactPolynomial {
  x: Float64Array;
  y: Float64Array;
  /** Exact least-squares coefficients β₀…β_deg as rationals [numerator, denominator > 0]. */
  beta: Rational[];
}

const XS = 7;
const YS = 10;

/** Invented cubic calibration data: t spread over 0…8191, integer noise of up to ±2^20. */
export function exactCubic(n: number, seed = 1): ExactPolynomial {
  const c = [5000, -300, 7, 1];
  const tMax = 8192;
  const count = new Float64Array(tMax);
  const sumY = new Float64Array(tMax);
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  let s = seed >>> 0;
  for (let i = 0; i < n; i++) {
    const t = (i * 7919) % tMax;
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0; // LCG (Numerical Recipes, 2nd ed., §7.1)
    const noise = (s >>> 11) - 2 ** 20; // integer in [−2^20, 2^20)
    const Y = c[0] + c[1] * t + c[2] * t * t + c[3] * t * t * t + noise;
    if (!Number.isSafeInteger(Y)) throw new Error('exact data out of the 2^53 range');
    x[i] = t / 2 ** XS;
    y[i] = Y / 2 ** YS;
    count[t] += 1;
    sumY[t] += Y;
    if (!Number.isSafeInteger(sumY[t])) throw new Error('per-t sum out of the 2^53 range');
  }
  const deg = 3;
  const S: bigint[] = new Array(2 * deg + 1).fill(0n);
  const V: bigint[] = new Array(deg + 1).fill(0n);
  for (let t = 0; t < tMax; t++) {
    if (count[t] === 0) continue;
    const bt = BigInt(t);
    const cnt = BigInt(count[t]);
    const sy = BigInt(sumY[t]);
    let pw = 1n;
    for (let k = 0; k <= 2 * deg; k++) {
      S[k] += cnt * pw;
      if (k <= deg) V[k] += sy * pw;
      pw *= bt;
    }
  }
  const A = Array.from({ length: deg + 1 }, (_, i) => Array.from({ length: deg + 1 }, (_, j) => S[i + j]));
  const det = determinant(A);
  const beta: Rational[] = [];
  for (let j = 0; j <= deg; j++) {
    const Aj = A.map((row, i) => row.map((v, k) => (k === j ? V[i] : v)));
    // γ_j = det(A_j)/det(A); β_j = γ_j·2^(XS·j)/2^YS
    let num = determinant(Aj) * 2n ** BigInt(XS * j);
    let den = det * 2n ** BigInt(YS);
    if (den < 0n) {
      num = -num;
      den = -den;
    }
    beta.push([num, den]);
  }
  return { x, y, beta };
}

/** Exact determinant by fraction-free Gaussian elimination (Bareiss 1968, Math. Comp. 22:565-578). */
export function determinant(M: bigint[][]): bigint {
  const a = M.map((r) => [...r]);
  const n = a.length;
  let sign = 1n;
  let prev = 1n;
  for (let k = 0; k < n - 1; k++) {
    if (a[k][k] === 0n) {
      const swap = a.findIndex((r, i) => i > k && r[k] !== 0n);
      if (swap < 0) return 0n;
      [a[k], a[swap]] = [a[swap], a[k]];
      sign = -sign;
    }
    for (let i = k + 1; i < n; i++) {
      for (let j = k + 1; j < n; j++) a[i][j] = (a[i][j] * a[k][k] - a[i][k] * a[k][j]) / prev;
    }
    prev = a[k][k];
  }
  return sign * a[n - 1][n - 1];
}

/** The exact rational value of a finite double. */
export function rationalOf(d: number): Rational {
  if (!Number.isFinite(d)) throw new Error('not finite');
  if (d === 0) return [0n, 1n];
  let e = 0;
  let m = d;
  while (!Number.isInteger(m)) {
    m *= 2;
    e++;
  }
  return [BigInt(m), 2n ** BigInt(e)];
}

/** N/D as a double, for positive N, D, correct to a few ulps. */
function ratioToNumber(N: bigint, D: bigint): number {
  if (N === 0n) return 0;
  const shift = D.toString(2).length - N.toString(2).length + 64;
  const q = shift >= 0 ? (N << BigInt(shift)) / D : N / (D << BigInt(-shift));
  return Number(q) * 2 ** -shift;
}

/** LRE of estimate `est` against the exact rational `ref` (capped at 16; NaN estimate → 0). */
export function lre(est: number, ref: Rational): number {
  if (!Number.isFinite(est)) return 0;
  const [a, b] = rationalOf(est);
  const [p, q] = ref;
  const abs = (v: bigint) => (v < 0n ? -v : v);
  const diff = abs(a * q - p * b);
  if (diff === 0n) return 16;
  if (p === 0n) return Math.max(0, -Math.log10(ratioToNumber(diff, b * q)));
  const rel = ratioToNumber(diff, abs(p) * b);
  return Math.min(16, Math.max(0, -Math.log10(rel)));
}

export function rationalToNumber([p, q]: Rational): number {
  return p < 0n ? -ratioToNumber(-p, q) : ratioToNumber(p, q);
}
