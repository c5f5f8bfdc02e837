/**
 * Double-double arithmetic: a value is an unevaluated sum hi + lo of two
 * doubles with |lo| ≤ ulp(hi)/2, about 106 bits of significand. Used where
 * double precision is not enough: forming residuals in iterative refinement
 * and evaluating design matrices of linear models.
 *
 * Algorithms: TwoSum (Knuth, TAOCP vol. 2, §4.2.2), Dekker's splitting and
 * exact product without FMA (T. J. Dekker, "A floating-point technique for
 * extending the available precision", Numer. Math. 18 (1971) 224-242), and
 * the double-double add/mul/div/sqrt of Hida, Li & Bailey, "Algorithms for
 * quad-double precision floating point arithmetic" (ARITH-15, 2001), §3-4.
 *
 * Results go to the two-slot scratch array `DD_OUT` (hi, lo) so that no
 * objects are allocated; read both slots before the next call. (The
 * refinement loops in `solve/refine.ts` inline the same TwoSum/Dekker steps.)
 */

export const DD_OUT = new Float64Array(2);
const R = DD_OUT;

/** 2^27 + 1, Dekker's splitting constant for 53-bit doubles. */
const SPLITTER = 134217729;

/** Exact product a·b = p + e (Dekker 1971, mul12). Valid for |a|, |b| < 2^996. */
export function twoProd(a: number, b: number): void {
  const p = a * b;
  let t = SPLITTER * a;
  const ah = t - (t - a);
  const al = a - ah;
  t = SPLITTER * b;
  const bh = t - (t - b);
  const bl = b - bh;
  R[0] = p;
  R[1] = ((ah * bh - p) + ah * bl + al * bh) + al * bl;
}

/** (ah + al) + (bh + bl), the accurate ("IEEE-style") addition of Hida, Li & Bailey. */
export function ddAdd(ah: number, al: number, bh: number, bl: number): void {
  let s = ah + bh;
  let bb = s - ah;
  let e = (ah - (s - bb)) + (bh - bb);
  const t = al + bl;
  bb = t - al;
  const f = (al - (t - bb)) + (bl - bb);
  e += t;
  let h = s + e;
  e = e - (h - s);
  s = h;
  e += f;
  h = s + e;
  R[0] = h;
  R[1] = e - (h - s);
}

export function ddSub(ah: number, al: number, bh: number, bl: number): void {
  ddAdd(ah, al, -bh, -bl);
}

export function ddMul(ah: number, al: number, bh: number, bl: number): void {
  twoProd(ah, bh);
  const p = R[0];
  const e = R[1] + (ah * bl + al * bh);
  const h = p + e;
  R[0] = h;
  R[1] = e - (h - p);
}

export function ddDiv(ah: number, al: number, bh: number, bl: number): void {
  const q1 = ah / bh;
  ddMul(q1, 0, bh, bl);
  ddSub(ah, al, R[0], R[1]);
  let rh = R[0];
  let rl = R[1];
  const q2 = rh / bh;
  ddMul(q2, 0, bh, bl);
  ddSub(rh, rl, R[0], R[1]);
  rh = R[0];
  rl = R[1];
  const q3 = rh / bh;
  const h = q1 + q2;
  const l = q2 - (h - q1);
  ddAdd(h, l, q3, 0);
}

/** √(ah + al) by one Newton step from the double square root (Karp & Markstein 1997). */
export function ddSqrt(ah: number, al: number): void {
  if (!(ah > 0)) {
    R[0] = Math.sqrt(ah);
    R[1] = 0;
    return;
  }
  const q = Math.sqrt(ah);
  twoProd(q, q);
  ddSub(ah, al, R[0], R[1]);
  const corr = R[0] / (2 * q);
  const h = q + corr;
  R[0] = h;
  R[1] = corr - (h - q);
}

/** (ah + al)^k for an integer k by binary powering (k = 0 gives 1). */
export function ddPowInt(ah: number, al: number, k: number): void {
  let bh = ah;
  let bl = al;
  let rh = 1;
  let rl = 0;
  let m = Math.abs(k);
  while (m > 0) {
    if (m & 1) {
      ddMul(rh, rl, bh, bl);
      rh = R[0];
      rl = R[1];
    }
    m >>>= 1;
    if (m > 0) {
      ddMul(bh, bl, bh, bl);
      bh = R[0];
      bl = R[1];
    }
  }
  if (k < 0) {
    ddDiv(1, 0, rh, rl);
    return;
  }
  R[0] = rh;
  R[1] = rl;
}
