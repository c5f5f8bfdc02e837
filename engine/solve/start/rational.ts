/**
 * Starting values for rational models f = N(x; a)/D(x; b) whose numerator is
 * linear in its parameters a, whose denominator is linear in its own
 * parameters b (disjoint from a) and has a parameter-free part D₀(x), not 0 on every row
 * (e.g. (b1 + b2·x + b3·x²)/(1 + b4·x + b5·x²)).
 *
 * Method: the linearisation y·D = N (E. C. Levy, "Complex-curve fitting",
 * IRE Trans. Automatic Control AC-4 (1959) 37–43), i.e. the linear
 * least-squares problem
 *     y·D₀ = Σₐ Nₐ(x)·aₐ + N₀(x) − Σ_b y·D_b(x)·b_b
 * (weighted by √w), followed by SK_ITERATIONS reweighted solves with the row
 * weights divided by |D(x; b_prev)| (C. K. Sanathanan & J. Koerner, IEEE
 * Trans. Automatic Control 8 (1963) 56–58), which remove most of the
 * linearisation's bias. Solved with the project's pivoted QR; a rank
 * deficiency or a non-finite value gives no start (null).
 */
import { compileModel, isLinearInParameters, type CompiledModel } from '../../compile';
import type { Expr } from '../../../parser/plan';
import { PivotedQR } from '../../linalg/qr';
import { paramsOfExpr } from './roles';
import { startText } from '../messages';
import { lastBinary } from './canonical';
import type { StartInput } from './types';

/** Sanathanan–Koerner reweighting steps after the first (Levy) solve. */
export const SK_ITERATIONS = 3;

/** Compiled numerator and denominator per model text (per-group fits share them). Bounded. */
const cache = new Map<string, { num: CompiledModel; den: CompiledModel; a: string[]; b: string[] } | null>();
const CACHE_SIZE = 32;

function split(expr: Expr, columns: readonly string[]): { num: CompiledModel; den: CompiledModel; a: string[]; b: string[] } | null {
  const top = lastBinary(expr);
  if (!top || top.op !== '/') return null;
  const a = [...paramsOfExpr(top.left)];
  const b = [...paramsOfExpr(top.right)];
  if (a.length === 0 || b.length === 0 || a.some((q) => b.includes(q))) return null;
  if (!isLinearInParameters(top.left, a) || !isLinearInParameters(top.right, b)) return null;
  return { num: compileModel(top.left, a, columns), den: compileModel(top.right, b, columns), a, b };
}

export function rationalStart(input: StartInput, unknown: readonly number[]): { theta: Float64Array; how: string } | null {
  const s = input.structure;
  if (!s) return null;
  const cacheKey = JSON.stringify([s.expr, s.columns], (k, v) => (k === 'range' ? undefined : v));
  let parts = cache.get(cacheKey);
  if (parts === undefined) {
    try {
      parts = split(s.expr, s.columns);
    } catch {
      parts = null;
    }
    if (cache.size >= CACHE_SIZE) cache.delete(cache.keys().next().value as string);
    cache.set(cacheKey, parts);
  }
  if (!parts) return null;
  const { parameters, n, cols, y, sqrtW } = input;
  const idx = (name: string) => parameters.findIndex((p) => p.name === name);
  const ia = parts.a.map(idx);
  const ib = parts.b.map(idx);
  // Only when every rational parameter is free and has no given start (a mix is left to the general method).
  if ([...ia, ...ib].some((j) => j < 0 || !unknown.includes(j))) return null;

  const na = ia.length;
  const nb = ib.length;
  const n0 = new Float64Array(n);
  const jn = new Float64Array(n * na);
  const d0 = new Float64Array(n);
  const jd = new Float64Array(n * nb);
  parts.num.valueAndJacobian(new Float64Array(na), cols, n, n0, jn);
  parts.den.valueAndJacobian(new Float64Array(nb), cols, n, d0, jd);
  // the parameter-free part of the denominator must not vanish (else y·D = N has the trivial solution)
  if (!d0.some((v) => v !== 0 && Number.isFinite(v))) return null;
  const q = na + nb;
  if (n < q) return null;
  const A = new Float64Array(n * q);
  const rhs = new Float64Array(n);
  const coef = new Float64Array(q);
  const qr = new PivotedQR(n, q);
  const dPrev = new Float64Array(n).fill(1);
  const good = new Float64Array(q);
  let ok = false;
  for (let it = 0; it <= SK_ITERATIONS; it++) {
    for (let i = 0; i < n; i++) {
      const w = (sqrtW ? sqrtW[i] : 1) / Math.abs(dPrev[i]);
      for (let k = 0; k < na; k++) A[k * n + i] = w * jn[k * n + i];
      for (let k = 0; k < nb; k++) A[(na + k) * n + i] = -w * y[i] * jd[k * n + i];
      rhs[i] = w * (y[i] * d0[i] - n0[i]);
    }
    if (!A.every(Number.isFinite) || !rhs.every(Number.isFinite)) break;
    qr.factor(A, n, q, { pivot: true, scale: true });
    if (qr.rank < q) break;
    qr.solveLeastSquares(rhs, coef);
    if (!coef.every(Number.isFinite)) break;
    good.set(coef);
    ok = true;
    // D(x; b) for the next reweighting
    for (let i = 0; i < n; i++) {
      let d = d0[i];
      for (let k = 0; k < nb; k++) d += jd[k * n + i] * coef[na + k];
      dPrev[i] = Math.abs(d) > 1e-12 * (Math.abs(d0[i]) || 1) ? d : 1;
    }
  }
  if (!ok) return null;
  const theta = new Float64Array(parameters.length);
  parameters.forEach((p, j) => (theta[j] = p.initial ?? 0));
  ia.forEach((j, k) => (theta[j] = good[k]));
  ib.forEach((j, k) => (theta[j] = good[na + k]));
  return { theta, how: startText.rational([...parts.a, ...parts.b], SK_ITERATIONS) };
}
