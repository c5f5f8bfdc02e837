import { describe, it, expect } from 'vitest';
import { levenbergMarquardt } from '../../engine/solve/lm';
import { solveLinear } from '../../engine/solve/linear';
import type { LeastSquaresProblem } from '../../engine/solve/problem';
import { fitProblem, rosenbrock, noise } from './problems';

const xs = Array.from({ length: 30 }, (_, i) => i * 0.25);

describe('engine/solve/lm levenbergMarquardt', () => {
  it('recovers the parameters of exact exponential-decay data', () => {
    const y = xs.map((x) => 5 * Math.exp(-0.8 * x) + 1);
    const out = levenbergMarquardt(fitProblem('a*exp(-b*x) + c', ['a', 'b', 'c'], xs, y), Float64Array.from([1, 0.1, 0]));
    expect(out.stop.converged).toBe(true);
    expect(out.theta[0]).toBeCloseTo(5, 10);
    expect(out.theta[1]).toBeCloseTo(0.8, 10);
    expect(out.theta[2]).toBeCloseTo(1, 10);
    expect(out.cost).toBeLessThan(1e-20);
    expect(out.evaluations).toBeGreaterThan(out.iterations);
  });

  it('solves Rosenbrock from (−1.2, 1) (Moré, Garbow & Hillstrom 1981 problem 1, from memory)', () => {
    const out = levenbergMarquardt(rosenbrock(), Float64Array.from([-1.2, 1]));
    expect(out.stop.converged).toBe(true);
    expect(out.theta[0]).toBeCloseTo(1, 12);
    expect(out.theta[1]).toBeCloseTo(1, 12);
    // The Jacobian returned is the one at the solution.
    expect(out.jacobian[0]).toBeCloseTo(-20 * out.theta[0], 12);
  });

  it('agrees with the linear solver on a linear model with noise', () => {
    const y = xs.map((x, i) => 2 - 0.7 * x + 0.1 * noise(i));
    const p = fitProblem('a + b*x', ['a', 'b'], xs, y);
    const lm = levenbergMarquardt(p, Float64Array.from([0, 0]));
    const lin = solveLinear(p);
    expect(lm.theta[0]).toBeCloseTo(lin.theta[0], 12);
    expect(lm.theta[1]).toBeCloseTo(lin.theta[1], 12);
  });

  it('cost never increases across accepted iterations', () => {
    const y = xs.map((x, i) => 3 * Math.exp(-1.3 * x) + 0.01 * noise(i));
    const costs: number[] = [];
    levenbergMarquardt(fitProblem('a*exp(-b*x)', ['a', 'b'], xs, y), Float64Array.from([10, 10]), { onIteration: (_, c) => costs.push(c) });
    expect(costs.length).toBeGreaterThan(2);
    for (let k = 1; k < costs.length; k++) expect(costs[k]).toBeLessThanOrEqual(costs[k - 1]);
  });

  it('bounds: an upper bound below the optimum holds the parameter there (projected active set)', () => {
    const y = xs.map((x) => 5 * Math.exp(-0.8 * x));
    const p = fitProblem('a*exp(-b*x)', ['a', 'b'], xs, y, { lower: [-Infinity, 0], upper: [Infinity, 0.5] });
    const out = levenbergMarquardt(p, Float64Array.from([1, 2]));
    expect(out.stop.converged).toBe(true);
    expect(out.theta[1]).toBe(0.5);
    // With b at its bound the best a is the linear least-squares one.
    const e = xs.map((x) => Math.exp(-0.5 * x));
    const aStar = e.reduce((s, v, i) => s + v * y[i], 0) / e.reduce((s, v) => s + v * v, 0);
    expect(out.theta[0]).toBeCloseTo(aStar, 9);
    // KKT: the cost still decreases towards larger b (gradient of ½‖r‖² in b is negative).
    let g = 0;
    for (let i = 0; i < xs.length; i++) g += out.jacobian[xs.length + i] * out.residuals[i];
    expect(g).toBeLessThan(0);
  });

  it('bounds: a start outside the box is projected and inactive bounds change nothing', () => {
    const y = xs.map((x) => 5 * Math.exp(-0.8 * x));
    const p = fitProblem('a*exp(-b*x)', ['a', 'b'], xs, y, { lower: [0, 0], upper: [10, 10] });
    const out = levenbergMarquardt(p, Float64Array.from([50, -3]));
    expect(out.theta[0]).toBeCloseTo(5, 10);
    expect(out.theta[1]).toBeCloseTo(0.8, 10);
  });

  it('reports iteration and evaluation limits with the numbers', () => {
    const it1 = levenbergMarquardt(rosenbrock(), Float64Array.from([-1.2, 1]), { maxIterations: 2 });
    expect(it1.stop.code).toBe('max_iterations');
    expect(it1.stop.converged).toBe(false);
    expect(it1.stop.message).toMatch(/2/);
    expect(it1.iterations).toBe(2);
    const ev = levenbergMarquardt(rosenbrock(), Float64Array.from([-1.2, 1]), { maxEvaluations: 3 });
    expect(ev.stop.code).toBe('max_evaluations');
    expect(ev.evaluations).toBe(3);
  });

  it('stops on cancellation', () => {
    const token = { cancelled: false };
    const out = levenbergMarquardt(rosenbrock(), Float64Array.from([-1.2, 1]), { cancel: token, onIteration: () => { token.cancelled = true; } });
    expect(out.stop.code).toBe('cancelled');
    expect(out.iterations).toBe(1);
  });

  it('non-finite start is reported; non-finite trial points only shrink the trust region', () => {
    const bad = levenbergMarquardt(fitProblem('a*ln(x)', ['a'], [-1, 2], [0, 1]), Float64Array.from([1]));
    expect(bad.stop.code).toBe('non_finite');
    // r = 2 − sqrt(θ): steps to θ < 0 give NaN and must be rejected, not fatal.
    const sqrtProblem: LeastSquaresProblem = {
      n: 1, p: 1,
      residuals: (t, out) => { out[0] = 2 - Math.sqrt(t[0]); },
      jacobian: (t, out) => { out[0] = -0.5 / Math.sqrt(t[0]); },
    };
    const out = levenbergMarquardt(sqrtProblem, Float64Array.from([0.01]));
    expect(out.stop.converged).toBe(true);
    expect(out.theta[0]).toBeCloseTo(4, 10);
  });

  it('degenerate sizes: no rows fails, no parameters returns at once', () => {
    expect(levenbergMarquardt(fitProblem('a*x', ['a'], [], []), Float64Array.from([1])).stop.code).toBe('failed');
    const none = levenbergMarquardt({ n: 2, p: 0, residuals: (_, o) => { o[0] = 1; o[1] = 2; }, jacobian: () => {} }, new Float64Array(0));
    expect(none.stop.converged).toBe(true);
    expect(none.cost).toBe(2.5);
  });

  it('Gauss–Newton polishing can be switched off; both stop converged near the same point', () => {
    const y = xs.map((x, i) => 3 * Math.exp(-1.3 * x) + 0.3 + 0.01 * noise(i));
    const p = fitProblem('a*exp(-b*x) + c', ['a', 'b', 'c'], xs, y);
    const on = levenbergMarquardt(p, Float64Array.from([1, 1, 0]));
    const off = levenbergMarquardt(p, Float64Array.from([1, 1, 0]), { polish: false });
    expect(on.stop.converged && off.stop.converged).toBe(true);
    for (let j = 0; j < 3; j++) expect(on.theta[j]).toBeCloseTo(off.theta[j], 7);
    expect(on.cost).toBeLessThanOrEqual(off.cost * (1 + 1e-10));
  });
});

describe('engine/solve/lm combined trial evaluation (residualsAndJacobian)', () => {
  const x = Array.from({ length: 60 }, (_, i) => 0.01 * 10 ** (i / 15));
  const y = x.map((v, i) => 2 + 96 / (1 + (v / 0.7) ** 1.3) + 0.5 * noise(i));
  const cases: [string, { lower?: number[]; upper?: number[] }, number[]][] = [
    ['unbounded', {}, [5, 90, 1, 1]],
    ['bounded, bound active', { lower: [3, -Infinity, 0, 0] }, [5, 90, 1, 1]],
    ['poor start (rejected steps)', {}, [50, 10, 30, 5]],
  ];
  for (const [name, bounds, start] of cases) {
    it(`gives the same fit with and without it, and returns r and J at θ (${name})`, () => {
      const full = fitProblem('d + (a - d)/(1 + (x/c)^b)', ['d', 'a', 'c', 'b'], x, y, bounds);
      expect(full.residualsAndJacobian).toBeDefined();
      const plain: LeastSquaresProblem = { ...full, residualsAndJacobian: undefined };
      const a = levenbergMarquardt(full, Float64Array.from(start));
      const b = levenbergMarquardt(plain, Float64Array.from(start));
      expect(Array.from(a.theta)).toEqual(Array.from(b.theta));
      expect(a.stop.code).toBe(b.stop.code);
      expect(a.iterations).toBe(b.iterations);
      // the returned residuals and Jacobian are those at the returned θ, bit for bit
      for (const out of [a, b]) {
        const r = new Float64Array(x.length);
        const j = new Float64Array(4 * x.length);
        full.residuals(out.theta, r);
        full.jacobian(out.theta, j);
        expect(Array.from(out.residuals)).toEqual(Array.from(r));
        expect(Array.from(out.jacobian)).toEqual(Array.from(j));
      }
    });
  }
});
