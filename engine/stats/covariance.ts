/**
 * Parameter covariance from the Jacobian at the solution.
 *
 * Unscaled covariance C = (JᵀJ)⁻¹ from the pivoted, column-equilibrated QR
 * J·S·P = Q·R as C = S·P·R⁻¹R⁻ᵀ·Pᵀ·S (`linalg/triangular.ts`); JᵀJ is never
 * formed. The covariance of the estimates is s²·C with s² = SSR/(n − p)
 * (or 1 with absolute σ); standard errors are its root diagonal.
 *
 * Rank: decided by the QR's relative tolerance |R_kk| > τ·|R_00|, default
 * τ = 10·max(n, p)·ε (`linalg/qr.ts`). When rank k < p the problem is
 * flagged; entries involving the p − k parameters beyond the rank (pivot
 * order) are NaN and the rest is the covariance with those held fixed.
 *
 * Condition number: κ₂ = σ_max/σ_min of the scaled Jacobian J·S, from the
 * singular values of its p×p triangular factor R (same singular values),
 * computed with ml-matrix's SVD (Golub–Kahan–Reinsch). Infinity when rank
 * deficient or n < p.
 */
import { Matrix, SingularValueDecomposition } from 'ml-matrix';
import { PivotedQR, defaultRankTolerance } from '../linalg/qr';
import { inverseGram } from '../linalg/triangular';

export interface CovarianceResult {
  /** (JᵀJ)⁻¹, p×p column-major (symmetric), original parameter order. */
  unscaled: Float64Array;
  /**
   * The same for the equilibrated Jacobian J·S: (SJᵀJS)⁻¹, so that
   * (JᵀJ)⁻¹ = S·core·S; its entries do not depend on the units of the
   * parameters (bounded by κ²), so products with S never under- or overflow
   * where the result itself is representable.
   */
  core: Float64Array;
  /** S: 1/‖Jⱼ‖ per parameter (1 for a zero column), original order. */
  columnScale: Float64Array;
  p: number;
  rank: number;
  rankDeficient: boolean;
  /** Parameter indices beyond the numerical rank (empty when full rank). */
  dependent: number[];
  /** 2-norm condition number of the column-scaled Jacobian. */
  condition: number;
  /** The relative rank tolerance used. */
  tolerance: number;
  /** The QR factor of J·S·P (for leverages and tests in the column space of J); null when none was computed. */
  factor: PivotedQR | null;
}

export interface CovarianceOptions {
  /** Relative rank tolerance τ on |R_kk|/|R_00|. Default 10·max(n, p)·ε. */
  rankTolerance?: number;
  /**
   * A pivoted, column-scaled QR of exactly this Jacobian already computed (a
   * solver's, SolveOutcome.factor): used instead of factoring again when its
   * size, options and rank tolerance are those asked for. Default none.
   */
  factor?: PivotedQR;
}

export function unscaledCovariance(jacobian: Float64Array, n: number, p: number, options: CovarianceOptions = {}): CovarianceResult {
  if (p === 0) {
    return { unscaled: new Float64Array(0), core: new Float64Array(0), columnScale: new Float64Array(0), p, rank: 0, rankDeficient: false, dependent: [], condition: 1, tolerance: 0, factor: null };
  }
  let finite = true;
  for (let i = 0; i < n * p; i++) if (!Number.isFinite(jacobian[i])) { finite = false; break; }
  if (!finite || n === 0) {
    return {
      unscaled: new Float64Array(p * p).fill(NaN), core: new Float64Array(p * p).fill(NaN), columnScale: new Float64Array(p).fill(NaN), p, rank: 0, rankDeficient: true,
      dependent: Array.from({ length: p }, (_, j) => j), condition: Infinity, tolerance: NaN, factor: null,
    };
  }
  const given = options.factor;
  const tau = options.rankTolerance ?? defaultRankTolerance(n, p);
  const qr = given && given.m === n && given.n === p && given.pivoted && given.scaled && given.tolerance === tau
    ? given
    : new PivotedQR(n, p).factor(jacobian, n, p, { pivot: true, scale: true, rankTolerance: options.rankTolerance });
  const unscaled = inverseGram(qr);
  const core = inverseGram(qr, qr.rank, false);
  const dependent: number[] = [];
  for (let k = qr.rank; k < p; k++) dependent.push(qr.perm[k]);
  dependent.sort((a, b) => a - b);
  return {
    unscaled, core, columnScale: Float64Array.from(qr.scale.subarray(0, p)), p, rank: qr.rank, rankDeficient: qr.rank < p, dependent,
    condition: qr.rank < p || n < p ? Infinity : conditionOfR(qr),
    tolerance: qr.tolerance,
    factor: qr,
  };
}

function conditionOfR(qr: PivotedQR): number {
  const p = qr.n;
  const rows: number[][] = [];
  for (let i = 0; i < p; i++) {
    const row: number[] = [];
    for (let j = 0; j < p; j++) row.push(qr.r(i, j));
    rows.push(row);
  }
  const sv = new SingularValueDecomposition(new Matrix(rows), { computeLeftSingularVectors: false, computeRightSingularVectors: false, autoTranspose: true }).diagonal;
  const max = Math.max(...sv);
  const min = Math.min(...sv);
  return min > 0 ? max / min : Infinity;
}

/** Standard errors √(s²·C_jj) (NaN where C is undefined). */
export function standardErrors(cov: CovarianceResult, s2: number): Float64Array {
  const se = new Float64Array(cov.p);
  for (let j = 0; j < cov.p; j++) se[j] = Math.sqrt(s2 * cov.unscaled[j + j * cov.p]);
  return se;
}

/** s²·C as nested rows (p×p), for results. */
export function scaledCovariance(cov: CovarianceResult, s2: number): number[][] {
  const out: number[][] = [];
  for (let i = 0; i < cov.p; i++) {
    const row: number[] = [];
    for (let j = 0; j < cov.p; j++) row.push(s2 * cov.unscaled[i + j * cov.p]);
    out.push(row);
  }
  return out;
}

/**
 * The covariance k²·(JᵀJ)⁻¹ of the estimates in factored form, computed
 * without forming k² or (JᵀJ)⁻¹ (either may be out of range where the
 * result is not): seⱼ = (k·Sⱼ)·√coreⱼⱼ, ρⱼₗ = coreⱼₗ/√(coreⱼⱼ·coreₗₗ) and
 * Cⱼₗ = (k·Sⱼ)·coreⱼₗ·(k·Sₗ). `k` is s (estimated variance) or 1/c (σ
 * absolute with responses scaled by c). NaN where the covariance is undefined
 * (parameters beyond the rank).
 */
export function estimateCovariance(cov: CovarianceResult, k: number): { se: Float64Array; correlation: Float64Array; covariance: Float64Array } {
  const { p, core, columnScale: d } = cov;
  const se = new Float64Array(p);
  const correlation = new Float64Array(p * p);
  const covariance = new Float64Array(p * p);
  const f = Float64Array.from(d, (dj) => k * dj);
  for (let j = 0; j < p; j++) se[j] = f[j] * Math.sqrt(core[j * p + j]);
  for (let j = 0; j < p; j++) {
    for (let l = 0; l < p; l++) {
      const c = core[j * p + l];
      const dd = core[j * p + j] * core[l * p + l];
      // no correlation of estimates that do not vary (k = 0: an exact fit), as with the covariance itself
      correlation[j * p + l] = dd > 0 && k > 0 ? (j === l ? 1 : c / Math.sqrt(dd)) : NaN;
      covariance[j * p + l] = f[j] * c * f[l];
    }
  }
  return { se, correlation, covariance };
}
