/**
 * Sobol' low-discrepancy points in the unit cube (I. M. Sobol', "On the
 * distribution of points in a cube and the approximate evaluation of
 * integrals", USSR Comput. Math. Math. Phys. 7 (1967) 86–112), generated in
 * Gray-code order (Antonov & Saleev 1979; P. Bratley & B. L. Fox, "Algorithm
 * 659", ACM TOMS 14 (1988) 88–100) with the direction numbers of S. Joe and
 * F. Y. Kuo, "Constructing Sobol sequences with better two-dimensional
 * projections", SIAM J. Sci. Comput. 30 (2008) 2635–2654 (their file
 * new-joe-kuo-6.21201, first 21 dimensions). Unscrambled and deterministic;
 * the test compares the points with a general-purpose library's unscrambled
 * generator.
 */

/** Primitive polynomial degree s, coefficients a and initial direction numbers m₁…m_s for dimensions 2…21 (Joe & Kuo 2008). */
const DIRECTIONS: readonly [s: number, a: number, m: readonly number[]][] = [
  [1, 0, [1]],
  [2, 1, [1, 3]],
  [3, 1, [1, 3, 1]],
  [3, 2, [1, 1, 1]],
  [4, 1, [1, 1, 3, 3]],
  [4, 4, [1, 3, 5, 13]],
  [5, 2, [1, 1, 5, 5, 17]],
  [5, 4, [1, 1, 5, 5, 5]],
  [5, 7, [1, 1, 7, 11, 19]],
  [5, 11, [1, 1, 5, 1, 1]],
  [5, 13, [1, 1, 1, 3, 11]],
  [5, 14, [1, 3, 5, 5, 31]],
  [6, 1, [1, 3, 3, 9, 7, 49]],
  [6, 13, [1, 1, 1, 15, 21, 21]],
  [6, 16, [1, 3, 1, 13, 27, 49]],
  [6, 19, [1, 1, 1, 15, 7, 5]],
  [6, 22, [1, 3, 1, 15, 13, 25]],
  [6, 25, [1, 1, 5, 5, 19, 61]],
  [7, 1, [1, 3, 7, 11, 23, 15, 103]],
  [7, 4, [1, 3, 7, 13, 13, 15, 69]],
];

/** Highest dimension supported. */
export const SOBOL_MAX_DIMENSION = DIRECTIONS.length + 1;
const BITS = 32;

function directionNumbers(dim: number): Uint32Array {
  const v = new Uint32Array(BITS + 1);
  if (dim === 0) {
    for (let i = 1; i <= BITS; i++) v[i] = 2 ** (BITS - i);
    return v;
  }
  const [s, a, m] = DIRECTIONS[dim - 1];
  for (let i = 1; i <= s; i++) v[i] = m[i - 1] * 2 ** (BITS - i);
  for (let i = s + 1; i <= BITS; i++) {
    let x = (v[i - s] ^ (v[i - s] >>> s)) >>> 0;
    for (let k = 1; k < s; k++) if ((a >>> (s - 1 - k)) & 1) x = (x ^ v[i - k]) >>> 0;
    v[i] = x;
  }
  return v;
}

/**
 * The first `count` points of the d-dimensional Sobol' sequence after the
 * origin (the origin itself, a corner of the cube, is skipped), as rows of
 * numbers in [0, 1).
 */
export function sobolPoints(d: number, count: number): number[][] {
  if (!(d >= 1 && d <= SOBOL_MAX_DIMENSION)) throw new RangeError(`Sobol' points: dimension ${d} outside 1…${SOBOL_MAX_DIMENSION}`);
  const dirs = Array.from({ length: d }, (_, k) => directionNumbers(k));
  const x = new Uint32Array(d);
  const out: number[][] = [];
  for (let i = 1; i <= count; i++) {
    // Gray code: point i differs from point i − 1 in the direction number of the lowest zero bit of i − 1.
    let c = 1;
    let j = i - 1;
    while (j & 1) {
      j >>>= 1;
      c++;
    }
    const row = new Array<number>(d);
    for (let k = 0; k < d; k++) {
      x[k] = (x[k] ^ dirs[k][c]) >>> 0;
      row[k] = x[k] / 2 ** BITS;
    }
    out.push(row);
  }
  return out;
}
