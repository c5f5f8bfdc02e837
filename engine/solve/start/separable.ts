/**
 * Separable least squares (variable projection, Golub & Pereyra, "The
 * differentiation of pseudo-inverses and nonlinear least squares problems
 * whose variables separate", SIAM J. Numer. Anal. 10 (1973) 413–432).
 *
 * The free parameters split into a linear set L (the model is linear in L
 * with the others held: f(θ) = f(θ_L = 0) + J_L·θ_L exactly) and the rest N.
 * For any θ_N the best θ_L solves a weighted linear least-squares problem,
 *     min ‖√w ⊙ (y − f(θ_N, 0)) − (√w ⊙ J_L)·θ_L‖²,
 * here with the project's Householder QR with column pivoting on unit-norm
 * columns (engine/linalg/qr.ts; rank by its documented relative tolerance
 * 10·max(n, q)·ε, basic solution beyond the rank). The normal equations are
 * never formed. The solution is clamped to the bounds of L.
 *
 * `project` applies P⊥ = I − Q₁Q₁ᵀ (Q₁: the first rank columns of Q) for the
 * Kaufman approximation of the reduced Jacobian (reduced.ts).
 */
import { PivotedQR } from '../../linalg/qr';
import type { StartInput } from './types';
import { workArray } from '../../linalg/work-array';

/** Greedy linear set: q joins L (declaration order) when the model stays linear in L ∪ {q}. */
export function linearSet(input: Pick<StartInput, 'isLinearIn' | 'parameters'>, among: readonly number[]): number[] {
  const linear: number[] = [];
  for (const j of among) {
    if (input.isLinearIn([...linear, j].map((k) => input.parameters[k].name))) linear.push(j);
  }
  return linear;
}

export class SeparableSolver {
  readonly q: number;
  /** Whether the last `solve` clamped a linear parameter to a bound. */
  clamped = false;
  /** Residuals √w ⊙ (y − f) after the last `solve` (length n). */
  readonly r: Float64Array;
  private readonly f: Float64Array;
  private readonly jac: Float64Array;
  private readonly a: Float64Array;
  private readonly b: Float64Array;
  private readonly c: Float64Array;
  private readonly qr: PivotedQR;

  constructor(private readonly input: Pick<StartInput, 'model' | 'cols' | 'n' | 'y' | 'sqrtW' | 'parameters'>, readonly linear: readonly number[]) {
    const { n } = input;
    const p = input.parameters.length;
    this.q = linear.length;
    this.f = workArray(n);
    this.jac = workArray(n * p);
    this.a = workArray(Math.max(1, n * this.q));
    this.b = workArray(n);
    this.c = new Float64Array(this.q);
    this.r = workArray(n);
    this.qr = new PivotedQR(n, Math.max(1, this.q));
  }

  /**
   * Sets theta[L] to the weighted least-squares solution for the other
   * entries held (clamped to the bounds), fills `r` and returns the SSR
   * ‖r‖² (Infinity when the model is not finite there).
   */
  solve(theta: Float64Array): number {
    const { n, y, sqrtW, model, cols, parameters } = this.input;
    const { linear, q, f, jac, a, b, c, r } = this;
    this.clamped = false;
    for (const j of linear) theta[j] = 0;
    if (q === 0) model.value(theta, cols, n, f);
    else model.valueAndJacobian(theta, cols, n, f, jac);
    for (let i = 0; i < n; i++) b[i] = (sqrtW ? sqrtW[i] : 1) * (y[i] - f[i]);
    if (q === 0) {
      r.set(b);
      return finiteSsr(r);
    }
    for (let k = 0; k < q; k++) {
      const from = linear[k] * n;
      const to = k * n;
      if (sqrtW) for (let i = 0; i < n; i++) a[to + i] = sqrtW[i] * jac[from + i];
      else for (let i = 0; i < n; i++) a[to + i] = jac[from + i];
    }
    if (!allFinite(b, n) || !allFinite(a, n * q)) {
      r.fill(NaN);
      return Infinity;
    }
    r.set(b);
    this.qr.factor(a, n, q, { pivot: true, scale: true });
    this.qr.solveLeastSquares(b, c);
    for (let k = 0; k < q; k++) {
      const j = linear[k];
      const v = Math.min(parameters[j].upper, Math.max(parameters[j].lower, c[k]));
      if (v !== c[k]) this.clamped = true;
      c[k] = Number.isFinite(v) ? v : 0;
      theta[j] = c[k];
    }
    // r = b − A·c (A and b as built above; `a` still holds A, the factorisation works on its own copy)
    for (let k = 0; k < q; k++) {
      const ck = c[k];
      if (ck === 0) continue;
      const o = k * n;
      for (let i = 0; i < n; i++) r[i] -= a[o + i] * ck;
    }
    return finiteSsr(r);
  }

  /** v ← P⊥·v: removes the part of v in the span of the weighted linear columns of the last `solve`. */
  project(v: Float64Array): void {
    if (this.q === 0) return;
    const qr = this.qr;
    qr.applyQt(v);
    for (let k = 0; k < qr.rank; k++) v[k] = 0;
    qr.applyQ(v);
  }
}

function finiteSsr(r: Float64Array): number {
  let s = 0;
  for (let i = 0; i < r.length; i++) s += r[i] * r[i];
  return Number.isFinite(s) ? s : Infinity;
}

function allFinite(x: Float64Array, length: number): boolean {
  for (let i = 0; i < length; i++) if (!Number.isFinite(x[i])) return false;
  return true;
}
