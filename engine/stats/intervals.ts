/**
 * Parameter standard errors, Student-t confidence intervals and correlations
 * from the covariance of the estimates.
 *
 * Covariance: C = s²(JᵀJ)⁻¹ when the residual variance is estimated (no σ,
 * or relative weights), C = (JᵀJ)⁻¹ when σ is absolute (the σᵢ fix the scale;
 * e.g. Press et al., Numerical Recipes, 3rd ed., §15.5/§15.6). The interval is
 * θ̂ⱼ ± t_{(1+level)/2, dof}·seⱼ, seⱼ = √Cⱼⱼ; for nonlinear models this is the
 * linear-approximation interval (e.g. Bates & Watts 1988, Nonlinear Regression
 * Analysis and Its Applications, ch. 2).
 */
import { tCritical } from './distributions';

export interface ParameterInterval {
  stderr: number;
  lower: number;
  upper: number;
}

/** Scales the unscaled covariance (JᵀJ)⁻¹ (p×p, flat) by `factor` into a new flat array. */
export function scaleCovariance(unscaled: ArrayLike<number>, factor: number): Float64Array {
  const out = new Float64Array(unscaled.length);
  for (let k = 0; k < unscaled.length; k++) out[k] = unscaled[k] * factor;
  return out;
}

/** se, lower, upper for each free parameter; NaN when the variance or dof are unusable. */
export function parameterIntervals(estimates: ArrayLike<number>, cov: ArrayLike<number>, level: number, dof: number): ParameterInterval[] {
  const p = estimates.length;
  const t = tCritical(level, dof);
  const out: ParameterInterval[] = [];
  for (let j = 0; j < p; j++) {
    const v = cov[j * p + j];
    const se = v >= 0 ? Math.sqrt(v) : NaN;
    out.push({ stderr: se, lower: estimates[j] - t * se, upper: estimates[j] + t * se });
  }
  return out;
}

/** Correlation matrix ρⱼₖ = Cⱼₖ/√(CⱼⱼCₖₖ); NaN where a variance is not positive; diagonal 1 otherwise. */
export function correlationMatrix(cov: ArrayLike<number>, p: number): number[][] {
  const rows: number[][] = [];
  for (let j = 0; j < p; j++) {
    const row: number[] = [];
    for (let k = 0; k < p; k++) {
      const d = cov[j * p + j] * cov[k * p + k];
      row.push(d > 0 ? (j === k ? 1 : cov[j * p + k] / Math.sqrt(d)) : NaN);
    }
    rows.push(row);
  }
  return rows;
}

/** se, lower, upper for each free parameter from standard errors already computed (engine/stats/covariance `estimateCovariance`). */
export function parameterIntervalsFromSe(estimates: ArrayLike<number>, se: ArrayLike<number>, level: number, dof: number): ParameterInterval[] {
  const t = tCritical(level, dof);
  return Array.from({ length: estimates.length }, (_, j) => {
    const e = se[j] >= 0 ? se[j] : NaN;
    return { stderr: e, lower: estimates[j] - t * e, upper: estimates[j] + t * e };
  });
}
