/**
 * Per-point influence figures from the weighted Jacobian J (n×p, column-major,
 * free parameters) and the unscaled covariance C = (JᵀJ)⁻¹:
 * - leverage hᵢ = Jᵢ C Jᵢᵀ, the diagonal of the hat matrix H = J(JᵀJ)⁻¹Jᵀ
 *   (for a nonlinear model, of its linearisation at the estimate);
 * - standardized residual rᵢ/s;
 * - internally studentized residual rᵢ/(s√(1 − hᵢ));
 * - Cook's distance Dᵢ = rᵢ² hᵢ / (p s² (1 − hᵢ)²)
 *   (Cook 1977, Technometrics 19:15–18; Belsley, Kuh & Welsch 1980, ch. 2).
 * Here rᵢ are the weighted residuals and s = √(SSR/dof).
 * Points with hᵢ ≥ 1 − 1e-12 (fitted exactly by construction) get NaN
 * studentized residuals and Cook's distances (null in JSON).
 */

/** Leverage above which 1 − hᵢ counts as zero: hᵢ ≥ 1 − LEVERAGE_ONE_TOL. */
const LEVERAGE_ONE_TOL = 1e-12;

/** Diagonal of the hat matrix: hᵢ = Σⱼₖ Jᵢⱼ Cⱼₖ Jᵢₖ. `cov` is p×p (symmetric, any major order). */
export function leverages(jacobian: ArrayLike<number>, n: number, p: number, cov: ArrayLike<number>): Float64Array {
  const h = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let sum = 0;
    for (let j = 0; j < p; j++) {
      const jij = jacobian[j * n + i];
      if (jij === 0) continue;
      let row = 0;
      for (let k = 0; k < p; k++) row += cov[j * p + k] * jacobian[k * n + i];
      sum += jij * row;
    }
    h[i] = sum;
  }
  return h;
}

export interface Influence {
  leverage: Float64Array;
  standardized: Float64Array;
  studentized: Float64Array;
  cooksDistance: Float64Array;
}

export function influence(residuals: ArrayLike<number>, leverage: Float64Array, s: number, p: number): Influence {
  const n = residuals.length;
  const standardized = new Float64Array(n);
  const studentized = new Float64Array(n);
  const cooksDistance = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const r = residuals[i];
    const h = leverage[i];
    standardized[i] = r / s;
    const oneMinusH = 1 - h;
    if (oneMinusH > LEVERAGE_ONE_TOL) {
      studentized[i] = r / (s * Math.sqrt(oneMinusH));
      cooksDistance[i] = (r * r * h) / (p * s * s * oneMinusH * oneMinusH);
    } else {
      studentized[i] = NaN;
      cooksDistance[i] = NaN;
    }
  }
  return { leverage, standardized, studentized, cooksDistance };
}
