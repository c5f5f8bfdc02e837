/**
 * A least-squares problem as the solvers see it: minimise ½‖r(θ)‖² over the
 * free parameters θ ∈ ℝᵖ, given n residuals. Residuals are already weighted
 * (rᵢ = √wᵢ·(yᵢ − f(xᵢ; θ))) so solvers know nothing of data, weights or names.
 */
export interface LeastSquaresProblem {
  /** Number of residuals. */
  n: number;
  /** Number of free parameters. */
  p: number;
  /** Write r(θ) into `out` (length n). Non-finite entries are allowed and reported by the solver. */
  residuals(theta: Float64Array, out: Float64Array): void;
  /**
   * Write the Jacobian ∂rᵢ/∂θⱼ into `out`, column-major (out[j*n + i]), length n·p.
   * Exact (compiled) derivatives; finite differences are only a test oracle.
   */
  jacobian(theta: Float64Array, out: Float64Array): void;
  /**
   * Optional: r(θ) into `out` and the Jacobian into `jac` in one evaluation
   * (same values as `residuals` and `jacobian`). Levenberg–Marquardt uses it
   * for trial points, so an accepted step needs no separate Jacobian pass
   * (additive, optional). It may return `true` to say it checked, in its own
   * passes, that every entry of `out` and `jac` is finite (the solvers then skip
   * their own check, one more pass over n·(p + 1) numbers); any other return
   * means unchecked.
   */
  residualsAndJacobian?(theta: Float64Array, out: Float64Array, jac: Float64Array): void | boolean;
  /**
   * Optional: r(θ) in double-double, r ≈ hi + lo (see `linalg/dd.ts`). Used by
   * the linear solver's iterative refinement when present (additive, optional).
   */
  residualsExtended?(theta: Float64Array, hi: Float64Array, lo: Float64Array): void;
  /** Optional: the Jacobian in double-double, same layout as `jacobian` (additive, optional). */
  jacobianExtended?(theta: Float64Array, hi: Float64Array, lo: Float64Array): void;
  /** Optional box bounds on θ (length p; ±Infinity when absent). */
  lower?: Float64Array;
  upper?: Float64Array;
}

/** Cooperative cancellation, checked once per iteration. */
export interface CancelToken {
  readonly cancelled: boolean;
}
