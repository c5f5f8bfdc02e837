import { describe, it, expect } from 'vitest';
import { Matrix, inverse, SingularValueDecomposition } from 'ml-matrix';
import { unscaledCovariance, standardErrors, scaledCovariance } from '../../engine/stats/covariance';
import { randomMatrix, toRows } from '../linalg/random';
import { rng } from '../fixtures/random';

describe('engine/stats/covariance unscaledCovariance', () => {
  const next = rng(2024);

  it('equals ml-matrix inverse(JᵀJ) on random well-conditioned Jacobians (general-purpose library)', () => {
    for (const [n, p] of [[20, 3], [50, 6], [7, 7]]) {
      const jac = randomMatrix(n, p, next);
      for (let i = 0; i < n; i++) jac[i + (p - 1) * n] *= 50; // unequal column scales
      const cov = unscaledCovariance(jac, n, p);
      const J = new Matrix(toRows(jac, n, p));
      const ref = inverse(J.transpose().mmul(J));
      expect(cov.rank).toBe(p);
      expect(cov.rankDeficient).toBe(false);
      for (let i = 0; i < p; i++) {
        for (let j = 0; j < p; j++) {
          const s = Math.sqrt(ref.get(i, i) * ref.get(j, j));
          expect(cov.unscaled[i + j * p] / s).toBeCloseTo(ref.get(i, j) / s, 11);
        }
      }
      // Condition number of the column-scaled Jacobian vs ml-matrix SVD of J·S.
      const norms = Array.from({ length: p }, (_, j) => Math.hypot(...J.getColumn(j)));
      const JS = new Matrix(toRows(jac, n, p).map((row) => row.map((v, j) => v / norms[j])));
      const sv = new SingularValueDecomposition(JS).diagonal;
      expect(cov.condition / (Math.max(...sv) / Math.min(...sv))).toBeCloseTo(1, 10);
    }
  });

  it('standard errors and scaled covariance use s²', () => {
    const jac = randomMatrix(10, 2, next);
    const cov = unscaledCovariance(jac, 10, 2);
    const se = standardErrors(cov, 4);
    expect(se[1]).toBeCloseTo(2 * Math.sqrt(cov.unscaled[3]), 14);
    expect(scaledCovariance(cov, 4)[0][1]).toBeCloseTo(4 * cov.unscaled[2], 14);
  });

  it('flags rank deficiency and names the dependent parameter', () => {
    const n = 12;
    const jac = randomMatrix(n, 3, next);
    for (let i = 0; i < n; i++) jac[i + 2 * n] = jac[i] + jac[i + n];
    const cov = unscaledCovariance(jac, n, 3);
    expect(cov.rankDeficient).toBe(true);
    expect(cov.rank).toBe(2);
    expect(cov.dependent).toHaveLength(1);
    expect(cov.condition).toBe(Infinity);
    const d = cov.dependent[0];
    expect(Number.isNaN(cov.unscaled[d + d * 3])).toBe(true);
  });

  it('non-finite Jacobians, no rows and no parameters', () => {
    const bad = unscaledCovariance(Float64Array.from([1, NaN, 2, 3]), 2, 2);
    expect(bad.rankDeficient).toBe(true);
    expect(bad.unscaled.every((v) => Number.isNaN(v))).toBe(true);
    expect(unscaledCovariance(new Float64Array(0), 0, 2).rank).toBe(0);
    const none = unscaledCovariance(new Float64Array(0), 5, 0);
    expect(none.unscaled).toHaveLength(0);
    expect(none.rankDeficient).toBe(false);
  });
});

describe('engine/stats/covariance with a factorisation handed on (SolveOutcome.factor)', () => {
  const next = rng(99);

  it('uses a pivoted, column-scaled QR of the same Jacobian and gives the same bits as factoring again', async () => {
    const { PivotedQR } = await import('../../engine/linalg/qr');
    const n = 50;
    const p = 4;
    const jac = randomMatrix(n, p, next);
    const qr = new PivotedQR(n, p).factor(jac, n, p, { pivot: true, scale: true });
    const fresh = unscaledCovariance(jac, n, p);
    const reused = unscaledCovariance(jac, n, p, { factor: qr });
    expect(reused.factor).toBe(qr);
    expect(fresh.factor).not.toBe(qr);
    expect(Array.from(reused.unscaled)).toEqual(Array.from(fresh.unscaled));
    expect(Array.from(reused.core)).toEqual(Array.from(fresh.core));
    expect(reused.condition).toBe(fresh.condition);
  });

  it('ignores one made with other options or another rank tolerance (it factors again)', async () => {
    const { PivotedQR } = await import('../../engine/linalg/qr');
    const n = 30;
    const p = 3;
    const jac = randomMatrix(n, p, next);
    const unscaled = new PivotedQR(n, p).factor(jac, n, p, { pivot: true });
    expect(unscaledCovariance(jac, n, p, { factor: unscaled }).factor).not.toBe(unscaled);
    const scaled = new PivotedQR(n, p).factor(jac, n, p, { pivot: true, scale: true });
    expect(unscaledCovariance(jac, n, p, { factor: scaled, rankTolerance: 1e-6 }).factor).not.toBe(scaled);
    const other = new PivotedQR(n + 1, p).factor(randomMatrix(n + 1, p, next), n + 1, p, { pivot: true, scale: true });
    expect(unscaledCovariance(jac, n, p, { factor: other }).factor).not.toBe(other);
  });
});
