import { describe, it, expect } from 'vitest';
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import { PivotedQR } from '../../engine/linalg/qr';
import { refineLeastSquares } from '../../engine/solve/refine';
import { refineSeminormal, residualGradient, conditionBound } from '../../engine/solve/seminormal';
import { solveLinear, SEMINORMAL_MIN_ROWS } from '../../engine/solve/linear';
import { exact } from '../linalg/exact';
import { fitProblem, noise } from './problems';
import { rng } from '../fixtures/random';

/** Tall integer design (n×p), integer truth; b = A·truth (+ an integer offset per row when `resid`). */
function tallSystem(n: number, seed: number, resid: boolean) {
  const next = rng(seed);
  const p = 4;
  const a = new Float64Array(n * p);
  for (let i = 0; i < n; i++) {
    a[i] = 1;
    for (let j = 1; j < p; j++) a[i + j * n] = Math.round(2000 * next() - 1000);
  }
  const truth = [3, -7, 11, 5];
  const b = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < p; j++) b[i] += a[i + j * n] * truth[j];
    if (resid) b[i] += Math.round(1e6 * (next() - 0.5));
  }
  return { a, b, n, p, truth };
}

/** QR of J plus the augmented refinement (refine.ts, checked on NIST StRD) on the problem's double-double form at θ = 0: the reference solution. */
function augmentedReference(problem: ReturnType<typeof fitProblem>, n: number, p: number, qr: PivotedQR): Float64Array {
  const jh = new Float64Array(n * p);
  const jl = new Float64Array(n * p);
  const rh = new Float64Array(n);
  const rl = new Float64Array(n);
  problem.jacobianExtended!(new Float64Array(p), jh, jl);
  problem.residualsExtended!(new Float64Array(p), rh, rl);
  const b = Float64Array.from(rh, (v) => -v);
  const bl = Float64Array.from(rl, (v) => -v);
  const x = new Float64Array(p);
  qr.solveLeastSquares(Float64Array.from(b), x);
  refineLeastSquares({ qr, n, p, aHi: jh, aLo: jl, bHi: b, bLo: bl }, x);
  return x;
}

describe('engine/solve/seminormal corrected seminormal equations', () => {
  it('residualGradient: Aᵀ(b − A·x) against exact rational arithmetic (BigInt on the 2⁻¹⁰⁷⁴ grid)', () => {
    const next = rng(3);
    const [n, p] = [50, 3];
    const a = Float64Array.from({ length: n * p }, () => next() * 10 - 5);
    const b = Float64Array.from({ length: n }, () => next() * 100);
    const x = Float64Array.from([0.3, -1.7, 2.1]);
    const g = new Float64Array(p);
    residualGradient(n, p, a, null, b, null, x, g, new Float64Array(4 * p));
    // exact: f = b − A·x on scale 2^-1074 (A·x on 2^-2148, so b is lifted), g on scale 2^-3222
    const S = 1n << 1074n;
    for (let j = 0; j < p; j++) {
      let want = 0n;
      for (let i = 0; i < n; i++) {
        let f = exact(b[i]) * S;
        for (let k = 0; k < p; k++) f -= exact(a[i + k * n]) * exact(x[k]);
        want += exact(a[i + j * n]) * f;
      }
      // compare g[j] (a double) with want / 2^3222 to a relative 2^-50
      const got = exact(g[j]) * S * S;
      const diff = got - want;
      expect((diff < 0n ? -diff : diff) << 50n <= (want < 0n ? -want : want)).toBe(true);
    }
  });

  it('recovers an integer solution exactly on a tall consistent system', () => {
    const { a, b, n, p, truth } = tallSystem(3000, 1, false);
    const qr = new PivotedQR(n, p).factor(a, n, p, { scale: true });
    const x = new Float64Array(p);
    qr.solveLeastSquares(Float64Array.from(b), x);
    const o = refineSeminormal({ qr, n, p, aHi: a, aLo: null, bHi: b, bLo: null }, x);
    expect(o.converged).toBe(true);
    expect(Array.from(x)).toEqual(truth);
  });

  it('large residuals: the same solution as the augmented refinement (refine.ts, checked on NIST StRD) to 2 ulps', () => {
    for (const seed of [2, 5, 8]) {
      const { a, b, n, p } = tallSystem(4000, seed, true);
      const qr = new PivotedQR(n, p).factor(a, n, p, { scale: true });
      const x0 = new Float64Array(p);
      qr.solveLeastSquares(Float64Array.from(b), x0);
      const xs = Float64Array.from(x0);
      const xa = Float64Array.from(x0);
      const o = refineSeminormal({ qr, n, p, aHi: a, aLo: null, bHi: b, bLo: null }, xs);
      refineLeastSquares({ qr, n, p, aHi: a, aLo: null, bHi: b, bLo: null }, xa);
      expect(o.converged).toBe(true);
      for (let j = 0; j < p; j++) expect(Math.abs(xs[j] - xa[j])).toBeLessThanOrEqual(2 * Number.EPSILON * Math.abs(xa[j]));
    }
  });

  it('conditionBound is an upper bound on κ₂ of R (singular values by ml-matrix)', () => {
    const { a, n, p } = tallSystem(200, 4, false);
    for (let i = 0; i < n; i++) a[i + 3 * n] = a[i + n] + a[i + 2 * n] + 1e-3 * (i % 2); // near-dependent column
    const qr = new PivotedQR(n, p).factor(a, n, p, { scale: true });
    const rows = Array.from({ length: p }, (_, i) => Array.from({ length: p }, (_, j) => qr.r(i, j)));
    const sv = new SingularValueDecomposition(new Matrix(rows)).diagonal;
    const kappa = Math.max(...sv) / Math.min(...sv);
    const bound = conditionBound(qr, p);
    expect(bound).toBeGreaterThanOrEqual(kappa * (1 - 1e-10));
    expect(bound).toBeLessThanOrEqual(p * kappa);
  });

  it('solveLinear: a tall ill-conditioned polynomial (κ far above the gate) still reaches the augmented refinement’s answer', () => {
    // degree 6 on x in [10, 11]: κ(J·S) ≈ 1e10, so the seminormal path is skipped (or discarded)
    const n = SEMINORMAL_MIN_ROWS + 500;
    const xs = Array.from({ length: n }, (_, i) => 10 + i / (n - 1));
    const y = xs.map((x, i) => 1 + x + x ** 2 / 10 + x ** 3 / 100 + x ** 4 / 1e3 + x ** 5 / 1e4 + x ** 6 / 1e5 + 1e-3 * noise(i));
    const params = ['b0', 'b1', 'b2', 'b3', 'b4', 'b5', 'b6'];
    const model = 'b0 + b1*x + b2*x^2 + b3*x^3 + b4*x^4 + b5*x^5 + b6*x^6';
    const out = solveLinear(fitProblem(model, params, xs, y));
    const problem = fitProblem(model, params, xs, y);
    const jac = new Float64Array(n * 7);
    problem.jacobian(new Float64Array(7), jac);
    const qr = new PivotedQR(n, 7).factor(jac, n, 7, { scale: true });
    expect(conditionBound(qr, 7)).toBeGreaterThan(1e4);
    const x = augmentedReference(problem, n, 7, qr);
    expect(Array.from(out.theta)).toEqual(Array.from(x));
  });

  it('solveLinear: a tall well-conditioned cubic (condition bound below the gate, so the seminormal refinement runs) matches the augmented refinement to 2 ulps', () => {
    const n = SEMINORMAL_MIN_ROWS + 977;
    const xs = Array.from({ length: n }, (_, i) => -2 + (4 * i) / (n - 1));
    const y = xs.map((x, i) => 1.5 - 0.8 * x + 0.3 * x * x + 0.05 * x ** 3 + 0.2 * noise(i));
    const model = 'a + b*x + c*x^2 + d*x^3';
    const problem = fitProblem(model, ['a', 'b', 'c', 'd'], xs, y);
    const out = solveLinear(problem);
    const qr = out.factor!;
    expect(conditionBound(qr, 4)).toBeLessThan(1e4);
    const x = augmentedReference(problem, n, 4, qr);
    for (let j = 0; j < 4; j++) expect(Math.abs(out.theta[j] - x[j])).toBeLessThanOrEqual(2 * Number.EPSILON * Math.abs(x[j]));
  });
});
