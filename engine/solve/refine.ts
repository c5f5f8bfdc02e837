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
import { norm2, EPSILON } from '../linalg/norm';
import { workArray } from '../linalg/work-array';

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
  /** Optional n-vectors (each length ≥ n, distinct) reused instead of allocating three per call; contents overwritten. */
  workspace?: RefineWorkspace;
}

export interface RefineWorkspace {
  rho: Float64Array;
  f: Float64Array;
  fl: Float64Array;
}

/** Three n-vectors for `RefineInput.workspace`. */
export function refineWorkspace(n: number): RefineWorkspace {
  return { rho: workArray(n), f: workArray(n), fl: workArray(n) };
}

/** Refines x in place (full-rank factorisations only); returns the number of corrections applied. */
/** 2^27 + 1, Dekker's splitting constant. */
const SPLITTER = 134217729;

/**
 * accH/accL (per row, double-double) += (aHi + aLo)[:, j]·xj for every column j,
 * with Dekker's exact product and Knuth's TwoSum inlined (column-oriented,
 * contiguous, allocation-free). The low parts are combined in plain double,
 * an absolute error of about ε²·Σ|Aᵢⱼxⱼ| — far below ε·|result|.
 */
function accumulateProducts(n: number, p: number, aHi: Float64Array, aLo: Float64Array | null, x: Float64Array, sign: number, accH: Float64Array, accL: Float64Array): void {
  for (let j = 0; j < p; j++) {
    const xj = sign * x[j];
    let t = SPLITTER * xj;
    const xh = t - (t - xj);
    const xl = xj - xh;
    const o = j * n;
    for (let i = 0; i < n; i++) {
      const a = aHi[o + i];
      const prod = a * xj;
      t = SPLITTER * a;
      const ah = t - (t - a);
      const al = a - ah;
      let e = ((ah * xh - prod) + ah * xl + al * xh) + al * xl;
      if (aLo) e += aLo[o + i] * xj;
      const h = accH[i];
      const sum = h + prod;
      const bb = sum - h;
      const err = (h - (sum - bb)) + (prod - bb) + (accL[i] + e);
      const hi = sum + err;
      accL[i] = err - (hi - sum);
      accH[i] = hi;
    }
  }
}

/** Σᵢ (aHi + aLo)[i, j]·v[i] in double-double, rounded to double. */
function columnDot(n: number, j: number, aHi: Float64Array, aLo: Float64Array | null, v: Float64Array): number {
  let h = 0;
  let l = 0;
  const o = j * n;
  for (let i = 0; i < n; i++) {
    const a = aHi[o + i];
    const vi = v[i];
    const prod = a * vi;
    let t = SPLITTER * a;
    const ah = t - (t - a);
    const al = a - ah;
    t = SPLITTER * vi;
    const vh = t - (t - vi);
    const vl = vi - vh;
    let e = ((ah * vh - prod) + ah * vl + al * vh) + al * vl;
    if (aLo) e += aLo[o + i] * vi;
    const sum = h + prod;
    const bb = sum - h;
    const err = (h - (sum - bb)) + (prod - bb) + (l + e);
    h = sum + err;
    l = err - (h - sum);
  }
  return h + l;
}

/** Refines x in place (full-rank factorisations only); returns the number of corrections applied. */
export function refineLeastSquares(input: RefineInput, x: Float64Array): number {
  const { qr, n, p, aHi, aLo, bHi, bLo } = input;
  const maxSteps = input.maxSteps ?? 10;
  if (qr.rank < p || p === 0 || maxSteps <= 0) return 0;
  const ws = input.workspace;
  const usable = ws !== undefined && ws.rho.length >= n && ws.f.length >= n && ws.fl.length >= n;
  const { rho, f, fl } = usable ? ws : refineWorkspace(n);
  const h = new Float64Array(p);
  const z = new Float64Array(p);
  const dx = new Float64Array(p);
  const xs = new Float64Array(p);

  // out ← b − ρ − A·x in double-double, rounded (ρ omitted on the first call).
  const residual = (out: Float64Array, withRho: boolean) => {
    for (let i = 0; i < n; i++) {
      out[i] = bHi[i];
      fl[i] = bLo ? bLo[i] : 0;
      if (withRho) {
        // TwoSum of bHi − ρ keeps the exact difference.
        const a = out[i];
        const b = -rho[i];
        const sum = a + b;
        const bb = sum - a;
        fl[i] += (a - (sum - bb)) + (b - bb);
        out[i] = sum;
      }
    }
    accumulateProducts(n, p, aHi, aLo, x, -1, out, fl);
    for (let i = 0; i < n; i++) out[i] += fl[i];
  };
  residual(rho, false);

  let previous = Infinity;
  let applied = 0;
  for (let step = 0; step < maxSteps; step++) {
    residual(f, true);
    // g = −Aᵀρ, permuted and scaled for the factorisation: h = PᵀS·g.
    for (let j = 0; j < p; j++) {
      const c = qr.perm[j];
      h[j] = -qr.scale[c] * columnDot(n, c, aHi, aLo, rho);
    }
    qr.solveRt(h, p);
    // f is recomputed at the next step, so Qᵀf and then δρ = Q·[h; d₂] are formed in place in it.
    const e = f;
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
    applied++;
    previous = zn;
    // Converged, or the last allowed step: ρ would not be read again.
    if (zn <= EPSILON * norm2(xs) || step + 1 >= maxSteps) break;
    for (let j = 0; j < p; j++) e[j] = h[j];
    qr.applyQ(e);
    for (let i = 0; i < n; i++) rho[i] += e[i];
  }
  return applied;
}
