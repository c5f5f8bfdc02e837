import { describe, it, expect } from 'vitest';
import { PivotedQR } from '../../engine/linalg/qr';
import { refineLeastSquares } from '../../engine/solve/refine';
import { rng } from '../fixtures/random';

/** Integer matrix with nearly dependent columns, integer truth, exact right-hand side. */
function consistentSystem(seed: number) {
  const next = rng(seed);
  const [n, p] = [12, 4];
  const a = new Float64Array(n * p);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < 3; j++) a[i + j * n] = Math.round(2000 * next() - 1000);
    // Column 4 = column 1 + column 2 + a tiny integer perturbation (κ ≈ 1e5).
    a[i + 3 * n] = a[i] + a[i + n] + (i % 3 === 0 ? 1 : 0);
  }
  const truth = [3, -7, 11, 5];
  const b = new Float64Array(n);
  for (let i = 0; i < n; i++) for (let j = 0; j < p; j++) b[i] += a[i + j * n] * truth[j];
  return { a, b, n, p, truth };
}

describe('engine/solve/refine Björck refinement on the augmented system', () => {
  it('recovers an integer solution exactly where plain QR is off in the last digits', () => {
    let plainWorse = 0;
    for (const seed of [1, 2, 3, 4, 5]) {
      const { a, b, n, p, truth } = consistentSystem(seed);
      const qr = new PivotedQR(n, p).factor(a, n, p, { scale: true });
      const x = new Float64Array(p);
      qr.solveLeastSquares(Float64Array.from(b), x);
      const plainErr = Math.max(...truth.map((t, j) => Math.abs(x[j] - t)));
      const steps = refineLeastSquares({ qr, n, p, aHi: a, aLo: null, bHi: b, bLo: null }, x);
      expect(steps).toBeGreaterThan(0);
      expect(Array.from(x)).toEqual(truth);
      if (plainErr > 0) plainWorse++;
    }
    expect(plainWorse).toBeGreaterThan(0);
  });

  it('uses the low parts of A and b: a problem given as hi + lo is solved to the combined accuracy', () => {
    // A = Ahi + Alo with Alo tiny; b = (Ahi + Alo)·truth exactly represented as hi + lo.
    const n = 6;
    const aHi = Float64Array.from([1, 1, 1, 1, 1, 1, 0, 1, 2, 3, 4, 5]);
    const aLo = Float64Array.from([0, 0, 0, 0, 0, 0, 2 ** -60, 2 ** -60, 2 ** -60, 2 ** -60, 2 ** -60, 2 ** -60]);
    const truth = [1, 2 ** 10];
    const bHi = new Float64Array(n);
    const bLo = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      bHi[i] = aHi[i] * truth[0] + aHi[n + i] * truth[1];
      bLo[i] = aLo[n + i] * truth[1]; // 2^-50 each, exact
    }
    const qr = new PivotedQR(n, 2).factor(aHi, n, 2, { scale: true });
    const x = new Float64Array(2);
    qr.solveLeastSquares(Float64Array.from(bHi), x);
    refineLeastSquares({ qr, n, p: 2, aHi, aLo, bHi, bLo }, x);
    expect(x[0]).toBe(truth[0]);
    expect(x[1]).toBe(truth[1]);
  });

  it('does nothing for rank-deficient factorisations or zero steps', () => {
    const a = Float64Array.from([1, 2, 3, 2, 4, 6]);
    const qr = new PivotedQR(3, 2).factor(a, 3, 2, { scale: true });
    expect(qr.rank).toBe(1);
    const x = Float64Array.from([0.5, 0.25]);
    expect(refineLeastSquares({ qr, n: 3, p: 2, aHi: a, aLo: null, bHi: Float64Array.from([1, 2, 3]), bLo: null }, x)).toBe(0);
    expect(Array.from(x)).toEqual([0.5, 0.25]);
    const full = new PivotedQR(3, 1).factor(Float64Array.from([1, 2, 3]), 3, 1);
    expect(refineLeastSquares({ qr: full, n: 3, p: 1, aHi: Float64Array.from([1, 2, 3]), aLo: null, bHi: Float64Array.from([1, 2, 3]), bLo: null, maxSteps: 0 }, x)).toBe(0);
  });
});
