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
