import { describe, it, expect } from 'vitest';
import { radixOrder } from '../../engine/stats/radix-order';
import { rng } from '../fixtures/random';

/** The comparison sort it replaces: keys in column order, then the row index. */
function comparatorOrder(columns: number[][], n: number): number[] {
  const idx = Array.from({ length: n }, (_, i) => i);
  return idx.sort((a, b) => {
    for (const c of columns) if (c[a] !== c[b]) return c[a] < c[b] ? -1 : 1;
    return a - b;
  });
}

describe('engine/stats/radix-order radixOrder', () => {
  const next = rng(11);

  it('gives the order of a comparison sort with ties in row order: negatives, −0 and +0, subnormals, huge values, ±∞', () => {
    const pool = [0, -0, 1, -1, 1e-310, -1e-310, 5e-324, 1e300, -1e300, Infinity, -Infinity, 0.1, 0.30000000000000004, 2 ** 53, -(2 ** 53)];
    for (const n of [0, 1, 2, 7, 1000, 5000]) {
      const col = Array.from({ length: n }, () => (next() < 0.5 ? pool[Math.floor(next() * pool.length)] : (next() - 0.5) * 10 ** Math.floor(next() * 40 - 20)));
      expect(Array.from(radixOrder([col], n))).toEqual(comparatorOrder([col], n));
    }
  });

  it('sorts lexicographically over several columns (first column first)', () => {
    const n = 3000;
    const a = Array.from({ length: n }, () => Math.floor(next() * 5));
    const b = Array.from({ length: n }, () => Math.floor(next() * 3) - 1.5);
    const c = Array.from({ length: n }, () => next());
    expect(Array.from(radixOrder([a, b, c], n))).toEqual(comparatorOrder([a, b, c], n));
    expect(Array.from(radixOrder([a, b], n))).toEqual(comparatorOrder([a, b], n));
  });
});
