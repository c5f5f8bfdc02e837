import { describe, it, expect } from 'vitest';
import { PivotedQR } from '../../engine/linalg/qr';
import { solveDamped, copyR } from '../../engine/linalg/damped';
import { LMParameter } from '../../engine/solve/lm-parameter';
import { randomMatrix } from './random';
import { rng } from '../fixtures/random';

/** min‖[A; √λD]x − [b; 0]‖ by factoring the stacked matrix afresh (the reference). */
function stacked(a: Float64Array, m: number, n: number, d: Float64Array, lambda: number, b: Float64Array): Float64Array {
  const big = new Float64Array((m + n) * n);
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < m; i++) big[i + j * (m + n)] = a[i + j * m];
    big[m + j + j * (m + n)] = Math.sqrt(lambda) * d[j];
  }
  const rhs = new Float64Array(m + n);
  rhs.set(b);
  const x = new Float64Array(n);
  new PivotedQR(m + n, n).factor(big, m + n, n).solveLeastSquares(rhs, x);
  return x;
}

describe('engine/linalg/damped (Moré 1978 §3 Givens reduction)', () => {
  const next = rng(7);

  it('matches a fresh QR of the stacked system [A; √λD] for several λ', () => {
    const [m, n] = [15, 5];
    const a = randomMatrix(m, n, next);
    const b = randomMatrix(m, 1, next);
    const d = Float64Array.from({ length: n }, () => 0.5 + next());
    const qr = new PivotedQR(m, n).factor(a, m, n);
    for (const lambda of [0, 1e-6, 0.3, 10, 1e6]) {
      const x = new Float64Array(n);
      solveDamped(qr, d, lambda, Float64Array.from(b), x);
      const ref = stacked(a, m, n, d, lambda, b);
      for (let j = 0; j < n; j++) expect(x[j]).toBeCloseTo(ref[j], 11);
    }
  });

  it('damping regularises a singular matrix', () => {
    const [m, n] = [6, 2];
    const a = randomMatrix(m, n, next);
    for (let i = 0; i < m; i++) a[i + m] = 3 * a[i];
    const b = randomMatrix(m, 1, next);
    const d = Float64Array.from([1, 1]);
    const x = new Float64Array(n);
    solveDamped(new PivotedQR(m, n).factor(a, m, n), d, 0.5, Float64Array.from(b), x);
    const ref = stacked(a, m, n, d, 0.5, b);
    for (let j = 0; j < n; j++) expect(x[j]).toBeCloseTo(ref[j], 11);
  });
});

describe('engine/solve/lm-parameter (Moré 1978 §5 λ iteration)', () => {
  const next = rng(11);

  it('finds λ with ‖Dx‖ within 10% of Δ, or λ = 0 when the Gauss–Newton step fits', () => {
    const [m, n] = [12, 4];
    const a = randomMatrix(m, n, next);
    const r = randomMatrix(m, 1, next);
    const diag = Float64Array.from({ length: n }, () => 0.5 + next());
    const qr = new PivotedQR(m, n).factor(a, m, n);
    const qtb = Float64Array.from(r);
    qr.applyQt(qtb);
    const lm = new LMParameter(n);
    const rr = new Float64Array(n * n);
    const x = new Float64Array(n);
    const gn = new Float64Array(n);
    new PivotedQR(m, n).factor(a, m, n).solveLeastSquares(Float64Array.from(r), gn);
    const gnNorm = Math.hypot(...Array.from(gn, (v, j) => v * diag[j]));
    for (const delta of [gnNorm * 0.01, gnNorm * 0.3, gnNorm * 0.95, gnNorm * 2]) {
      copyR(qr, rr);
      const par = lm.compute(n, rr, qr.perm, diag, qtb.subarray(0, n), delta, 0, x);
      const dx = Math.hypot(...Array.from(x, (v, j) => v * diag[j]));
      if (gnNorm <= 1.1 * delta) {
        expect(par).toBe(0);
        for (let j = 0; j < n; j++) expect(x[j]).toBeCloseTo(gn[j], 12);
      } else {
        expect(par).toBeGreaterThan(0);
        expect(Math.abs(dx - delta)).toBeLessThanOrEqual(0.1 * delta);
        const ref = stacked(a, m, n, diag, par, r);
        for (let j = 0; j < n; j++) expect(x[j]).toBeCloseTo(ref[j], 10);
      }
    }
  });
});
