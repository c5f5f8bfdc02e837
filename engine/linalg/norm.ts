/**
 * Euclidean norms safe from overflow and underflow. The fast path sums
 * squares directly; when that sum overflows or falls below 1e-290 (where
 * squares of small entries lose accuracy by underflow, down to a sum of 0
 * for entries below about 1e-162) the entries are rescaled by the largest
 * magnitude first, as in LAPACK's dnrm2 design
 * (J. L. Blue, "A portable Fortran program to find the Euclidean norm of a
 * vector", ACM TOMS 4 (1978) 15-23, gives the threshold analysis).
 * NaN entries give NaN.
 */

const TINY_SUM = 1e-290;

/** ‖x[offset … offset+length)‖₂. */
export function norm2(x: ArrayLike<number>, offset = 0, length = x.length - offset): number {
  let s = 0;
  const end = offset + length;
  for (let i = offset; i < end; i++) s += x[i] * x[i];
  if (s < Infinity && s > TINY_SUM) return Math.sqrt(s);
  // s = 0 is no proof of a zero vector: squares of entries below ~1e-162 underflow to 0
  if (Number.isNaN(s)) return s;
  let big = 0;
  for (let i = offset; i < end; i++) {
    const a = Math.abs(x[i]);
    if (a > big) big = a;
  }
  if (big === Infinity || big === 0 || Number.isNaN(big)) return big;
  let t = 0;
  for (let i = offset; i < end; i++) {
    const r = x[i] / big;
    t += r * r;
  }
  return big * Math.sqrt(t);
}

/** ‖D·x‖₂ for a diagonal D given as a vector. */
export function scaledNorm2(d: ArrayLike<number>, x: ArrayLike<number>, length: number, work: Float64Array): number {
  for (let i = 0; i < length; i++) work[i] = d[i] * x[i];
  return norm2(work, 0, length);
}

/** Machine epsilon 2⁻⁵², the spacing of doubles at 1. */
export const EPSILON = 2.220446049250313e-16;
/** Smallest positive normal double. */
export const TINY = 2.2250738585072014e-308;
