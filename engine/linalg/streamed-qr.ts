/**
 * The triangular factor of a tall matrix and its residual column in one
 * pass over the rows, without forming Q: [J | r] = Q·[R q; 0 ρ], then a
 * pivoted QR of the small R (R·P = Q₂·R₂, `qr.ts`), so that J·P = (Q·Q₂)·R₂
 * and the leading p entries of (Q·Q₂)ᵀ·r are Q₂ᵀ·q. This is all a trust-region
 * iteration needs of J (R₂, P, Qᵀr and the column norms); the m×p copy that
 * `PivotedQR.factor` makes, its p Householder vectors of length m and the
 * separate Qᵀr pass are not needed.
 *
 * Method: the rows are taken in blocks of BLOCK_ROWS; each block B is folded
 * into the running triangle T by Householder reflections of the stacked
 * matrix [T; B] that use T's triangular shape (the structured update of a
 * triangular factor by new rows: Golub & Van Loan, Matrix Computations, 4th
 * ed., §6.5.3 "Updating the QR factorization", adding rows; Demmel, Grigori,
 * Hoemmen & Langou, "Communication-optimal parallel and sequential QR and LU
 * factorizations", SIAM J. Sci. Comput. 34 (2012), the sequential TSQR).
 * Each reflection is an ordinary Householder transformation, so the result is
 * the R factor of [J | r] + δ with ‖δ‖ ≤ c·m·ε·‖[J | r]‖ column by column,
 * the same backward error bound as Householder QR of the whole matrix
 * (Higham, Accuracy and Stability of Numerical Algorithms, 2nd ed., Thm 19.4).
 * In exact arithmetic R₂ and P equal those of the pivoted QR of J itself,
 * since RᵀR = JᵀJ and pivoted QR of R chooses the same columns.
 *
 * Scaling: each column is multiplied by a power of two (exact) that brings
 * its 2-norm into [½, 2) before it enters a block, so no sum of squares can
 * overflow or underflow; R's columns are scaled back exactly afterwards.
 *
 * Rank: decided by the pivoted QR of R with the tolerance of the m×p problem,
 * τ = 10·max(m, p)·ε (`defaultRankTolerance(m, p)`), as for J itself.
 */
import { PivotedQR, defaultRankTolerance } from './qr';
import { norm2 } from './norm';

/** Rows per block: 256 rows × (p + 1) columns stay in the first-level cache for p up to about 15. */
export const BLOCK_ROWS = 256;

/**
 * From this many rows on, the trust-region solvers (`solve/reflective.ts`,
 * `solve/lm.ts` without bounds) take each iteration's R, P and Qᵀr
 * from `StreamedQR` (one pass over the rows, no m×p copy, no Q; the same R
 * and P in exact arithmetic, the same backward error bound) instead of the
 * pivoted QR of J itself. Measured on a 1e6×4 Jacobian in process
 * (2026-12-03, 2 shared cores): 97–135 ms per factorisation with Qᵀr before,
 * 48–66 ms after (the 4-parameter logistic of benchmark 14 factors 6 times). Below it the copy is cheap and small fits
 * (per-group wells, every NIST StRD nonlinear problem: n ≤ 250) keep the
 * factorisation of J, bit for bit.
 */
export const STREAMED_MIN_ROWS = 1024;

/** 2^e for integer e in [−1022, 1023], exactly. */
function powerOfTwo(e: number): number {
  return Math.pow(2, Math.max(-1022, Math.min(1023, e)));
}

/**
 * Σᵢ w[a + i]·w[b + i] for i < len, in four interleaved partial sums (so the
 * additions do not wait on each other; measured 1.6× faster on 1e6×4 than
 * one running sum), added pairwise at the end.
 */
function dot(w: Float64Array, a: number, b: number, len: number): number {
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let i = 0;
  for (; i + 3 < len; i += 4) {
    s0 += w[a + i] * w[b + i];
    s1 += w[a + i + 1] * w[b + i + 1];
    s2 += w[a + i + 2] * w[b + i + 2];
    s3 += w[a + i + 3] * w[b + i + 3];
  }
  for (; i < len; i++) s0 += w[a + i] * w[b + i];
  return (s0 + s1) + (s2 + s3);
}

export class StreamedQR {
  /** Columns of J. */
  readonly p: number;
  /** Pivoted QR of the p×p factor R of J: its `perm`, `rdiag`, `a` and `r(i, j)` describe R₂ and P. */
  readonly small: PivotedQR;
  /** 2-norms of J's columns (the same `norm2` of the same numbers as `PivotedQR.norms`). */
  readonly norms: Float64Array;
  /** The leading p entries of (Q·Q₂)ᵀ·r, in the pivoted order of `small`. */
  readonly qtr: Float64Array;
  /** ρ = ‖r − J·x‖ at the least-squares x (the norm of what J cannot reach). */
  unexplained = 0;
  private readonly k: number;
  /** Running triangle of [J·S | r·s], k×k column-major. */
  private readonly t: Float64Array;
  /** One block of scaled rows, BLOCK_ROWS×k column-major. */
  private readonly w: Float64Array;
  private readonly colScale: Float64Array;
  private readonly rp: Float64Array;

  constructor(p: number) {
    this.p = p;
    this.k = p + 1;
    this.small = new PivotedQR(p, p);
    this.norms = new Float64Array(p);
    this.qtr = new Float64Array(p);
    this.t = new Float64Array(this.k * this.k);
    this.w = new Float64Array(BLOCK_ROWS * this.k);
    this.colScale = new Float64Array(this.k);
    this.rp = new Float64Array(p * p);
  }

  /**
   * Factor the m×p column-major `jac` with the residual column `r` (length m),
   * both finite; neither is modified. Afterwards `small`, `norms` and `qtr`
   * hold the factorisation described in the module comment.
   */
  factor(jac: Float64Array, r: Float64Array, m: number): this {
    const { p, k, t, w, colScale } = this;
    for (let c = 0; c < k; c++) {
      const nc = c < p ? norm2(jac, c * m, m) : norm2(r, 0, m);
      if (c < p) this.norms[c] = nc;
      colScale[c] = nc > 0 && Number.isFinite(nc) ? powerOfTwo(-Math.round(Math.log2(nc))) : 1;
    }
    t.fill(0);
    const B = BLOCK_ROWS;
    for (let b0 = 0; b0 < m; b0 += B) {
      const bl = Math.min(B, m - b0);
      for (let c = 0; c < k; c++) {
        const s = colScale[c];
        const src = c < p ? jac : r;
        const off = c < p ? c * m + b0 : b0;
        const oc = c * B;
        for (let i = 0; i < bl; i++) w[oc + i] = src[off + i] * s;
      }
      this.foldBlock(bl);
    }
    // R = T₁₁·S⁻¹ (exact: powers of two), q = T₁ₖ/s_r
    const rp = this.rp;
    for (let j = 0; j < p; j++) {
      const s = 1 / colScale[j];
      for (let i = 0; i < p; i++) rp[i + j * p] = i <= j ? t[i + j * k] * s : 0;
    }
    const sr = 1 / colScale[p];
    for (let i = 0; i < p; i++) this.qtr[i] = t[i + p * k] * sr;
    this.unexplained = Math.abs(t[p + p * k]) * sr;
    this.small.factor(rp, p, p, { pivot: true, rankTolerance: defaultRankTolerance(m, p) });
    this.small.applyQt(this.qtr);
    return this;
  }

  /**
   * Householder reflections of [T; W] (W the first `bl` rows of the block),
   * column by column: Hⱼ = I − β·v·vᵀ with v = (Tⱼⱼ − α, W[:, j]) on row j of
   * T and the block's rows, α = −sign(Tⱼⱼ)·‖(Tⱼⱼ, W[:, j])‖, β = 1/(‖·‖·|v₀|)
   * (vᵀv = 2‖·‖·|v₀|); T's rows below j are zero in column j and untouched.
   */
  private foldBlock(bl: number): void {
    const { k, t, w } = this;
    const B = BLOCK_ROWS;
    for (let j = 0; j < k; j++) {
      const oj = j * B;
      const ss = dot(w, oj, oj, bl);
      if (ss === 0) continue; // the block is already zero in this column: Hⱼ = I
      const tjj = t[j + j * k];
      const nrm = Math.sqrt(tjj * tjj + ss);
      const alpha = tjj >= 0 ? -nrm : nrm;
      const v0 = tjj - alpha;
      const beta = 1 / (nrm * Math.abs(v0));
      for (let c = j + 1; c < k; c++) {
        const oc = c * B;
        const s = (v0 * t[j + c * k] + dot(w, oj, oc, bl)) * beta;
        t[j + c * k] -= s * v0;
        for (let i = 0; i < bl; i++) w[oc + i] -= s * w[oj + i];
      }
      t[j + j * k] = alpha;
    }
  }
}
