/** Deterministic pseudo-random numbers for tests (mulberry32 generator, public-domain common practice). */
export function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** m×n column-major matrix with entries uniform in (−1, 1). */
export function randomMatrix(m: number, n: number, next: () => number): Float64Array {
  return Float64Array.from({ length: m * n }, () => 2 * next() - 1);
}

/** Rows of a column-major m×n matrix, for ml-matrix. */
export function toRows(a: Float64Array, m: number, n: number): number[][] {
  return Array.from({ length: m }, (_, i) => Array.from({ length: n }, (_, j) => a[i + j * m]));
}
