/**
 * Builds the solvers' `LeastSquaresProblem` from a compiled model and data
 * arrays: rᵢ(θ) = √wᵢ·(yᵢ − f(xᵢ; θ)), ∂rᵢ/∂θⱼ = −√wᵢ·∂f/∂θⱼ. With σ given,
 * √wᵢ = 1/σᵢ. Buffers are allocated once here; evaluations allocate nothing.
 * The double-double methods (for the linear solver's refinement) use the
 * model's extended kernel; √wᵢ is applied as a double.
 */
import type { CompiledModel } from '../compile/index';
import type { LeastSquaresProblem } from './problem';
import { DD_OUT, ddSub, ddMul } from '../linalg/dd';
import { workArray } from '../linalg/work-array';

export interface ModelProblemInput {
  model: CompiledModel;
  /** Model columns, in `model.columns` order, each of length ≥ n. */
  columns: readonly Float64Array[];
  /** Observed response yᵢ (length ≥ n). */
  response: Float64Array;
  n: number;
  /** √wᵢ per row (absent: all 1). */
  sqrtWeights?: Float64Array;
  lower?: Float64Array;
  upper?: Float64Array;
}

/** Element-wise identical parameter vectors (Object.is: −0 and NaN compare as stored). */
function sameTheta(a: Float64Array, b: Float64Array): boolean {
  if (a.length !== b.length) return false;
  for (let j = 0; j < a.length; j++) if (!Object.is(a[j], b[j])) return false;
  return true;
}

export function modelProblem(input: ModelProblemInput): LeastSquaresProblem {
  const { model, columns, response: y, n, sqrtWeights: sw } = input;
  const p = model.params.length;
  const f = workArray(n);
  let ext: { fh: Float64Array; fl: Float64Array; jh: Float64Array; jl: Float64Array; at: Float64Array } | null = null;
  /** `ext` holds a full (value + Jacobian) evaluation at θ = ext.at. */
  let extValid = false;
  const extended = (theta: Float64Array) => {
    ext ??= { fh: new Float64Array(n), fl: new Float64Array(n), jh: new Float64Array(n * p), jl: new Float64Array(n * p), at: new Float64Array(p) };
    // The linear solver asks for residuals and Jacobian at the same θ in turn: evaluate once (the kernel is deterministic).
    if (extValid && sameTheta(ext.at, theta)) return ext;
    model.valueAndJacobianExtended(theta, columns, n, ext.fh, ext.fl, ext.jh, ext.jl);
    ext.at.set(theta);
    extValid = true;
    return ext;
  };
  let val: { fh: Float64Array; fl: Float64Array } | null = null;
  /** ∂rᵢ/∂θⱼ = −√wᵢ·∂f/∂θⱼ in place. */
  const negateJacobian = (out: Float64Array) => {
    for (let j = 0; j < p; j++) {
      const o = j * n;
      if (sw) for (let i = 0; i < n; i++) out[o + i] = -sw[i] * out[o + i];
      else for (let i = 0; i < n; i++) out[o + i] = -out[o + i];
    }
  };
  /**
   * The same, returning whether every entry is finite: Σ v·0 is 0 for finite v and NaN as soon as one
   * v is ±∞ or NaN (IEEE 754: ∞·0 = NaN, NaN propagates), checked in the pass that writes v.
   */
  const negateJacobianChecked = (out: Float64Array): boolean => {
    let acc = 0;
    for (let j = 0; j < p; j++) {
      const o = j * n;
      if (sw) {
        for (let i = 0; i < n; i++) {
          const v = -sw[i] * out[o + i];
          out[o + i] = v;
          acc += v * 0;
        }
      } else {
        for (let i = 0; i < n; i++) {
          const v = -out[o + i];
          out[o + i] = v;
          acc += v * 0;
        }
      }
    }
    return acc === 0;
  };
  const problem: LeastSquaresProblem = {
    n,
    p,
    residuals(theta, out) {
      model.value(theta, columns, n, f);
      if (sw) for (let i = 0; i < n; i++) out[i] = sw[i] * (y[i] - f[i]);
      else for (let i = 0; i < n; i++) out[i] = y[i] - f[i];
    },
    jacobian(theta, out) {
      model.valueAndJacobian(theta, columns, n, f, out);
      negateJacobian(out);
    },
    residualsAndJacobian(theta, out, jac) {
      model.valueAndJacobian(theta, columns, n, f, jac);
      // finiteness checked in the passes that write r and J (LeastSquaresProblem.residualsAndJacobian)
      let acc = 0;
      if (sw) {
        for (let i = 0; i < n; i++) {
          const v = sw[i] * (y[i] - f[i]);
          out[i] = v;
          acc += v * 0;
        }
      } else {
        for (let i = 0; i < n; i++) {
          const v = y[i] - f[i];
          out[i] = v;
          acc += v * 0;
        }
      }
      const jacFinite = negateJacobianChecked(jac);
      return acc === 0 && jacFinite;
    },
    residualsExtended(theta, hi, lo) {
      // value only (cheaper) unless a full evaluation at this θ is at hand
      let e: { fh: Float64Array; fl: Float64Array };
      if (ext !== null && extValid && sameTheta(ext.at, theta)) e = ext;
      else {
        val ??= { fh: new Float64Array(n), fl: new Float64Array(n) };
        model.valueExtended(theta, columns, n, val.fh, val.fl);
        e = val;
      }
      for (let i = 0; i < n; i++) {
        ddSub(y[i], 0, e.fh[i], e.fl[i]);
        if (sw) ddMul(DD_OUT[0], DD_OUT[1], sw[i], 0);
        hi[i] = DD_OUT[0];
        lo[i] = DD_OUT[1];
      }
    },
    jacobianExtended(theta, hi, lo) {
      const e = extended(theta);
      if (!sw) {
        // −(jh + jl) is exact: the negated parts (what ddMul by −1 gives for a normalised pair), one plain pass
        for (let k = 0; k < n * p; k++) {
          hi[k] = -e.jh[k];
          lo[k] = -e.jl[k];
        }
        return;
      }
      for (let j = 0; j < p; j++) {
        for (let i = 0; i < n; i++) {
          const k = j * n + i;
          ddMul(e.jh[k], e.jl[k], -sw[i], 0);
          hi[k] = DD_OUT[0];
          lo[k] = DD_OUT[1];
        }
      }
    },
  };
  if (input.lower) problem.lower = input.lower;
  if (input.upper) problem.upper = input.upper;
  return problem;
}
