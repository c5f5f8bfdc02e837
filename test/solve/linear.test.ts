import { describe, it, expect } from 'vitest';
import { Matrix, solve } from 'ml-matrix';
import { solveLinear } from '../../engine/solve/linear';
import { fitProblem, noise } from './problems';

const xs = Array.from({ length: 21 }, (_, i) => i);

describe('engine/solve/linear solveLinear', () => {
  it('recovers an exact quadratic exactly', () => {
    const y = xs.map((x) => 1 + 2 * x - 0.5 * x * x);
    const out = solveLinear(fitProblem('a + b*x + c*x^2', ['a', 'b', 'c'], xs, y));
    expect(out.stop.code).toBe('exact');
    expect(out.stop.converged).toBe(true);
    expect(out.rank).toBe(3);
    expect(out.theta[0]).toBeCloseTo(1, 13);
    expect(out.theta[1]).toBeCloseTo(2, 13);
    expect(out.theta[2]).toBeCloseTo(-0.5, 14);
    expect(out.cost).toBeLessThan(1e-25);
    expect(out.jacobianEvaluations).toBe(1);
  });

  it('weighted fit equals the weighted normal-equation solution of ml-matrix (general-purpose library)', () => {
    const y = xs.map((x, i) => 3 - 0.2 * x + 0.3 * noise(i));
    const w = xs.map((_, i) => 0.5 + (i % 4));
    const out = solveLinear(fitProblem('a + b*x', ['a', 'b'], xs, y, { sqrtWeights: w.map(Math.sqrt) }));
    const X = new Matrix(xs.map((x) => [1, x]));
    const W = Matrix.diag(w);
    const ref = solve(X.transpose().mmul(W).mmul(X), X.transpose().mmul(W).mmul(Matrix.columnVector(y)));
    expect(out.theta[0]).toBeCloseTo(ref.get(0, 0), 12);
    expect(out.theta[1]).toBeCloseTo(ref.get(1, 0), 12);
    // Residuals are √w·(y − f).
    expect(out.residuals[5]).toBeCloseTo(Math.sqrt(w[5]) * (y[5] - out.theta[0] - out.theta[1] * 5), 12);
  });

  it('refinement reaches full accuracy on exact degree-5 data where plain QR loses digits', () => {
    // y = 1 + x + … + x⁵ on x = 0…20: integers, exactly representable; truth all ones.
    const y = xs.map((x) => 1 + x + x ** 2 + x ** 3 + x ** 4 + x ** 5);
    const problem = fitProblem('b0 + b1*x + b2*x^2 + b3*x^3 + b4*x^4 + b5*x^5', ['b0', 'b1', 'b2', 'b3', 'b4', 'b5'], xs, y);
    const err = (t: Float64Array) => Math.max(...Array.from(t, (v) => Math.abs(v - 1)));
    const plain = solveLinear(problem, { refine: false });
    const refined = solveLinear(problem);
    expect(err(refined.theta)).toBeLessThan(1e-13);
    expect(err(refined.theta)).toBeLessThanOrEqual(err(plain.theta));
    expect(refined.stop.message).toMatch(/refinement/);
  });

  it('rank deficiency: reports the rank and still minimises the residual', () => {
    const y = xs.map((x, i) => 2 * x + noise(i));
    const out = solveLinear(fitProblem('a*x + b*x', ['a', 'b'], xs, y));
    expect(out.rank).toBe(1);
    expect(out.stop.message).toMatch(/rank 1 < 2/);
    expect(out.theta[0] + out.theta[1]).toBeCloseTo(xs.reduce((s, x, i) => s + x * y[i], 0) / xs.reduce((s, x) => s + x * x, 0), 12);
    expect(out.theta.filter((v) => v === 0)).toHaveLength(1);
  });

  it('no rows, non-finite data and cancellation are reported, not thrown', () => {
    expect(solveLinear(fitProblem('a*x', ['a'], [], [])).stop.code).toBe('failed');
    const bad = solveLinear(fitProblem('a*x', ['a'], [1, 2], [1, NaN]));
    expect(bad.stop.code).toBe('non_finite');
    expect(bad.stop.converged).toBe(false);
    expect(solveLinear(fitProblem('a*x', ['a'], [1, 2], [1, 2]), { cancel: { cancelled: true } }).stop.code).toBe('cancelled');
  });

  it('does not depend on the expansion point for a linear model', () => {
    const y = xs.map((x, i) => 1 - x + noise(i));
    const p = fitProblem('a + b*x', ['a', 'b'], xs, y);
    const at0 = solveLinear(p);
    const at1 = solveLinear(p, { theta0: Float64Array.from([100, -50]) });
    expect(at1.theta[0]).toBeCloseTo(at0.theta[0], 11);
    expect(at1.theta[1]).toBeCloseTo(at0.theta[1], 12);
  });
});
