import { describe, it, expect } from 'vitest';
import { reflectiveTrustRegion } from '../../engine/solve/reflective';
import { STREAMED_MIN_ROWS } from '../../engine/linalg/streamed-qr';
import { PivotedQR } from '../../engine/linalg/qr';
import { levenbergMarquardt } from '../../engine/solve/lm';
import { solveNonlinear, boundsMethodFor } from '../../engine/solve/nonlinear';
import { colemanLiScaling, makeStrictlyFeasible } from '../../engine/solve/bounds';
import { feasibleFraction, selectStep, StepWork, type StepModel } from '../../engine/solve/reflective-step';
import type { LeastSquaresProblem } from '../../engine/solve/problem';
import { fitProblem, rosenbrock, noise } from './problems';

const xs = Array.from({ length: 30 }, (_, i) => i * 0.25);

/** Wraps a problem to record every θ it is evaluated at. */
function recording(problem: LeastSquaresProblem): { problem: LeastSquaresProblem; points: number[][] } {
  const points: number[][] = [];
  const p: LeastSquaresProblem = {
    ...problem,
    residuals(t, out) { points.push(Array.from(t)); problem.residuals(t, out); },
    jacobian(t, out) { points.push(Array.from(t)); problem.jacobian(t, out); },
  };
  if (problem.residualsAndJacobian) {
    const both = problem.residualsAndJacobian.bind(problem);
    p.residualsAndJacobian = (t, out, jac) => { points.push(Array.from(t)); both(t, out, jac); };
  }
  return { problem: p, points };
}

describe('engine/solve/bounds Coleman–Li scaling', () => {
  it('uses the distance to the bound the gradient points at, 1 otherwise (Coleman & Li 1996 §2)', () => {
    const v = new Float64Array(4);
    const toward = new Uint8Array(4);
    const theta = Float64Array.of(2, 2, 2, 2);
    const g = Float64Array.of(1, -1, -1, 1);
    colemanLiScaling(theta, g, Float64Array.of(0, 0, -Infinity, -Infinity), Float64Array.of(5, 3, Infinity, Infinity), v, toward);
    expect(Array.from(v)).toEqual([2, 1, 1, 1]);
    expect(Array.from(toward)).toEqual([1, 1, 0, 0]);
  });

  it('moves a start off its bound by 1e-10 of the bound size, at most 1 % of the box', () => {
    const t = Float64Array.of(0, 10, 5, 1);
    makeStrictlyFeasible(t, Float64Array.of(0, 0, 5, 1), Float64Array.of(Infinity, 10, 5 + 1e-12, Infinity));
    expect(t[0]).toBe(1e-10);
    expect(t[1]).toBe(10 - 1e-9);
    expect(t[2]).toBeGreaterThan(5);
    expect(t[2]).toBeLessThan(5 + 1e-12);
    expect(t[3]).toBe(1 + 1e-10);
  });
});

describe('engine/solve/reflective-step', () => {
  it('takes the full step when it stays inside, else a stepped-back candidate strictly inside the box', () => {
    const p = 2;
    const model: StepModel = { p, r: Float64Array.of(1, 0, 0, 1), perm: Int32Array.of(0, 1), g: Float64Array.of(-1, -1), c: new Float64Array(p), d: Float64Array.of(1, 1) };
    const w = new StepWork(p);
    const x = Float64Array.of(0.5, 0.5);
    const lower = Float64Array.of(0, 0);
    const upper = Float64Array.of(1, 1);
    const inside = Float64Array.of(0.2, 0.1);
    expect(selectStep(model, w, x, inside, lower, upper, 10, 0.995).kind).toBe('full');
    const out = Float64Array.of(1, 0.1);
    const choice = selectStep(model, w, x, out, lower, upper, 10, 0.995);
    expect(choice.kind).not.toBe('full');
    expect(choice.hits).toEqual([0]);
    expect(x[0] + out[0]).toBeLessThan(1);
    expect(x[1] + out[1]).toBeGreaterThan(0);
  });

  it('feasible fraction: the largest α with x + α·s in the box, and the bounds met', () => {
    const hits: number[] = [];
    const a = feasibleFraction(Float64Array.of(0.5, 0.5), Float64Array.of(1, -2), Float64Array.of(0, 0), Float64Array.of(1, 1), hits);
    expect(a).toBe(0.25);
    expect(hits).toEqual([1]);
  });
});

describe('engine/solve/reflective reflectiveTrustRegion', () => {
  it('an upper bound below the optimum: converges to it from inside, with the bound-constrained a (KKT)', () => {
    const y = xs.map((x) => 5 * Math.exp(-0.8 * x));
    const { problem, points } = recording(fitProblem('a*exp(-b*x)', ['a', 'b'], xs, y, { lower: [-Infinity, 0], upper: [Infinity, 0.5] }));
    const out = reflectiveTrustRegion(problem, Float64Array.from([1, 2]));
    expect(out.stop.converged).toBe(true);
    expect(0.5 - out.theta[1]).toBeGreaterThan(0);
    expect(0.5 - out.theta[1]).toBeLessThan(1e-8);
    // with b at its bound the best a is the linear least-squares one (exact, from the normal equation of one unknown)
    const e = xs.map((x) => Math.exp(-0.5 * x));
    const aStar = e.reduce((s, v, i) => s + v * y[i], 0) / e.reduce((s, v) => s + v * v, 0);
    expect(out.theta[0]).toBeCloseTo(aStar, 6);
    // every evaluation strictly inside the box (the start 2 was above the bound: moved inside first)
    for (const t of points) expect(t[1]).toBeLessThan(0.5);
  });

  it('never evaluates the model on a bound where it is singular: (dose/ec)^h with ec in [0, inf] and zero doses', () => {
    const dose = [0, 0, 0.001, 0.003, 0.01, 0.03, 0.1, 0.3, 1, 3, 10];
    // potency near the low end of the range, where projection walks onto ec = 0 (issue scenario, invented data)
    const y = dose.map((d, i) => 2 + 96 / (1 + Math.pow(d / 0.0102, 1.55)) + 1.5 * noise(i));
    const { problem, points } = recording(fitProblem('bot + (top - bot)/(1 + (x/ec)^h)', ['bot', 'top', 'ec', 'h'], dose, y, { lower: [-Infinity, -Infinity, 0, 0.1], upper: [Infinity, Infinity, Infinity, 10] }));
    const out = reflectiveTrustRegion(problem, Float64Array.from([0, 100, 1, 1]));
    expect(out.stop.converged).toBe(true);
    expect(points.every((t) => t[2] > 0 && t[3] > 0.1 && t[3] < 10)).toBe(true);
    expect(out.theta[2]).toBeGreaterThan(0.005);
    expect(out.theta[2]).toBeLessThan(0.02);
  });

  it('without bounds, reaches the same minimum as Levenberg–Marquardt (Rosenbrock, Moré, Garbow & Hillstrom 1981 problem 1, from memory)', () => {
    const out = reflectiveTrustRegion(rosenbrock(), Float64Array.from([-1.2, 1]));
    expect(out.stop.converged).toBe(true);
    expect(out.theta[0]).toBeCloseTo(1, 10);
    expect(out.theta[1]).toBeCloseTo(1, 10);
    const lm = levenbergMarquardt(rosenbrock(), Float64Array.from([-1.2, 1]));
    expect(Math.abs(out.theta[0] - lm.theta[0])).toBeLessThan(1e-10);
  });

  it('returns the residuals and the Jacobian at the returned θ (the outcome contract)', () => {
    const y = xs.map((x, i) => 3 * Math.exp(-1.3 * x) + 0.5 + 0.01 * noise(i));
    const problem = fitProblem('a*exp(-b*x) + c', ['a', 'b', 'c'], xs, y, { lower: [0, 0, -Infinity], upper: [10, 5, Infinity] });
    const out = reflectiveTrustRegion(problem, Float64Array.from([1, 1, 0]));
    const r = new Float64Array(xs.length);
    const jac = new Float64Array(3 * xs.length);
    problem.residuals(out.theta, r);
    problem.jacobian(out.theta, jac);
    expect(Array.from(out.residuals)).toEqual(Array.from(r));
    expect(Array.from(out.jacobian)).toEqual(Array.from(jac));
  });

  it('solveNonlinear: bounded problems take the reflective method unless projection is asked for', () => {
    const y = xs.map((x) => 5 * Math.exp(-0.8 * x));
    const bounded = fitProblem('a*exp(-b*x)', ['a', 'b'], xs, y, { lower: [-Infinity, 0], upper: [Infinity, 0.5] });
    const free = fitProblem('a*exp(-b*x)', ['a', 'b'], xs, y);
    expect(boundsMethodFor(bounded)).toBe('reflective');
    expect(boundsMethodFor(bounded, { bounds: 'projection' })).toBe('projection');
    expect(boundsMethodFor(free)).toBeNull();
    // projection holds b exactly on the bound; the reflective method stays strictly inside
    expect(solveNonlinear(bounded, Float64Array.from([1, 2]), { bounds: 'projection' }).theta[1]).toBe(0.5);
    expect(solveNonlinear(bounded, Float64Array.from([1, 2])).theta[1]).toBeLessThan(0.5);
  });
});

describe('engine/solve/reflective on tall problems (the streamed factor, n ≥ STREAMED_MIN_ROWS)', () => {
  const n = 3 * STREAMED_MIN_ROWS + 5;
  const dose = Array.from({ length: n }, (_, i) => 0.001 * 10 ** ((5 * i) / (n - 1)));

  it('reflective and Levenberg–Marquardt reach the same stationary point when no bound is active (Jᵀr ≈ 0 checked directly)', () => {
    const y = dose.map((d, i) => 2 + 96 / (1 + Math.pow(d / 0.7, 1.3)) + noise(i));
    const formula = 'bot + (top - bot)/(1 + (x/ec)^h)';
    const names = ['bot', 'top', 'ec', 'h'];
    const start = Float64Array.from([0, 100, 1, 1]);
    const bounded = reflectiveTrustRegion(fitProblem(formula, names, dose, y, { lower: [-Infinity, -Infinity, 0, 0], upper: [Infinity, Infinity, Infinity, Infinity] }), start);
    const free = levenbergMarquardt(fitProblem(formula, names, dose, y), start);
    expect(bounded.stop.converged).toBe(true);
    expect(free.stop.converged).toBe(true);
    for (let j = 0; j < 4; j++) expect(Math.abs(bounded.theta[j] - free.theta[j])).toBeLessThan(1e-9 * Math.abs(free.theta[j]));
    expect(Math.abs(bounded.cost - free.cost)).toBeLessThan(1e-12 * free.cost);
    // the polish's last factorisation is handed on only when it is of the returned Jacobian: refactoring gives the same bits
    for (const out of [bounded, free]) {
      if (!out.factor) continue;
      const again = new PivotedQR(n, 4).factor(out.jacobian, n, 4, { pivot: true, scale: true });
      expect(Array.from(out.factor.rdiag)).toEqual(Array.from(again.rdiag));
      expect(Array.from(out.factor.perm)).toEqual(Array.from(again.perm));
    }
    // tall problems polish from the streamed factor of [J | r] (polish.ts): no factorisation of J is handed on
    expect(bounded.factor).toBeUndefined();
    expect(free.factor).toBeUndefined();
    // first-order condition from r and J themselves (no factorisation): |Jⱼᵀr| ≤ 1e-8·‖Jⱼ‖·‖r‖
    const { residuals: r, jacobian: jac } = free;
    const rn = Math.hypot(...r);
    for (let j = 0; j < 4; j++) {
      let g = 0;
      let c = 0;
      for (let i = 0; i < n; i++) {
        g += jac[j * n + i] * r[i];
        c += jac[j * n + i] ** 2;
      }
      expect(Math.abs(g)).toBeLessThan(1e-8 * Math.sqrt(c) * rn);
    }
  });

  it('an upper bound below the optimum: converges to it from inside, with the bound-constrained a', () => {
    const x = dose.map((d) => d * 0.08);
    const y = x.map((v, i) => 5 * Math.exp(-0.8 * v) + 1e-3 * noise(i));
    const out = reflectiveTrustRegion(fitProblem('a*exp(-b*x)', ['a', 'b'], x, y, { lower: [-Infinity, 0], upper: [Infinity, 0.5] }), Float64Array.from([1, 0.2]));
    expect(out.stop.converged).toBe(true);
    expect(0.5 - out.theta[1]).toBeGreaterThan(0);
    expect(0.5 - out.theta[1]).toBeLessThan(1e-8);
    // with b at its bound the best a is the linear least-squares one (the normal equation of one unknown)
    const e = x.map((v) => Math.exp(-0.5 * v));
    const aStar = e.reduce((s, v, i) => s + v * y[i], 0) / e.reduce((s, v) => s + v * v, 0);
    expect(out.theta[0]).toBeCloseTo(aStar, 6);
  });
});
