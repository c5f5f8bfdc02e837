/**
 * Comparing fits of the same data.
 * - ΔAICcᵢ = AICcᵢ − min AICc and Akaike weights wᵢ = exp(−Δᵢ/2)/Σⱼ exp(−Δⱼ/2)
 *   (Burnham & Anderson 2002, Model Selection and Multimodel Inference, 2nd ed., ch. 2).
 * - Extra-sum-of-squares F test for nested models with p₁ < p₂ free parameters:
 *   F = ((SSR₁ − SSR₂)/(p₂ − p₁)) / (SSR₂/(n − p₂)), p = P(F_{p₂−p₁, n−p₂} > F)
 *   (Draper & Smith 1998, Applied Regression Analysis, 3rd ed., "extra sum of
 *   squares" principle; Bates & Watts 1988, Nonlinear Regression Analysis and Its
 *   Applications, for the nonlinear case, where the test is approximate).
 *   The caller decides that the fits are nested (engine/run/nesting.ts, or the
 *   spec's `within`); parameter counts alone do not make them so.
 *   Refused (null) when the richer fit ends with a larger sum of squares than
 *   the simpler one beyond rounding, SSR₂ > SSR₁·(1 + SSR_ROUNDING): a richer
 *   model that contains the simpler one reaches at least its minimum, so a
 *   larger SSR means the richer fit stopped elsewhere (a local minimum, a
 *   bound) and F would be negative, which no F distribution has.
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

/**
 * Relative rounding allowed between the two sums of squares: SSR₂ ≤ SSR₁·(1 + 1e-9) still counts as
 * "not above" (two converged fits of the same curve agree to about the solvers' relative reduction
 * tolerance, 1e-10, engine/solve/types.ts; 1e-9 leaves a factor 10 for it). Such an F is then 0 or near it.
 */
export const SSR_ROUNDING = 1e-9;

/** Why the F test of a nested pair cannot be formed. */
export type FTestRefusal = 'same_count' | 'different_n' | 'no_dof' | 'exact' | 'richer_worse';

/** F test of two nested fits with different parameter counts on the same n points, or why not. */
export function nestedF(a: CompareInput, b: CompareInput): FTestResult | { refused: FTestRefusal } {
  if (a.n !== b.n) return { refused: 'different_n' };
  if (a.p === b.p) return { refused: 'same_count' };
  const [simple, rich] = a.p < b.p ? [a, b] : [b, a];
  const df1 = rich.p - simple.p;
  const df2 = rich.n - rich.p;
  if (df2 <= 0) return { refused: 'no_dof' };
  if (!(rich.ssr > 0)) return { refused: 'exact' };
  if (!(rich.ssr <= simple.ssr * (1 + SSR_ROUNDING))) return { refused: 'richer_worse' };
  const f = Math.max(0, (simple.ssr - rich.ssr) / df1 / (rich.ssr / df2));
  const pValue = f > 0 ? fUpper(f, df1, df2) : 1;
  return { f, df1, df2, pValue, simpler: simple.fit, richer: rich.fit };
}

/** F test of two fits with different parameter counts on the same n points; null when it cannot be formed (see `nestedF`). */
export function extraSumOfSquaresF(a: CompareInput, b: CompareInput): FTestResult | null {
  const r = nestedF(a, b);
  return 'refused' in r ? null : r;
}
