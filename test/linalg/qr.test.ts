import { describe, it, expect } from 'vitest';
import { Matrix, QrDecomposition } from 'ml-matrix';
import { PivotedQR, defaultRankTolerance } from '../../engine/linalg/qr';
import { randomMatrix, toRows } from './random';
import { rng } from '../fixtures/random';

/** max |(Q·R)[:, j] − (A·S)[:, perm[j]]| over all columns. */
function reconstructionError(qr: PivotedQR, a: Float64Array): number {
  const { m, n } = qr;
  let worst = 0;
  const v = new Float64Array(m);
  for (let j = 0; j < n; j++) {
    v.fill(0);
    for (let i = 0; i <= Math.min(j, m - 1); i++) v[i] = qr.r(i, j);
    qr.applyQ(v);
    const c = qr.perm[j];
    for (let i = 0; i < m; i++) worst = Math.max(worst, Math.abs(v[i] - a[i + c * m] * qr.scale[c]));
  }
  return worst;
}

describe('engine/linalg/qr PivotedQR (Householder with column pivoting)', () => {
  const next = rng(42);

  it('reconstructs Q·R = A·S·P for tall, square and wide matrices, scaled or not', () => {
    for (const [m, n] of [[12, 5], [6, 6], [3, 7], [40, 11]]) {
      for (const scale of [false, true]) {
        const a = randomMatrix(m, n, next);
        const qr = new PivotedQR(m, n).factor(a, m, n, { scale });
        expect(reconstructionError(qr, a)).toBeLessThan(1e-14 * Math.max(m, n));
        expect(qr.rank).toBe(Math.min(m, n));
        // Pivoting makes |R_kk| non-increasing.
        for (let k = 1; k < Math.min(m, n); k++) expect(Math.abs(qr.rdiag[k])).toBeLessThanOrEqual(Math.abs(qr.rdiag[k - 1]) * (1 + 1e-12));
      }
    }
  });

  it('Q is orthogonal: QᵀQ·v = v and ‖Qv‖ = ‖v‖', () => {
    const a = randomMatrix(9, 4, next);
    const qr = new PivotedQR(9, 4).factor(a, 9, 4);
    const v = randomMatrix(9, 1, next);
    const w = Float64Array.from(v);
    qr.applyQ(w);
    const norm = (x: Float64Array) => Math.hypot(...x);
    expect(norm(w)).toBeCloseTo(norm(v), 14);
    qr.applyQt(w);
    for (let i = 0; i < 9; i++) expect(w[i]).toBeCloseTo(v[i], 14);
  });

  it('least-squares solutions match ml-matrix QR (general-purpose library)', () => {
    for (let trial = 0; trial < 5; trial++) {
      const [m, n] = [20, 6];
      const a = randomMatrix(m, n, next);
      const b = randomMatrix(m, 1, next);
      const x = new Float64Array(n);
      new PivotedQR(m, n).factor(a, m, n, { scale: true }).solveLeastSquares(Float64Array.from(b), x);
      const ref = new QrDecomposition(new Matrix(toRows(a, m, n))).solve(Matrix.columnVector(Array.from(b)));
      for (let j = 0; j < n; j++) expect(x[j]).toBeCloseTo(ref.get(j, 0), 12);
    }
  });

  it('rank-deficient: a dependent column is detected and its coefficient set to zero', () => {
    const [m, n] = [10, 3];
    const a = randomMatrix(m, n, next);
    for (let i = 0; i < m; i++) a[i + 2 * m] = a[i] - 2 * a[i + m];
    const qr = new PivotedQR(m, n).factor(a, m, n, { scale: true });
    expect(qr.rank).toBe(2);
    const b = randomMatrix(m, 1, next);
    const x = new Float64Array(n);
    qr.solveLeastSquares(Float64Array.from(b), x);
    expect(x.filter((v) => v === 0)).toHaveLength(1);
    // Normal-equation residual Aᵀ(b − Ax) vanishes at a least-squares solution.
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let i = 0; i < m; i++) {
        let r = b[i];
        for (let k = 0; k < n; k++) r -= a[i + k * m] * x[k];
        s += a[i + j * m] * r;
      }
      expect(Math.abs(s)).toBeLessThan(1e-12);
    }
  });

  it('the rank tolerance is relative to |R_00| and can be set', () => {
    const [m, n] = [8, 2];
    const a = randomMatrix(m, n, next);
    for (let i = 0; i < m; i++) a[i + m] = a[i] * (1 + 1e-10 * (i % 3));
    expect(new PivotedQR(m, n).factor(a, m, n, { scale: true }).rank).toBe(2);
    expect(new PivotedQR(m, n).factor(a, m, n, { scale: true, rankTolerance: 1e-8 }).rank).toBe(1);
    expect(defaultRankTolerance(8, 2)).toBeCloseTo(80 * 2 ** -52, 30);
  });

  it('column scaling copes with columns 1e300 apart', () => {
    const [m, n] = [6, 2];
    const a = randomMatrix(m, n, next);
    for (let i = 0; i < m; i++) { a[i] *= 1e150; a[i + m] *= 1e-150; }
    const qr = new PivotedQR(m, n).factor(a, m, n, { scale: true });
    expect(qr.rank).toBe(2);
    expect(reconstructionError(qr, a)).toBeLessThan(1e-14);
  });

  it('singular, one-row and empty matrices', () => {
    const zero = new PivotedQR(4, 3).factor(new Float64Array(12), 4, 3, { scale: true });
    expect(zero.rank).toBe(0);
    const x = Float64Array.from([7, 7, 7]);
    zero.solveLeastSquares(Float64Array.from([1, 2, 3, 4]), x);
    expect(Array.from(x)).toEqual([0, 0, 0]);

    const row = Float64Array.from([2, -1, 4]);
    const one = new PivotedQR(1, 3).factor(row, 1, 3);
    expect(one.rank).toBe(1);
    const x1 = new Float64Array(3);
    one.solveLeastSquares(Float64Array.from([8]), x1);
    expect(2 * x1[0] - x1[1] + 4 * x1[2]).toBeCloseTo(8, 14);

    for (const [m, n] of [[0, 0], [0, 3], [3, 0]]) {
      const e = new PivotedQR(m, n).factor(new Float64Array(0), m, n);
      expect(e.rank).toBe(0);
      const xe = new Float64Array(n);
      e.solveLeastSquares(new Float64Array(m), xe);
      expect(Array.from(xe)).toEqual(new Array(n).fill(0));
    }
  });

  it('refuses matrices larger than its buffers', () => {
    expect(() => new PivotedQR(2, 2).factor(new Float64Array(9), 3, 3)).toThrow(RangeError);
  });
});
