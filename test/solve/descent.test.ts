import { describe, it, expect } from 'vitest';
import { gradientDescent, defaultLearningRate } from '../../engine/solve/descent';
import { solveLinear } from '../../engine/solve/linear';
import { levenbergMarquardt } from '../../engine/solve/lm';
import { fitProblem, noise } from './problems';

const xs = Array.from({ length: 25 }, (_, i) => i * 0.4);

describe('engine/solve/descent gradientDescent', () => {
  it('converges to the linear least-squares solution with feature scaling', () => {
    const y = xs.map((x, i) => 4 + 0.5 * x + 0.2 * noise(i));
    const p = fitProblem('a + b*x', ['a', 'b'], xs, y);
    // reduction tolerance 0: run until the gradient test or exact stagnation (the default reduction test stops ~1e-8 early).
    const gd = gradientDescent(p, Float64Array.from([0, 0]), { gradientTolerance: 1e-12, reductionTolerance: 0 });
    const lin = solveLinear(p);
    expect(gd.stop.converged).toBe(true);
    expect(gd.theta[0]).toBeCloseTo(lin.theta[0], 8);
    expect(gd.theta[1]).toBeCloseTo(lin.theta[1], 9);
    // One residual pass and one Jacobian pass per iteration, plus the start and the rate trials.
    expect(gd.evaluations).toBeGreaterThan(gd.iterations);
    expect(gd.jacobianEvaluations).toBe(gd.evaluations);
    const fixed = gradientDescent(p, Float64Array.from([0, 0]), { learningRate: 0.5, maxIterations: 30 });
    expect(fixed.evaluations).toBe(fixed.iterations + 1);
    expect(gd.stop.message).toMatch(/learning rate/);
  });

  it('needs far more iterations than Levenberg–Marquardt on a nonlinear fit but approaches its answer', () => {
    const y = xs.map((x, i) => 3 * Math.exp(-0.4 * x) + 0.01 * noise(i));
    const p = fitProblem('a*exp(-b*x)', ['a', 'b'], xs, y);
    const lm = levenbergMarquardt(p, Float64Array.from([1, 1]));
    const gd = gradientDescent(p, Float64Array.from([1, 1]), { maxIterations: 200000, gradientTolerance: 1e-9 });
    expect(gd.iterations).toBeGreaterThan(10 * lm.iterations);
    expect(gd.theta[0]).toBeCloseTo(lm.theta[0], 5);
    expect(gd.theta[1]).toBeCloseTo(lm.theta[1], 5);
  });

  it('default learning rate is 1/λ_max of the scaled JᵀJ: 1 for orthogonal columns', () => {
    // Columns (1,0,1,0) and (0,2,0,2) are orthogonal: scaled JᵀJ = I.
    const jac = Float64Array.from([1, 0, 1, 0, 0, 2, 0, 2]);
    const d = Float64Array.from([Math.SQRT2, Math.sqrt(8)]);
    expect(defaultLearningRate(jac, 4, 2, d)).toBeCloseTo(1, 14);
    // Two identical unit columns: scaled JᵀJ = [[1,1],[1,1]], λ_max = 2.
    expect(defaultLearningRate(Float64Array.from([1, 0, 1, 0]), 2, 2, Float64Array.from([1, 1]))).toBeCloseTo(0.5, 14);
  });

  it('a Jacobian column near 1e300 neither overflows the default rate nor the step (found by the fuzzer)', () => {
    // a·1 + b·(1e300 − x) + c·x²: the b column is ~1e300, its square overflows a double; the bounds of the
    // fuzz case keep a and b where a + b·1e300 stays a constant the data resolve.
    const y = xs.map((x, i) => 4 + 0.3 * x * x + 0.1 * noise(i));
    const bounds = { lower: [-10, -5, -100], upper: [Infinity, 5, 10] };
    const p = fitProblem('a + b*(1e300 - x) + c*x^2', ['a', 'b', 'c'], xs, y, bounds);
    const gd = gradientDescent(p, Float64Array.from([0.5, 2, 1]), { maxIterations: 5000 });
    expect(Number.isFinite(Number(/learning rate ([0-9.e+-]+)/.exec(gd.stop.message)![1]))).toBe(true);
    expect(gd.stop.converged).toBe(true);
    // a and b·1e300 are one constant together: c is determined, and matches the linear solve of a + c·x²
    const lin = solveLinear(fitProblem('a + c*x^2', ['a', 'c'], xs, y));
    expect(gd.theta[2]).toBeCloseTo(lin.theta[1], 4);
    expect(gd.cost).toBeCloseTo(lin.cost, 3);
  });

  it('a stop whose ½‖r‖² is beyond the doubles is not converged', () => {
    // unbounded, the first steps move a to −1e300 against b·1e300: the residuals keep only rounding noise of 1e300
    const y = xs.map((x, i) => 4 + 0.3 * x * x + 0.1 * noise(i));
    const gd = gradientDescent(fitProblem('a + b*(1e300 - x) + c*x^2', ['a', 'b', 'c'], xs, y), Float64Array.from([0.5, 2, 1]), { maxIterations: 5000 });
    expect(gd.stop.converged).toBe(false);
    expect(gd.stop.code).toBe('failed');
    expect(gd.stop.message).toMatch(/beyond the range of double precision/);
  });

  it('a learning rate far too large diverges and is reported', () => {
    const y = xs.map((x) => 1 + x);
    const out = gradientDescent(fitProblem('a + b*x', ['a', 'b'], xs, y), Float64Array.from([0, 0]), { learningRate: 50, maxIterations: 5000 });
    expect(out.stop.converged).toBe(false);
    expect(out.stop.code).toBe('failed');
    expect(out.stop.message).toMatch(/diverged/);
  });

  it('the default rate comes from the trial grid: smaller than 1/λ_max when the curvature grows along the path', () => {
    const y = xs.map((x, i) => 3 * Math.exp(-0.4 * x) + 0.01 * noise(i));
    const out = gradientDescent(fitProblem('a*exp(-b*x)', ['a', 'b'], xs, y), Float64Array.from([1, 1]), { maxIterations: 100 });
    const rate = Number(/learning rate ([0-9.e-]+)/.exec(out.stop.message)![1]);
    expect(rate).toBeLessThan(0.6);
    expect(out.cost).toBeLessThan(0.5 * y.reduce((s, v, i) => s + (v - Math.exp(-xs[i])) ** 2, 0));
  });

  it('stops at the iteration limit with the numbers, and on cancellation', () => {
    const y = xs.map((x) => 3 * Math.exp(-0.4 * x));
    const p = fitProblem('a*exp(-b*x)', ['a', 'b'], xs, y);
    const out = gradientDescent(p, Float64Array.from([1, 1]), { maxIterations: 10 });
    expect(out.stop.code).toBe('max_iterations');
    expect(out.iterations).toBe(10);
    expect(out.stop.message).toMatch(/10/);
    const token = { cancelled: false };
    const c = gradientDescent(p, Float64Array.from([1, 1]), { cancel: token, onIteration: (k) => { if (k === 3) token.cancelled = true; } });
    expect(c.stop.code).toBe('cancelled');
    expect(c.iterations).toBe(3);
  });

  it('respects bounds by projection', () => {
    const y = xs.map((x) => 1 + 2 * x);
    const out = gradientDescent(fitProblem('a + b*x', ['a', 'b'], xs, y, { lower: [-Infinity, -Infinity], upper: [Infinity, 1.5] }), Float64Array.from([0, 0]), { maxIterations: 20000 });
    expect(out.theta[1]).toBeLessThanOrEqual(1.5);
    expect(out.theta[1]).toBeCloseTo(1.5, 6);
  });
});
