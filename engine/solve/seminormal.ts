/**
 * Iterative refinement of a linear least-squares solution, min ‖A·x − b‖₂, by
 * the corrected seminormal equations: with R the triangular factor of a
 * Householder QR of A·S·P (its Q is not needed),
 *
 *     f = b − A·x,   g = Aᵀ·f,   (RᵀR)·z = Pᵀ·S·g,   x ← x + S·P·z,
 *
 * where f is formed and kept in double-double and g is accumulated in
 * double-double from f's two parts, both in ONE pass over the rows of A
 * (A = aHi + aLo and b = bHi + bLo may be double-double). Method: Å. Björck,
 * "Stability analysis of the method of seminormal equations for linear least
 * squares problems", Linear Algebra Appl. 88/89 (1987) 31–48, and Björck,
 * Numerical Methods for Least Squares Problems (SIAM 1996) §2.9.2; N. J. Higham,
 * Accuracy and Stability of Numerical Algorithms, 2nd ed. (SIAM 2002), ch. 20
 * (§20.5 iterative refinement, §20.6 the seminormal equations).
 *
 * Why it converges, and to what: R is the exact factor of A·S + δA with
 * ‖δA‖ ≤ c·m·ε‖A·S‖ (Higham Thm 19.4), so (RᵀR)⁻¹ is an approximate inverse of
 * SAᵀAS and each step contracts the error by a factor of about c·κ(A·S)²·ε;
 * the fixed point solves the normal equations Aᵀ(b − A·x) = 0 of the
 * double-double problem to the accuracy of g, which is ε²‖A‖‖f‖ because f is
 * never rounded to double (rounding f would leave the κ²ε‖r‖ floor of plain
 * seminormal equations; the augmented refinement of `refine.ts` avoids that floor
 * by refining ρ as well, at the price of two applications of Q per step).
 * Here each step costs one pass over A and p×p work, against the augmented
 * method's pass plus applications of Q and Qᵀ (four passes over an m×p array).
 *
 * Stopping (documented, the same rules as `refine.ts`): at most `maxSteps`
 * (default 10) corrections; converged when ‖z‖₂ ≤ ε·‖S⁻¹x‖₂; stagnation when
 * ‖z‖ is not at most half the previous one (that correction is not applied).
 * The caller learns whether it converged and falls back to the augmented method
 * when it did not (`linear.ts`).
 */
import type { PivotedQR } from '../linalg/qr';
import type { RefineInput } from './refine';
import { norm2, EPSILON } from '../linalg/norm';

/** 2^27 + 1, Dekker's splitting constant. */
const SPLITTER = 134217729;

/** The problem as `refine.ts` takes it (qr: factor of A·S·P, full rank; only R, P and S are read), without the n-vector workspace this method does not need. */
export type SeminormalInput = Omit<RefineInput, 'workspace'>;

export interface SeminormalOutcome {
  /** Corrections applied. */
  applied: number;
  /** The last correction met ‖z‖ ≤ ε·‖S⁻¹x‖ (stagnation or the step limit: false). */
  converged: boolean;
}

/**
 * g ← Aᵀ(b − A·x), with f = b − A·x per row in double-double (Dekker's exact
 * product, Knuth's TwoSum) and each gⱼ accumulated in double-double from f's
 * two parts; one pass over the rows. The low parts of the products with aLo and
 * of f·aLo are added in plain double (absolute error about ε²·Σ|Aᵢⱼxⱼ|).
 * `gh`, `gl`, `xh`, `xl` are p-vectors of work space.
 */
export function residualGradient(n: number, p: number, aHi: Float64Array, aLo: Float64Array | null, bHi: Float64Array, bLo: Float64Array | null, x: Float64Array, g: Float64Array, work: Float64Array): void {
  const gh = work.subarray(0, p);
  const gl = work.subarray(p, 2 * p);
  const xh = work.subarray(2 * p, 3 * p);
  const xl = work.subarray(3 * p, 4 * p);
  for (let j = 0; j < p; j++) {
    gh[j] = 0;
    gl[j] = 0;
    const xj = x[j];
    const t = SPLITTER * xj;
    xh[j] = t - (t - xj);
    xl[j] = xj - xh[j];
  }
  for (let i = 0; i < n; i++) {
    // f = b − Σⱼ Aᵢⱼxⱼ in double-double
    let fh = bHi[i];
    let fl = bLo ? bLo[i] : 0;
    for (let j = 0; j < p; j++) {
      const k = j * n + i;
      const a = aHi[k];
      const xj = -x[j];
      const prod = a * xj;
      let t = SPLITTER * a;
      const ah = t - (t - a);
      const al = a - ah;
      let e = ((ah * -xh[j] - prod) + ah * -xl[j] + al * -xh[j]) + al * -xl[j];
      if (aLo) e += aLo[k] * xj;
      const sum = fh + prod;
      const bb = sum - fh;
      const err = (fh - (sum - bb)) + (prod - bb) + (fl + e);
      fh = sum + err;
      fl = err - (fh - sum);
    }
    // gⱼ += Aᵢⱼ·(fh + fl) in double-double
    let t = SPLITTER * fh;
    const fhh = t - (t - fh);
    const fhl = fh - fhh;
    for (let j = 0; j < p; j++) {
      const k = j * n + i;
      const a = aHi[k];
      const prod = a * fh;
      t = SPLITTER * a;
      const ah = t - (t - a);
      const al = a - ah;
      let e = ((ah * fhh - prod) + ah * fhl + al * fhh) + al * fhl;
      e += a * fl;
      if (aLo) e += aLo[k] * fh;
      const h = gh[j];
      const sum = h + prod;
      const bb = sum - h;
      const err = (h - (sum - bb)) + (prod - bb) + (gl[j] + e);
      const hi = sum + err;
      gl[j] = err - (hi - sum);
      gh[j] = hi;
    }
  }
  for (let j = 0; j < p; j++) g[j] = gh[j] + gl[j];
}

/** z ← (RᵀR)⁻¹·Pᵀ·S·g in factor coordinates (k = rank = p). */
function seminormalSolve(qr: PivotedQR, p: number, g: Float64Array, z: Float64Array): void {
  for (let j = 0; j < p; j++) {
    const c = qr.perm[j];
    z[j] = qr.scale[c] * g[c];
  }
  qr.solveRt(z, p);
  qr.solveR(z, p);
}

/** Refines x in place by the corrected seminormal equations (module comment). */
export function refineSeminormal(input: SeminormalInput, x: Float64Array): SeminormalOutcome {
  const { qr, n, p, aHi, aLo, bHi, bLo } = input;
  const maxSteps = input.maxSteps ?? 10;
  const out: SeminormalOutcome = { applied: 0, converged: false };
  if (qr.rank < p || p === 0 || maxSteps <= 0) return out;
  const g = new Float64Array(p);
  const z = new Float64Array(p);
  const dx = new Float64Array(p);
  const xs = new Float64Array(p);
  const work = new Float64Array(4 * p);
  let previous = Infinity;
  for (let step = 0; step < maxSteps; step++) {
    residualGradient(n, p, aHi, aLo, bHi, bLo, x, g, work);
    seminormalSolve(qr, p, g, z);
    const zn = norm2(z);
    if (!Number.isFinite(zn) || zn > 0.5 * previous) return out;
    qr.toOriginal(z, dx, p);
    for (let j = 0; j < p; j++) {
      x[j] += dx[j];
      xs[j] = x[j] / qr.scale[j];
    }
    out.applied++;
    previous = zn;
    if (zn <= EPSILON * norm2(xs)) {
      out.converged = true;
      return out;
    }
  }
  return out;
}

/**
 * Upper bound on the 2-norm condition number of the leading p×p block R of a
 * factor: ‖R‖_F·‖R⁻¹‖_F ≥ ‖R‖₂‖R⁻¹‖₂ = κ₂(R) (Golub & Van Loan, Matrix
 * Computations, 4th ed., §2.3.2, ‖·‖₂ ≤ ‖·‖_F). O(p³) from R alone.
 */
export function conditionBound(qr: PivotedQR, p: number): number {
  const { a, m, rdiag } = qr;
  let rf = 0;
  for (let j = 0; j < p; j++) {
    rf += rdiag[j] * rdiag[j];
    for (let i = 0; i < j; i++) rf += a[i + j * m] * a[i + j * m];
  }
  // ‖R⁻¹‖_F by back substitution on the unit vectors (column c of R⁻¹ is zero below row c)
  const col = new Float64Array(p);
  let inf = 0;
  for (let c = 0; c < p; c++) {
    col.fill(0);
    col[c] = 1 / rdiag[c];
    for (let i = c - 1; i >= 0; i--) {
      let s = 0;
      for (let l = i + 1; l <= c; l++) s += a[i + l * m] * col[l];
      col[i] = -s / rdiag[i];
    }
    for (let i = 0; i <= c; i++) inf += col[i] * col[i];
  }
  const k = Math.sqrt(rf) * Math.sqrt(inf);
  return Number.isFinite(k) ? k : Infinity;
}
