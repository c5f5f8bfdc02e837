/**
 * Inverses from the triangular factor of a (pivoted, scaled) QR
 * factorisation, for covariance matrices: with A·S·P = Q·R,
 *   (AᵀA)⁻¹ = S·P·(RᵀR)⁻¹·Pᵀ·S = S·P·R⁻¹R⁻ᵀ·Pᵀ·S.
 * R⁻¹ by column-oriented back substitution (Golub & Van Loan, Matrix
 * Computations, Alg. 3.1.2 applied to the unit vectors), never by forming AᵀA.
 */
import type { PivotedQR } from './qr';
import { workArray } from './work-array';

/** Inverse of the leading k×k block of R (upper triangular), k×k column-major. */
export function inverseR(qr: PivotedQR, k = qr.rank): Float64Array {
  const inv = workArray(k * k);
  const { a, m, rdiag } = qr;
  for (let c = 0; c < k; c++) {
    // Solve R·x = e_c; x is zero below row c.
    inv[c + c * k] = 1 / rdiag[c];
    for (let i = c - 1; i >= 0; i--) {
      let s = 0;
      for (let l = i + 1; l <= c; l++) s += a[i + l * m] * inv[l + c * k];
      inv[i + c * k] = -s / rdiag[i];
    }
  }
  return inv;
}

/**
 * (AᵀA)⁻¹ (p×p, column-major, original column order) from the factorisation
 * of A; with `withScale` false, (SᵀAᵀAS)⁻¹ = S⁻¹(AᵀA)⁻¹S⁻¹ of the
 * equilibrated columns instead (entries bounded by κ², never under- or
 * overflowing with the units of the columns). When rank k < p, rows and columns of the parameters beyond the rank
 * (in pivot order) are NaN and the remaining block is (A₁ᵀA₁)⁻¹ of the
 * k retained columns, i.e. the covariance with the others held fixed.
 */
export function inverseGram(qr: PivotedQR, k = qr.rank, withScale = true): Float64Array {
  const p = qr.n;
  const ri = inverseR(qr, k);
  const out = new Float64Array(p * p).fill(NaN);
  for (let i = 0; i < k; i++) {
    for (let j = i; j < k; j++) {
      // (R⁻¹R⁻ᵀ)_ij = Σ_l Rinv[i,l]·Rinv[j,l], l ≥ max(i, j)
      let s = 0;
      for (let l = j; l < k; l++) s += ri[i + l * k] * ri[j + l * k];
      const oi = qr.perm[i];
      const oj = qr.perm[j];
      const v = withScale ? s * qr.scale[oi] * qr.scale[oj] : s;
      out[oi + oj * p] = v;
      out[oj + oi * p] = v;
    }
  }
  return out;
}
