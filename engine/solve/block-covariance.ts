/**
 * The exact unscaled covariance (JᵀJ)⁻¹ of a block-angular least-squares
 * problem (engine/solve/block-lm.ts), from the groups' triangles, without
 * forming J or any matrix of size n × (pₛ + G·p_l).
 *
 * Each group's triangle T_g = [[R_g, S_g], [0, Ŝ_g]] (R_g: p_l×p_l, S_g:
 * p_l×pₛ, Ŝ_g the rest of its shared columns) is the R factor of that group's
 * rows of J after its own Householder QR; the Ŝ_g of all groups, stacked and
 * reduced by QR, give the shared triangle C (pₛ×pₛ). Then R of the whole J
 * is block upper triangular with diagonal blocks R_1 … R_G, C and
 * off-diagonal blocks S_g, and its inverse has blocks R_g⁻¹, C⁻¹ and
 * −X_g with X_g = R_g⁻¹ S_g C⁻¹ (Björck 1996, §6.3.2), so
 *
 *   Cov(θₛ, θₛ) = C⁻¹C⁻ᵀ,    Cov(θ_g, θₛ) = −X_g C⁻ᵀ,
 *   Cov(θ_g, θ_g) = R_g⁻¹R_g⁻ᵀ + X_g X_gᵀ,   Cov(θ_g, θ_h) = X_g X_hᵀ (g ≠ h).
 *
 * Rank: a diagonal entry |R_jj| ≤ RANK_TOLERANCE · (the norm of that column of
 * J) counts as zero (the relative test of a pivoted QR; a column that is a
 * combination of the others leaves a diagonal at rounding level). The
 * covariance of a group with such a column, or of every parameter when C has
 * one, is NaN: it is not determined by the data.
 */
import { householder } from './block-lm';

/** Relative size of a triangle's diagonal entry, against its column norm in J, below which the column counts as dependent (rounding level of double arithmetic times a margin). */
export const RANK_TOLERANCE = 1e-10;

export interface BlockCovariance {
  /** Unscaled Cov(θₛ) (pₛ×pₛ row-major). */
  shared: Float64Array;
  /** Per group: unscaled covariance of (θₛ, θ_g) in that order ((pₛ+p_l)² row-major), and X_g (p_l×pₛ row-major) for the covariance between groups. */
  groups: { cov: Float64Array; x: Float64Array; determined: boolean }[];
  /** False when C is singular (the shared parameters are not determined). */
  sharedDetermined: boolean;
}

/** Inverse of an upper-triangular q×q matrix given column-major with leading dimension `ld` at offset (row0, col0); row-major result, null when singular by the rank test. */
function upperInverse(t: Float64Array, ld: number, row0: number, col0: number, q: number, norms: ArrayLike<number>): Float64Array | null {
  const inv = new Float64Array(q * q);
  for (let j = 0; j < q; j++) {
    const d = t[(col0 + j) * ld + row0 + j];
    if (!(Math.abs(d) > RANK_TOLERANCE * norms[j]) || !Number.isFinite(d)) return null;
  }
  // solve R·X = I column by column, back substitution
  for (let c = 0; c < q; c++) {
    for (let i = q - 1; i >= 0; i--) {
      let v = i === c ? 1 : 0;
      for (let m = i + 1; m < q; m++) v -= t[(col0 + m) * ld + row0 + i] * inv[m * q + c];
      inv[i * q + c] = v / t[(col0 + i) * ld + row0 + i];
    }
  }
  return inv;
}

export function blockCovariance(triangles: readonly { t: Float64Array; w: number }[], ps: number, pl: number, norms: { shared: Float64Array; local: Float64Array }): BlockCovariance {
  const k = pl + ps + 1;
  const G = triangles.length;
  // stack the shared rows (rows pl.. of columns pl..pl+ps-1) and reduce them to C
  let acc = new Float64Array(0);
  let accRows = 0;
  for (const { t, w } of triangles) {
    const here = Math.max(0, w - pl);
    const rows = accRows + here;
    if (rows === 0 || ps === 0) continue;
    const st = new Float64Array(rows * ps);
    for (let j = 0; j < ps; j++) {
      for (let i = 0; i < accRows; i++) st[j * rows + i] = acc[j * accRows + i];
      for (let i = 0; i < here; i++) st[j * rows + accRows + i] = t[(pl + j) * w + pl + i];
    }
    householder(st, rows, ps, ps);
    const keep = Math.min(rows, ps);
    acc = new Float64Array(keep * ps);
    for (let j = 0; j < ps; j++) for (let i = 0; i < keep; i++) acc[j * keep + i] = st[j * rows + i];
    accRows = keep;
  }
  const cInv = ps === 0 ? new Float64Array(0) : accRows < ps ? null : upperInverse(acc, accRows, 0, 0, ps, norms.shared);
  const sharedDetermined = cInv !== null;
  const shared = new Float64Array(ps * ps);
  if (cInv) {
    for (let i = 0; i < ps; i++) for (let j = 0; j < ps; j++) {
      let v = 0;
      for (let m = Math.max(i, j); m < ps; m++) v += cInv[i * ps + m] * cInv[j * ps + m];
      shared[i * ps + j] = v;
    }
  } else shared.fill(NaN);

  const q = ps + pl;
  const groups = triangles.map(({ t, w }, g) => {
    const cov = new Float64Array(q * q);
    const x = new Float64Array(pl * ps);
    const rInv = w < pl ? null : upperInverse(t, w, 0, 0, pl, norms.local.subarray(g * pl, (g + 1) * pl));
    if (!rInv || !cInv) {
      cov.fill(NaN);
      x.fill(NaN);
      return { cov, x, determined: false };
    }
    // X = R⁻¹ S C⁻¹ (S: rows 0..pl-1 of the shared columns)
    const rs = new Float64Array(pl * ps);
    for (let i = 0; i < pl; i++) for (let j = 0; j < ps; j++) {
      let v = 0;
      for (let m = i; m < pl; m++) v += rInv[i * pl + m] * t[(pl + j) * w + m];
      rs[i * ps + j] = v;
    }
    for (let i = 0; i < pl; i++) for (let j = 0; j < ps; j++) {
      let v = 0;
      for (let m = 0; m <= j; m++) v += rs[i * ps + m] * cInv[m * ps + j];
      x[i * ps + j] = v;
    }
    // (θₛ, θ_g) block: [[Css, −(X Cᵀ⁻¹)ᵀ], [−X C⁻ᵀ, R⁻¹R⁻ᵀ + XXᵀ]]
    for (let i = 0; i < ps; i++) for (let j = 0; j < ps; j++) cov[i * q + j] = shared[i * ps + j];
    for (let i = 0; i < pl; i++) {
      for (let j = 0; j < ps; j++) {
        let v = 0;
        for (let m = j; m < ps; m++) v += x[i * ps + m] * cInv[j * ps + m];
        cov[(ps + i) * q + j] = -v;
        cov[j * q + ps + i] = -v;
      }
      for (let j = 0; j < pl; j++) {
        let v = 0;
        for (let m = Math.max(i, j); m < pl; m++) v += rInv[i * pl + m] * rInv[j * pl + m];
        for (let m = 0; m < ps; m++) v += x[i * ps + m] * x[j * ps + m];
        cov[(ps + i) * q + ps + j] = v;
      }
    }
    return { cov, x, determined: true };
  });
  void k;
  void G;
  return { shared, groups, sharedDetermined };
}

/** Unscaled Cov(θ_g[i], θ_h[j]) between two different groups: (X_g X_hᵀ)_ij. */
export function crossCovariance(cov: BlockCovariance, ps: number, g: number, i: number, h: number, j: number): number {
  const xg = cov.groups[g].x;
  const xh = cov.groups[h].x;
  let v = 0;
  for (let m = 0; m < ps; m++) v += xg[i * ps + m] * xh[j * ps + m];
  return v;
}
