/**
 * The Levenberg–Marquardt parameter λ for a trust region of radius Δ:
 * find λ ≥ 0 such that the solution x(λ) of
 *     min ‖ [J; √λ·D] x − [r; 0] ‖₂
 * satisfies ‖D·x‖ ≈ Δ (|‖Dx‖ − Δ| ≤ 0.1·Δ), or λ = 0 when the Gauss–Newton
 * step is already inside (‖Dx(0)‖ ≤ 1.1·Δ).
 *
 * Method: Moré, "The Levenberg-Marquardt algorithm: implementation and
 * theory" (LNM 630, 1978), §5 (Algorithm (5.5)): Newton's method on
 * φ(λ) = ‖Dx(λ)‖ − Δ with safeguarding bounds [l, u] (eq. (5.6)-(5.8)):
 * l from the Gauss–Newton step when J has full rank, u = ‖(JD⁻¹)ᵀr‖/Δ.
 * At most 10 iterations, as in Moré's implementation. Each trial λ costs one
 * O(p²) Givens reduction (`linalg/damped.ts`), not a refactorisation.
 */
import { solveDampedR } from '../linalg/damped';
import { norm2, TINY } from '../linalg/norm';

/** Safeguard iteration limit (Moré 1978 §5). */
const MAX_ITERATIONS = 10;

export class LMParameter {
  readonly sdiag: Float64Array;
  private readonly wa1: Float64Array;
  private readonly wa2: Float64Array;
  private readonly dscaled: Float64Array;

  constructor(p: number) {
    this.sdiag = new Float64Array(p);
    this.wa1 = new Float64Array(p);
    this.wa2 = new Float64Array(p);
    this.dscaled = new Float64Array(p);
  }

  /**
   * `r` (p×p, leading dimension p): R of J·P = Q·R in the upper triangle
   * (preserved; lower triangle overwritten). `perm`: the pivoting. `diag`: D
   * in original order. `qtb`: first p entries of Qᵀr. `par`: previous λ (start).
   * Writes the step solution x (original order; the LM step is −x) and returns λ.
   */
  compute(p: number, r: Float64Array, perm: Int32Array, diag: Float64Array, qtb: Float64Array, delta: number, par: number, x: Float64Array): number {
    const { wa1, wa2, sdiag } = this;
    // Gauss–Newton direction (least-squares solution if R is singular).
    let nsing = p;
    for (let j = 0; j < p; j++) {
      wa1[j] = qtb[j];
      if (r[j + j * p] === 0 && nsing === p) nsing = j;
      if (nsing < p) wa1[j] = 0;
    }
    for (let j = nsing - 1; j >= 0; j--) {
      wa1[j] /= r[j + j * p];
      const t = wa1[j];
      for (let i = 0; i < j; i++) wa1[i] -= r[i + j * p] * t;
    }
    for (let j = 0; j < p; j++) x[perm[j]] = wa1[j];

    let iter = 0;
    for (let j = 0; j < p; j++) wa2[j] = diag[j] * x[j];
    let dxnorm = norm2(wa2, 0, p);
    let fp = dxnorm - delta;
    if (fp <= 0.1 * delta) return 0;

    // Lower bound l (eq. 5.7); zero when J is rank deficient.
    let parl = 0;
    if (nsing >= p) {
      for (let j = 0; j < p; j++) {
        const l = perm[j];
        wa1[j] = diag[l] * (wa2[l] / dxnorm);
      }
      for (let j = 0; j < p; j++) {
        let sum = 0;
        for (let i = 0; i < j; i++) sum += r[i + j * p] * wa1[i];
        wa1[j] = (wa1[j] - sum) / r[j + j * p];
      }
      const t = norm2(wa1, 0, p);
      parl = fp / delta / t / t;
    }
    // Upper bound u = ‖(J·D⁻¹)ᵀ r‖ / Δ.
    for (let j = 0; j < p; j++) {
      let sum = 0;
      for (let i = 0; i <= j; i++) sum += r[i + j * p] * qtb[i];
      wa1[j] = sum / diag[perm[j]];
    }
    const gnorm = norm2(wa1, 0, p);
    let paru = gnorm / delta;
    if (paru === 0) paru = TINY / Math.min(delta, 0.1);

    par = Math.min(Math.max(par, parl), paru);
    if (par === 0) par = gnorm / dxnorm;

    for (;;) {
      iter++;
      if (par === 0) par = Math.max(TINY, 0.001 * paru);
      const s = Math.sqrt(par);
      for (let j = 0; j < p; j++) this.dscaled[j] = s * diag[j];
      solveDampedR(p, r, p, perm, this.dscaled, qtb, x, sdiag, wa2);
      for (let j = 0; j < p; j++) wa2[j] = diag[j] * x[j];
      dxnorm = norm2(wa2, 0, p);
      const previous = fp;
      fp = dxnorm - delta;
      // Accept when within 10% of Δ, or when λ cannot usefully decrease further, or at the limit.
      if (Math.abs(fp) <= 0.1 * delta || (parl === 0 && fp <= previous && previous < 0) || iter === MAX_ITERATIONS) break;
      // Newton correction (eq. 5.5), using S from the Givens reduction.
      for (let j = 0; j < p; j++) {
        const l = perm[j];
        wa1[j] = diag[l] * (wa2[l] / dxnorm);
      }
      for (let j = 0; j < p; j++) {
        wa1[j] /= sdiag[j];
        const t = wa1[j];
        for (let i = j + 1; i < p; i++) wa1[i] -= r[i + j * p] * t;
      }
      const t = norm2(wa1, 0, p);
      const parc = fp / delta / t / t;
      if (fp > 0) parl = Math.max(parl, par);
      if (fp < 0) paru = Math.min(paru, par);
      par = Math.max(parl, par + parc);
    }
    return par;
  }
}
