import { describe, it, expect } from 'vitest';
import { Matrix, inverse } from 'ml-matrix';
import { PivotedQR } from '../../engine/linalg/qr';
import { inverseR, inverseGram } from '../../engine/linalg/triangular';
import { randomMatrix, toRows } from './random';
import { rng } from '../fixtures/random';

describe('engine/linalg/triangular', () => {
  const next = rng(3);

  it('R⁻¹ is the inverse of R', () => {
    const a = randomMatrix(8, 4, next);
    const qr = new PivotedQR(8, 4).factor(a, 8, 4);
    const ri = inverseR(qr);
    for (let i = 0; i < 4; i++) {
      for (let j = 0; j < 4; j++) {
        let s = 0;
        for (let k = 0; k < 4; k++) s += qr.r(i, k) * ri[k + j * 4];
        expect(s).toBeCloseTo(i === j ? 1 : 0, 13);
      }
    }
  });

  it('(AᵀA)⁻¹ from scaled, pivoted R matches ml-matrix inverse(AᵀA) (general-purpose library)', () => {
    const [m, n] = [30, 5];
    const a = randomMatrix(m, n, next);
    for (let i = 0; i < m; i++) a[i + 3 * m] *= 1000;
    const g = inverseGram(new PivotedQR(m, n).factor(a, m, n, { scale: true }));
    const A = new Matrix(toRows(a, m, n));
    const ref = inverse(A.transpose().mmul(A));
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) expect(g[i + j * n] / Math.sqrt(ref.get(i, i) * ref.get(j, j))).toBeCloseTo(ref.get(i, j) / Math.sqrt(ref.get(i, i) * ref.get(j, j)), 10);
  });

  it('rank deficiency gives NaN rows and columns for the dependent parameter', () => {
    const [m, n] = [10, 3];
    const a = randomMatrix(m, n, next);
    for (let i = 0; i < m; i++) a[i + m] = 2 * a[i];
    const qr = new PivotedQR(m, n).factor(a, m, n, { scale: true });
    expect(qr.rank).toBe(2);
    const g = inverseGram(qr);
    const dependent = qr.perm[2];
    for (let k = 0; k < n; k++) {
      expect(Number.isNaN(g[dependent + k * n])).toBe(true);
      expect(Number.isNaN(g[k + dependent * n])).toBe(true);
    }
    expect(Number.isFinite(g[qr.perm[0] * (n + 1)])).toBe(true);
  });
});
