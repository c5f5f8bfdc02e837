/** Small least-squares problems for solver tests. */
import type { LeastSquaresProblem } from '../../engine/solve/problem';
import { compileModel } from '../../engine/compile/index';
import { modelProblem } from '../../engine/solve/model-problem';
import { infix } from '../strd/infix';

/** y = model(x; θ) on the given rows, optionally with σ-style weights. */
export function fitProblem(formula: string, params: string[], x: number[], y: number[], options: { sqrtWeights?: number[]; lower?: number[]; upper?: number[] } = {}): LeastSquaresProblem {
  const model = compileModel(infix(formula, params), params, ['x']);
  return modelProblem({
    model,
    columns: [Float64Array.from(x)],
    response: Float64Array.from(y),
    n: x.length,
    sqrtWeights: options.sqrtWeights ? Float64Array.from(options.sqrtWeights) : undefined,
    lower: options.lower ? Float64Array.from(options.lower) : undefined,
    upper: options.upper ? Float64Array.from(options.upper) : undefined,
  });
}

/**
 * Rosenbrock's function as least squares, r₁ = 10(θ₂ − θ₁²), r₂ = 1 − θ₁:
 * problem 1 of Moré, Garbow & Hillstrom, "Testing unconstrained optimization
 * software", ACM TOMS 7 (1981); start (−1.2, 1), minimum (1, 1) with cost 0
 * (from memory).
 */
export function rosenbrock(): LeastSquaresProblem {
  return {
    n: 2,
    p: 2,
    residuals(t, out) {
      out[0] = 10 * (t[1] - t[0] * t[0]);
      out[1] = 1 - t[0];
    },
    jacobian(t, out) {
      out[0] = -20 * t[0];
      out[1] = -1;
      out[2] = 10;
      out[3] = 0;
    },
  };
}

/** Deterministic noise in [−1, 1] (sine hash, common practice for reproducible tests). */
export function noise(i: number): number {
  const s = Math.sin(i * 12.9898 + 78.233) * 43758.5453;
  return 2 * (s - Math.floor(s)) - 1;
}
