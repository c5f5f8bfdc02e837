/**
 * Comparing fits of the same data.
 * - ΔAICcᵢ = AICcᵢ − min AICc and Akaike weights wᵢ = exp(−Δᵢ/2)/Σⱼ exp(−Δⱼ/2)
 *   (Burnham & Anderson 2002, Model Selection and Multimodel Inference, 2nd ed., ch. 2).
 * - Extra-sum-of-squares F test for nested models with p₁ < p₂ free parameters:
 *   F = ((SSR₁ − SSR₂)/(p₂ − p₁)) / (SSR₂/(n − p₂)), p = P(F_{p₂−p₁, n−p₂} > F)
 *   (Draper & Smith 1998, Applied Regression Analysis, 3rd ed., "extra sum of
 *   squares" principle; Bates & Watts 1988, Nonlinear Regression Analysis and Its
 *   Applications, for the nonlinear case, where the test is approximate).
 *   Nesting is taken from the parameter counts only: the spec author must make
 *   sure the simpler model is a special case of the richer one.
 */
import { fUpper } from './distributions';

export interface CompareInput {
  fit: string;
  n: number;
  p: number;
  ssr: number;
  aic: number;
  aicc: number;
  bic: number;
}

export interface CompareRow extends CompareInput {
  deltaAicc: number;
  akaikeWeight: number;
}

export function akaikeRows(fits: readonly CompareInput[]): CompareRow[] {
  const finite = fits.map((f) => f.aicc).filter(Number.isFinite);
  const best = finite.length ? Math.min(...finite) : NaN;
  const deltas = fits.map((f) => f.aicc - best);
  const rel = deltas.map((d) => (Number.isFinite(d) ? Math.exp(-d / 2) : 0));
  const total = rel.reduce((a, b) => a + b, 0);
  return fits.map((f, i) => ({ ...f, deltaAicc: deltas[i], akaikeWeight: total > 0 ? rel[i] / total : NaN }));
}

export interface FTestResult {
  f: number;
  df1: number;
  df2: number;
  pValue: number;
  simpler: string;
  richer: string;
}

/** F test of two fits with different parameter counts on the same n points; null when not applicable. */
export function extraSumOfSquaresF(a: CompareInput, b: CompareInput): FTestResult | null {
  if (a.n !== b.n || a.p === b.p) return null;
  const [simple, rich] = a.p < b.p ? [a, b] : [b, a];
  const df1 = rich.p - simple.p;
  const df2 = rich.n - rich.p;
  if (df2 <= 0 || !(rich.ssr > 0)) return null;
  const f = (simple.ssr - rich.ssr) / df1 / (rich.ssr / df2);
  const pValue = f > 0 ? fUpper(f, df1, df2) : 1;
  return { f, df1, df2, pValue, simpler: simple.fit, richer: rich.fit };
}
