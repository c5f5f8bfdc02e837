/**
 * Per-point influence figures of a least-squares fit, from the QR factor of the
 * weighted Jacobian J (n×p) at the solution, J·S·P = Q·R:
 * - leverage hᵢ = ‖row i of Q₁‖², the diagonal of the hat matrix H = Q₁Q₁ᵀ with
 *   Q₁ the first k = rank columns of Q (Golub & Van Loan, Matrix Computations,
 *   4th ed., §5.3; Belsley, Kuh & Welsch 1980, Regression Diagnostics, §2.1).
 *   (JᵀJ)⁻¹ is never formed; column scaling and pivoting leave Q₁'s span, and so
 *   H, unchanged. For a nonlinear model these are the figures of its tangent-plane
 *   linearisation at the estimate (Cook & Weisberg 1982, Residuals and Influence in
 *   Regression, §5.2; St. Laurent & Cook 1993, Biometrika 80:99–106);
 * - standardized residual rᵢ/s;
 * - internally studentized residual eᵢ* = rᵢ/(s√(1 − hᵢ));
 * - Cook's distance Dᵢ = eᵢ*² hᵢ / (p(1 − hᵢ)) (Cook 1977, Technometrics 19:15–18);
 * - studentized deleted (externally studentized) residual
 *   tᵢ = rᵢ/(s₍ᵢ₎√(1 − hᵢ)), with s₍ᵢ₎² = (ν s² − rᵢ²/(1 − hᵢ))/(ν − 1) the variance
 *   estimate without row i, ν = n − p, in closed form without refitting
 *   (Belsley, Kuh & Welsch 1980, eq. 2.14 and 2.9; Cook & Weisberg 1982, §2.2.2).
 *   For a linear model tᵢ has Student's t distribution with ν − 1 degrees of
 *   freedom under normal errors; for a nonlinear one approximately.
 * Here rᵢ are the weighted residuals and s = √(SSR/ν).
 *
 * Leverage one (tolerance, documented): a row with 1 − hᵢ ≤ τ, τ = max(1e-10, 10·n·ε),
 * is fitted exactly by construction (for instance the one point off a column of
 * equal predictor values): its residual is rounding noise and carries no
 * information, so its studentized residuals and Cook's distance are NaN (null in
 * JSON), never a division by (nearly) zero. The computed Q of a Householder QR is
 * orthogonal to about c·n·ε (Higham 2002, Accuracy and Stability of Numerical
 * Algorithms, Thm 19.4), which τ stays above; a true leverage within 1e-10 of 1
 * leaves a residual variance of 1e-10·σ², no information either. Leverages are
 * clamped to [0, 1] (rounding may put them a few ε outside).
 *
 * A deleted residual is NaN too when ν − 1 < 1, or when the other rows leave a
 * residual sum of squares at rounding level (ν − eᵢ*² ≤ 1e-12·ν): the rest of the
 * data is fitted exactly and the ratio is not a number one can read.
 *
 * Cost: forming Q₁ takes k applications of Q, O(n·p²) time in all (the same order
 * as the QR itself) and one n-vector of work space; nothing n×n is formed.
 */
import { EPSILON } from '../linalg/norm';
import type { PivotedQR } from '../linalg/qr';
import { workArray } from '../linalg/work-array';

/** τ of the module comment: 1 − hᵢ ≤ τ counts as leverage one. */
export function leverageOneTolerance(n: number): number {
  return Math.max(1e-10, 10 * n * EPSILON);
}

/** ν − eᵢ*² at or below this fraction of ν: the other rows are fitted exactly (module comment). */
const DELETED_SSR_RELATIVE = 1e-12;

/**
 * Diagonal of the hat matrix from a factored QR: hᵢ = Σ_{j<k} Q_{ij}², k = rank (default the factor's
 * numerical rank), clamped to [0, 1].
 */
export function hatDiagonal(qr: PivotedQR, k = qr.rank): Float64Array {
  const m = qr.m;
  const h = new Float64Array(m);
  const col = workArray(m);
  for (let j = 0; j < k; j++) {
    col.fill(0);
    col[j] = 1;
    // Q·e_j = H₀⋯H_j·e_j: the reflections after j leave e_j as it is (their vectors vanish above their own
    // row, where e_j has its only non-zero entry), so only the first j + 1 are applied
    qr.applyQ(col, j + 1);
    for (let i = 0; i < m; i++) h[i] += col[i] * col[i];
  }
  for (let i = 0; i < m; i++) h[i] = Math.min(1, Math.max(0, h[i]));
  return h;
}

/**
 * Leverages from the Jacobian and a p×p inverse Gram matrix C (hᵢ = Jᵢ C Jᵢᵀ). Kept for cross-checks in tests;
 * the fit uses `hatDiagonal`.
 */
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
  deletedStudentized: Float64Array;
  cooksDistance: Float64Array;
  /** Indices of the rows with leverage one (module comment). */
  exact: number[];
}

/**
 * The influence figures of the module comment. `residuals` are the weighted residuals (any common scale),
 * `s` = √(SSR/dof) in the same scale, `p` the number of parameters in Cook's distance, `dof` = n − p.
 */
export function influence(residuals: ArrayLike<number>, leverage: Float64Array, s: number, p: number, dof = residuals.length - p): Influence {
  const n = residuals.length;
  const standardized = new Float64Array(n);
  const studentized = new Float64Array(n);
  const deletedStudentized = new Float64Array(n);
  const cooksDistance = new Float64Array(n);
  const exact: number[] = [];
  const tol = leverageOneTolerance(n);
  for (let i = 0; i < n; i++) {
    const r = residuals[i];
    const h = leverage[i];
    standardized[i] = r / s;
    const oneMinusH = 1 - h;
    if (!(oneMinusH > tol)) {
      if (Number.isFinite(h)) exact.push(i);
      studentized[i] = NaN;
      deletedStudentized[i] = NaN;
      cooksDistance[i] = NaN;
      continue;
    }
    const e = r / (s * Math.sqrt(oneMinusH));
    studentized[i] = e;
    cooksDistance[i] = (e * e * h) / (p * oneMinusH);
    // s₍ᵢ₎²/s² = (ν − eᵢ*²)/(ν − 1), so tᵢ = eᵢ*·√((ν − 1)/(ν − eᵢ*²))
    const rest = dof - e * e;
    deletedStudentized[i] = dof - 1 >= 1 && rest > DELETED_SSR_RELATIVE * dof ? e * Math.sqrt((dof - 1) / rest) : NaN;
  }
  return { leverage, standardized, studentized, deletedStudentized, cooksDistance, exact };
}
