import { describe, it, expect } from 'vitest';
import { compileModel } from '../../engine/compile/index';
import { modelProblem } from '../../engine/solve/model-problem';
import { infix } from '../strd/infix';

describe('engine/solve/model-problem modelProblem', () => {
  const model = compileModel(infix('a*x^2 + b/3', ['a', 'b']), ['a', 'b'], ['x']);
  const x = Float64Array.from([1, 2, 3]);
  const y = Float64Array.from([1, 5, 7]);
  const sw = Float64Array.from([1, 0.5, 2]);
  const problem = modelProblem({ model, columns: [x], response: y, n: 3, sqrtWeights: sw, lower: Float64Array.from([0, -1]) });
  const theta = Float64Array.from([0.7, 0.2]);

  it('residuals are √w·(y − f) and the Jacobian is −√w·∂f/∂θ (problem.ts convention)', () => {
    const r = new Float64Array(3);
    const j = new Float64Array(6);
    problem.residuals(theta, r);
    problem.jacobian(theta, j);
    for (let i = 0; i < 3; i++) {
      expect(r[i]).toBeCloseTo(sw[i] * (y[i] - (0.7 * x[i] ** 2 + 0.2 / 3)), 15);
      expect(j[i]).toBeCloseTo(-sw[i] * x[i] ** 2, 15);
      expect(j[3 + i]).toBeCloseTo(-sw[i] / 3, 15);
    }
    expect(problem.n).toBe(3);
    expect(problem.p).toBe(2);
    expect(Array.from(problem.lower!)).toEqual([0, -1]);
    expect(problem.upper).toBeUndefined();
  });

  it('the double-double residuals and Jacobian round to the double ones', () => {
    const [rh, rl, jh, jl] = [new Float64Array(3), new Float64Array(3), new Float64Array(6), new Float64Array(6)];
    problem.residualsExtended!(theta, rh, rl);
    problem.jacobianExtended!(theta, jh, jl);
    const r = new Float64Array(3);
    const j = new Float64Array(6);
    problem.residuals(theta, r);
    problem.jacobian(theta, j);
    for (let i = 0; i < 3; i++) expect(Math.abs(rh[i] + rl[i] - r[i])).toBeLessThanOrEqual(4e-16 * Math.abs(r[i]) + 1e-300);
    for (let k = 0; k < 6; k++) expect(Math.abs(jh[k] + jl[k] - j[k])).toBeLessThanOrEqual(4e-16 * Math.abs(j[k]));
    expect(rl.some((v) => v !== 0) || jl.some((v) => v !== 0)).toBe(true);
  });
});

describe('engine/solve/model-problem extended evaluations (value-only kernel and θ reuse)', () => {
  const P = ['a', 'b', 'c'];
  const model = compileModel(infix('a*exp(-b*x) + c*x^3', P), P, ['x']);
  const x = Float64Array.from([0.1, 0.5, 1, 2.5, 4]);
  const y = Float64Array.from([3, 2, 1.5, 1, 0.4]);
  const n = x.length;
  const at = (v: number[]) => Float64Array.from(v);

  it('residualsExtended gives the same bits whether served from a full evaluation at θ or computed alone', () => {
    const fresh = modelProblem({ model, columns: [x], response: y, n });
    const reuse = modelProblem({ model, columns: [x], response: y, n });
    const jh = new Float64Array(3 * n);
    const jl = new Float64Array(3 * n);
    const thetas = [at([2, 0.7, 0.01]), at([2.5, 0.3, -0.02])];
    for (const theta of thetas) {
      const h1 = new Float64Array(n), l1 = new Float64Array(n), h2 = new Float64Array(n), l2 = new Float64Array(n);
      fresh.residualsExtended!(theta, h1, l1);
      reuse.jacobianExtended!(theta, jh, jl);
      reuse.residualsExtended!(theta, h2, l2);
      expect(Array.from(h2)).toEqual(Array.from(h1));
      expect(Array.from(l2)).toEqual(Array.from(l1));
      // and they round to the double residuals (to a few ulps)
      const r = new Float64Array(n);
      fresh.residuals(theta, r);
      for (let i = 0; i < n; i++) expect(Math.abs(h1[i] + l1[i] - r[i])).toBeLessThan(1e-14 * (1 + Math.abs(r[i])));
    }
    // a different θ after a full evaluation is not served from the stale one
    const h3 = new Float64Array(n), l3 = new Float64Array(n), h4 = new Float64Array(n), l4 = new Float64Array(n);
    reuse.jacobianExtended!(thetas[0], jh, jl);
    reuse.residualsExtended!(thetas[1], h3, l3);
    fresh.residualsExtended!(thetas[1], h4, l4);
    expect(Array.from(h3)).toEqual(Array.from(h4));
  });
});

describe('engine/solve/model-problem residualsAndJacobian finiteness flag', () => {
  const model = compileModel(infix('a/x + b*x', ['a', 'b']), ['a', 'b'], ['x']);
  const y = Float64Array.from([1, 2, 3, 4]);
  const r = new Float64Array(4);
  const j = new Float64Array(8);
  for (const sw of [undefined, Float64Array.from([1, 2, 0.5, 1])]) {
    it(`true when r and J are finite, not true when a row gives ±∞ or NaN${sw ? ' (weighted)' : ''}`, () => {
      const finite = modelProblem({ model, columns: [Float64Array.from([1, 2, 3, 4])], response: y, n: 4, sqrtWeights: sw });
      expect(finite.residualsAndJacobian!(Float64Array.from([1, 1]), r, j)).toBe(true);
      // x = 0: a/x is ±∞ (a ≠ 0) or NaN (a = 0), and ∂/∂a = 1/x is ∞
      const atZero = modelProblem({ model, columns: [Float64Array.from([1, 0, 3, 4])], response: y, n: 4, sqrtWeights: sw });
      expect(atZero.residualsAndJacobian!(Float64Array.from([1, 1]), r, j)).toBe(false);
      expect(atZero.residualsAndJacobian!(Float64Array.from([0, 1]), r, j)).toBe(false);
      // only the Jacobian non-finite: a = 0 and x = 0 give f = NaN too, so take a column where only ∂f/∂θ overflows
      const big = modelProblem({ model: compileModel(infix('b*x + a*0', ['a', 'b']), ['a', 'b'], ['x']), columns: [Float64Array.from([1, 2, 3, 1e308])], response: y, n: 4, sqrtWeights: sw ? Float64Array.from([1, 1, 1, 10]) : undefined });
      expect(big.residualsAndJacobian!(Float64Array.from([0, 0]), r, j)).toBe(sw ? false : true);
    });
  }
});
