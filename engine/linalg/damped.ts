/**
 * Damped least squares from an existing QR factorisation:
 *
 *     min ‖ [A; √λ·D] x − [b; 0] ‖₂,   D diagonal,
 *
 * given A·P = Q·R. Following Moré, "The Levenberg-Marquardt algorithm:
 * implementation and theory" (Numerical Analysis, LNM 630, 1978), §3 eq.
 * (3.4)-(3.5): the system [R; Pᵀ·√λ·D·P] is reduced to upper triangular S
 * by Givens rotations, one diagonal entry at a time, so changing λ costs
 * O(p²) instead of a new factorisation. This is the kernel of each
 * Levenberg–Marquardt step; the linear solver uses the same QR for λ = 0.
 *
 * Storage (p×p column-major, leading dimension ldr): on entry the upper
 * triangle of `r` holds R; on exit the strict lower triangle holds Sᵀ's
 * strict part and `sdiag` holds S's diagonal (R's upper triangle and
 * diagonal are preserved), as needed by the λ iteration (`solve/lm-parameter.ts`).
 */
import type { PivotedQR } from './qr';

/**
 * Solve the damped system. `diagScaled[j]` is √λ·D_j for original column j
 * (zero entries mean no damping). `qtb` holds the first p entries of Qᵀb.
 * Writes x (original column order), `sdiag` (length p) and uses `work`.
 * A zero diagonal of S gives the minimum-norm-in-those-directions solution
 * (x components beyond the first zero pivot are set to zero).
 */
export function solveDampedR(
  p: number, r: Float64Array, ldr: number, perm: Int32Array,
  diagScaled: Float64Array, qtb: Float64Array, x: Float64Array, sdiag: Float64Array, work: Float64Array,
): void {
  // Copy R to the lower triangle (as Rᵀ) and save its diagonal in x.
  for (let j = 0; j < p; j++) {
    for (let i = j; i < p; i++) r[i + j * ldr] = r[j + i * ldr];
    x[j] = r[j + j * ldr];
    work[j] = qtb[j];
  }
  for (let j = 0; j < p; j++) {
    const dj = diagScaled[perm[j]];
    if (dj !== 0) {
      for (let k = j; k < p; k++) sdiag[k] = 0;
      sdiag[j] = dj;
      // Eliminate row j of the diagonal block with rotations against rows k ≥ j of R.
      let qtbpj = 0;
      for (let k = j; k < p; k++) {
        if (sdiag[k] === 0) continue;
        const rkk = r[k + k * ldr];
        let cos: number;
        let sin: number;
        if (Math.abs(rkk) < Math.abs(sdiag[k])) {
          const cotan = rkk / sdiag[k];
          sin = 0.5 / Math.sqrt(0.25 + 0.25 * cotan * cotan);
          cos = sin * cotan;
        } else {
          const tan = sdiag[k] / rkk;
          cos = 0.5 / Math.sqrt(0.25 + 0.25 * tan * tan);
          sin = cos * tan;
        }
        r[k + k * ldr] = cos * rkk + sin * sdiag[k];
        const t = cos * work[k] + sin * qtbpj;
        qtbpj = -sin * work[k] + cos * qtbpj;
        work[k] = t;
        for (let i = k + 1; i < p; i++) {
          const rik = r[i + k * ldr];
          const u = cos * rik + sin * sdiag[i];
          sdiag[i] = -sin * rik + cos * sdiag[i];
          r[i + k * ldr] = u;
        }
      }
    }
    sdiag[j] = r[j + j * ldr];
    r[j + j * ldr] = x[j];
  }
  // Back substitution with S (singular: zero the trailing components).
  let nsing = p;
  for (let j = 0; j < p; j++) {
    if (sdiag[j] === 0 && nsing === p) nsing = j;
    if (nsing < p) work[j] = 0;
  }
  for (let j = nsing - 1; j >= 0; j--) {
    let sum = 0;
    for (let i = j + 1; i < nsing; i++) sum += r[i + j * ldr] * work[i];
    work[j] = (work[j] - sum) / sdiag[j];
  }
  for (let j = 0; j < p; j++) x[perm[j]] = work[j];
}

/** Copy R (p×p, upper triangle incl. diagonal) of `qr` into `out` with leading dimension p. */
export function copyR(qr: PivotedQR, out: Float64Array): void {
  const p = qr.n;
  const k = Math.min(qr.m, p);
  out.fill(0, 0, p * p);
  for (let j = 0; j < p; j++) {
    for (let i = 0; i < Math.min(j, k); i++) out[i + j * p] = qr.a[i + j * qr.m];
    if (j < k) out[j + j * p] = qr.rdiag[j];
  }
}

/**
 * Convenience: x = argmin ‖[A; √λ·D]x − [b; 0]‖ for the matrix factored in
 * `qr` (which must be unscaled: `scale` option off). `b` has length m and is
 * overwritten with Qᵀb. `d` is D in original column order.
 */
export function solveDamped(qr: PivotedQR, d: Float64Array, lambda: number, b: Float64Array, x: Float64Array): void {
  const p = qr.n;
  const m = qr.m;
  qr.applyQt(b);
  const r = new Float64Array(p * p);
  copyR(qr, r);
  const qtb = new Float64Array(p);
  for (let j = 0; j < Math.min(m, p); j++) qtb[j] = b[j];
  const ds = new Float64Array(p);
  const sl = Math.sqrt(Math.max(0, lambda));
  for (let j = 0; j < p; j++) ds[j] = sl * d[j];
  solveDampedR(p, r, p, qr.perm, ds, qtb, x, new Float64Array(p), new Float64Array(p));
}
