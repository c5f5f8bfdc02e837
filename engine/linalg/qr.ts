/**
 * Householder QR factorisation with column pivoting, A·S·P = Q·R, on
 * column-major Float64Arrays (element (i, j) of an m×n matrix at i + j·m).
 *
 * Method: Businger & Golub, "Linear least squares solutions by Householder
 * transformations", Numer. Math. 7 (1965) 269-276; Golub & Van Loan, Matrix
 * Computations (4th ed.), Alg. 5.2.1 (Householder QR) and §5.4.2 (QR with
 * column pivoting). Reflectors Hⱼ = I − vvᵀ/vⱼ with vⱼ = 1 + |aⱼⱼ|/‖aⱼ‖ as in
 * Moré (1978) §3, so R's diagonal
 * is −sign(aⱼⱼ)·‖aⱼ‖. Pivoting picks the remaining column of largest norm;
 * those norms are downdated and recomputed when cancellation has eaten more
 * than half their digits (test 0.05·(‖ã‖/‖a‖)² ≤ ε).
 *
 * Column scaling (option `scale`): S = diag(1/‖aⱼ‖) equilibrates the columns
 * before pivoting, so that pivot choice and the rank test do not depend on
 * the units of the parameters.
 *
 * Numerical rank (documented tolerance): rank = number of leading k with
 * |R_kk| > τ·|R_00|, default τ = 10·max(m, n)·ε, ε = 2⁻⁵². With pivoting the
 * |R_kk| are non-increasing, so this is the usual rank-revealing test.
 *
 * The object owns its buffers (sized at construction) and allocates nothing
 * when it refactors, so solvers can keep one per problem.
 */
import { norm2, EPSILON } from './norm';
import { workArray } from './work-array';

export interface QROptions {
  /** Column pivoting. Default true. */
  pivot?: boolean;
  /** Scale columns to unit norm before factoring. Default false. */
  scale?: boolean;
  /** Relative rank tolerance τ (see module comment). Default 10·max(m, n)·ε. */
  rankTolerance?: number;
}

export function defaultRankTolerance(m: number, n: number): number {
  return 10 * Math.max(m, n, 1) * EPSILON;
}

export class PivotedQR {
  m = 0;
  n = 0;
  /** Householder vectors (on and below the diagonal) and R's strict upper triangle, m×n column-major. */
  readonly a: Float64Array;
  /** Diagonal of R. */
  readonly rdiag: Float64Array;
  /** Column j of A·S·P is column perm[j] of A·S. */
  readonly perm: Int32Array;
  /** Column scale sⱼ of original column j (1 when unscaled; 1 for zero columns). */
  readonly scale: Float64Array;
  /** 2-norms of the original columns. */
  readonly norms: Float64Array;
  rank = 0;
  /** The tolerance used for `rank`. */
  tolerance = 0;
  /** The options of the last `factor` call (so a factorisation handed on can be checked to be the one wanted). */
  pivoted = false;
  scaled = false;
  private readonly work: Float64Array;

  constructor(readonly maxRows: number, readonly maxCols: number) {
    // (per-group fits factor many small matrices: engine/linalg/work-array.ts)
    this.a = workArray(Math.max(1, maxRows * maxCols));
    this.rdiag = new Float64Array(maxCols);
    this.perm = new Int32Array(maxCols);
    this.scale = new Float64Array(maxCols);
    this.norms = new Float64Array(maxCols);
    this.work = new Float64Array(maxCols);
  }

  /** Factor the m×n matrix `src` (copied; `src` is not modified). */
  factor(src: Float64Array, m: number, n: number, options: QROptions = {}): this {
    if (m > this.maxRows || n > this.maxCols) throw new RangeError('matrix larger than the factorisation buffers');
    const { pivot = true, scale = false } = options;
    this.m = m;
    this.n = n;
    this.pivoted = pivot;
    this.scaled = scale;
    const a = this.a;
    a.set(src.subarray(0, m * n));
    const rd = this.rdiag;
    const wa = this.work;
    for (let j = 0; j < n; j++) {
      const nj = norm2(a, j * m, m);
      this.norms[j] = nj;
      const s = scale && nj > 0 && Number.isFinite(nj) ? 1 / nj : 1;
      this.scale[j] = s;
      if (s !== 1) for (let i = 0; i < m; i++) a[i + j * m] *= s;
      rd[j] = s !== 1 ? 1 : nj;
      wa[j] = rd[j];
      this.perm[j] = j;
    }
    const k = Math.min(m, n);
    for (let j = 0; j < k; j++) {
      if (pivot) this.pivotColumn(j);
      const cj = j * m;
      let ajnorm = norm2(a, cj + j, m - j);
      if (ajnorm === 0) {
        rd[j] = 0;
        continue;
      }
      if (a[cj + j] < 0) ajnorm = -ajnorm;
      for (let i = j; i < m; i++) a[cj + i] /= ajnorm;
      a[cj + j] += 1;
      const vj = a[cj + j];
      for (let c = j + 1; c < n; c++) {
        const cc = c * m;
        let sum = 0;
        for (let i = j; i < m; i++) sum += a[cj + i] * a[cc + i];
        const t = sum / vj;
        for (let i = j; i < m; i++) a[cc + i] -= t * a[cj + i];
        if (pivot && rd[c] !== 0) {
          const q = a[cc + j] / rd[c];
          rd[c] *= Math.sqrt(Math.max(0, 1 - q * q));
          const ratio = rd[c] / wa[c];
          if (0.05 * ratio * ratio <= EPSILON) {
            rd[c] = norm2(a, cc + j + 1, m - j - 1);
            wa[c] = rd[c];
          }
        }
      }
      rd[j] = -ajnorm;
    }
    for (let j = k; j < n; j++) rd[j] = 0;
    this.tolerance = options.rankTolerance ?? defaultRankTolerance(m, n);
    this.rank = this.numericalRank(this.tolerance);
    return this;
  }

  private pivotColumn(j: number): void {
    const { a, m, n, rdiag: rd, work: wa, perm } = this;
    let kmax = j;
    for (let c = j + 1; c < n; c++) if (rd[c] > rd[kmax]) kmax = c;
    if (kmax === j) return;
    for (let i = 0; i < m; i++) {
      const t = a[i + j * m];
      a[i + j * m] = a[i + kmax * m];
      a[i + kmax * m] = t;
    }
    rd[kmax] = rd[j];
    wa[kmax] = wa[j];
    const t = perm[j];
    perm[j] = perm[kmax];
    perm[kmax] = t;
  }

  /** Number of leading |R_kk| > τ·|R_00| (0 for an empty or zero matrix). */
  numericalRank(tau: number): number {
    const k = Math.min(this.m, this.n);
    if (k === 0) return 0;
    const r0 = Math.abs(this.rdiag[0]);
    if (!(r0 > 0) || !Number.isFinite(r0)) return 0;
    let r = 0;
    while (r < k && Math.abs(this.rdiag[r]) > tau * r0) r++;
    return r;
  }

  /** R(i, j) of the factorisation (upper triangular, in pivoted order). */
  r(i: number, j: number): number {
    if (i > j) return 0;
    return i === j ? this.rdiag[j] : this.a[i + j * this.m];
  }

  /** b ← Qᵀ·b for b of length m. */
  applyQt(b: Float64Array): void {
    const { a, m } = this;
    const k = Math.min(m, this.n);
    for (let j = 0; j < k; j++) this.reflect(j, b, a, m);
  }

  /** b ← Q·b for b of length m; with `first`, only the reflections H₀…H_{first−1} (for b whose entries from row `first` on are zero, the same result). */
  applyQ(b: Float64Array, first = Math.min(this.m, this.n)): void {
    const { a, m } = this;
    for (let j = Math.min(m, this.n, first) - 1; j >= 0; j--) this.reflect(j, b, a, m);
  }

  /** b ← Qᵀ·b and c ← Qᵀ·c in one sweep over the reflections (the same arithmetic as two applyQt calls, each Householder vector read once for both). */
  applyQtBoth(b: Float64Array, c: Float64Array): void {
    const { a, m } = this;
    const k = Math.min(m, this.n);
    for (let j = 0; j < k; j++) {
      const cj = j * m;
      const vj = a[cj + j];
      if (vj === 0) continue;
      let sb = 0;
      let sc = 0;
      for (let i = j; i < m; i++) {
        const v = a[cj + i];
        sb += v * b[i];
        sc += v * c[i];
      }
      const tb = -sb / vj;
      const tc = -sc / vj;
      for (let i = j; i < m; i++) {
        const v = a[cj + i];
        b[i] += tb * v;
        c[i] += tc * v;
      }
    }
  }

  private reflect(j: number, b: Float64Array, a: Float64Array, m: number): void {
    const cj = j * m;
    const vj = a[cj + j];
    if (vj === 0) return;
    let sum = 0;
    for (let i = j; i < m; i++) sum += a[cj + i] * b[i];
    const t = -sum / vj;
    for (let i = j; i < m; i++) b[i] += t * a[cj + i];
  }

  /** Solve R₁₁·z = c for the leading k×k block (k ≤ rank), in place in c. */
  solveR(c: Float64Array, k = this.rank): void {
    const { a, m, rdiag } = this;
    for (let j = k - 1; j >= 0; j--) {
      c[j] /= rdiag[j];
      const t = c[j];
      for (let i = 0; i < j; i++) c[i] -= a[i + j * m] * t;
    }
  }

  /** Solve R₁₁ᵀ·z = c (forward substitution), in place in c. */
  solveRt(c: Float64Array, k = this.rank): void {
    const { a, m, rdiag } = this;
    for (let j = 0; j < k; j++) {
      let s = c[j];
      for (let i = 0; i < j; i++) s -= a[i + j * m] * c[i];
      c[j] = s / rdiag[j];
    }
  }

  /** Map z in factor coordinates to x = S·P·z (entries beyond rank set to zero in z first). */
  toOriginal(z: Float64Array, x: Float64Array, k = this.rank): void {
    for (let j = 0; j < this.n; j++) {
      const c = this.perm[j];
      x[c] = j < k ? z[j] * this.scale[c] : 0;
    }
  }

  /**
   * Basic least-squares solution of min‖A·x − b‖₂ (x = 0 in the directions
   * beyond the numerical rank). `b` (length m) is overwritten with Qᵀb.
   */
  solveLeastSquares(b: Float64Array, x: Float64Array): void {
    this.applyQt(b);
    const z = this.work;
    for (let j = 0; j < this.rank; j++) z[j] = b[j];
    this.solveR(z);
    this.toOriginal(z, x);
  }
}
