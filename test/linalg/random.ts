/** Matrix helpers for the linear-algebra tests; seeded uniforms come from `rng` in ../fixtures/random. */

/** m×n column-major matrix with entries uniform in (−1, 1). */
export function randomMatrix(m: number, n: number, next: () => number): Float64Array {
  return Float64Array.from({ length: m * n }, () => 2 * next() - 1);
}

/** Rows of a column-major m×n matrix, for ml-matrix. */
export function toRows(a: Float64Array, m: number, n: number): number[][] {
  return Array.from({ length: m }, (_, i) => Array.from({ length: n }, (_, j) => a[i + j * m]));
}
