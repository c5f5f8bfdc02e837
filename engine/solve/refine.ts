/**
 * Iterative refinement of a linear least-squares solution, min ‖A·x − b‖₂,
 * on the augmented system
 *
 *     [ I   A ] [ρ]   [b]
 *     [ Aᵀ  0 ] [x] = [0],      ρ = b − A·x the residual,
 *
 * after Å. Björck, "Iterative refinement of linear least squares solutions I",
 * BIT 7 (1967) 257-278 (also Björck, Numerical Methods for Least Squares
 * Problems, SIAM 1996, §2.9.3). Each step forms the residuals of both block
 * equations in double-double arithmetic (`linalg/dd.ts`), f = b − ρ − A·x and
 * g = −Aᵀρ, and solves the correction with the existing QR factors of
 * A·S·P = Q·R:  Rᵀh = PᵀS·g,  d = Qᵀf,  R·z = d₁ − h,  δx = S·P·z,
 * δρ = Q·[h; d₂]. A and b may themselves be given in double-double
 * (hi + lo), so the refined solution is that of the more accurate problem.
 * Unlike refinement of x alone, this converges for large residuals too, as
 * long as κ(A·S)·ε < 1.
 *
 * Stopping (documented): at most `maxSteps` (default 10) steps; stop when the
 * correction ‖z‖₂ ≤ ε·‖S⁻¹x‖₂ (nothing left to gain), or when it is not at
 * least halved relative to the previous one (stagnation; that correction is
 * not applied).
 */
import type { PivotedQR } from '../linalg/qr';
import { DDAccumulator } from '../linalg/dd';
import { norm2, EPSILON } from '../linalg/norm';

export interface RefineInput {
  qr: PivotedQR;
  n: number;
  p: number;
  aHi: Float64Array;
  /** Low parts of A (zeros when A is exact in double). */
  aLo: Float64Array | null;
  bHi: Float64Array;
  bLo: Float64Array | null;
  maxSteps?: number;
}

/** Refines x in place (full-rank factorisations only); returns the number of corrections applied. */
export function refineLeastSquares(input: RefineInput, x: Float64Array): number {
  const { qr, n, p, aHi, aLo, bHi, bLo } = input;
  const maxSteps = input.maxSteps ?? 10;
  if (qr.rank < p || p === 0) return 0;
  const acc = new DDAccumulator();
  const rho = new Float64Array(n);
  const f = new Float64Array(n);
  const e = new Float64Array(n);
  const g = new Float64Array(p);
  const h = new Float64Array(p);
  const z = new Float64Array(p);
  const dx = new Float64Array(p);
  const xs = new Float64Array(p);

  // f ← b − ρ − A·x (ρ = 0 gives the plain residual b − A·x).
  const residual = (out: Float64Array, withRho: boolean) => {
    for (let i = 0; i < n; i++) {
      acc.reset(bHi[i], bLo ? bLo[i] : 0);
      if (withRho) acc.add(-rho[i], 0);
      for (let j = 0; j < p; j++) {
        const k = j * n + i;
        acc.addProductDD(-aHi[k], aLo ? -aLo[k] : 0, x[j]);
      }
      out[i] = acc.hi + acc.lo;
    }
  };
  residual(rho, false);

  let previous = Infinity;
  let applied = 0;
  for (let step = 0; step < maxSteps; step++) {
    residual(f, true);
    for (let j = 0; j < p; j++) {
      acc.reset();
      for (let i = 0; i < n; i++) {
        const k = j * n + i;
        acc.addProductDD(aHi[k], aLo ? aLo[k] : 0, rho[i]);
      }
      g[j] = -(acc.hi + acc.lo);
    }
    for (let j = 0; j < p; j++) {
      const c = qr.perm[j];
      h[j] = qr.scale[c] * g[c];
    }
    qr.solveRt(h, p);
    e.set(f);
    qr.applyQt(e);
    for (let j = 0; j < p; j++) z[j] = e[j] - h[j];
    qr.solveR(z, p);
    const zn = norm2(z);
    if (!Number.isFinite(zn) || zn > 0.5 * previous) break;
    qr.toOriginal(z, dx, p);
    for (let j = 0; j < p; j++) {
      x[j] += dx[j];
      xs[j] = x[j] / qr.scale[j];
    }
    for (let j = 0; j < p; j++) e[j] = h[j];
    qr.applyQ(e);
    for (let i = 0; i < n; i++) rho[i] += e[i];
    applied++;
    previous = zn;
    if (zn <= EPSILON * norm2(xs)) break;
  }
  return applied;
}
