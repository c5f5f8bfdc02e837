/**
 * Lack-of-fit F test with pure error from replicates (NIST/SEMATECH e-Handbook of
 * Statistical Methods, §4.4.4.4 "How can I test whether or not the functional part
 * of the model is correct?"; Draper & Smith 1998, Applied Regression Analysis, 3rd
 * ed., §2.1): rows with the same values in every predictor column form one of m
 * settings. With weights wᵢ and raw residuals eᵢ = yᵢ − ŷᵢ (ŷ is the same at equal
 * settings, whatever the model),
 *   SS_PE  = Σ_g Σ_{i∈g} wᵢ (eᵢ − ē_g)²,   ē_g = Σ wᵢeᵢ / Σ wᵢ   (pure error, n − m dof),
 *   SS_LOF = Σ_g W_g ē_g²,                 W_g = Σ_{i∈g} wᵢ      (lack of fit, m − k dof),
 * so that SS_PE + SS_LOF = SSR exactly; each part is summed on its own (no
 * cancellation in SSR − SS_PE). F = (SS_LOF/(m − k)) / (SS_PE/(n − m)) against
 * F(m − k, n − m), p its upper tail (computed as a tail, not 1 − cdf); k is the
 * rank of the Jacobian. For a nonlinear model the F distribution holds
 * approximately (tangent-plane linearisation).
 *
 * No test (f and p null, with the reason) when no setting repeats, when m ≤ k (the
 * model can pass through every setting's mean) or when the pure error is zero
 * (SS_PE ≤ 1e-24·SSR, `PURE_ERROR_ROUNDING`).
 * Settings are found by sorting the rows on their predictor values (skipped when the
 * data are already in order): O(n·log n·c) time for c predictor columns, two n-long
 * integer arrays, no per-row strings or hash map (a million distinct settings cost
 * 8 MB, not the hundreds a map of keys would).
 */
import type { LackOfFitTest } from '../result';
import { fUpper } from './distributions';
import { radixOrder } from './radix-order';

function allFinite(col: ArrayLike<number>, n: number): boolean {
  for (let i = 0; i < n; i++) if (!Number.isFinite(col[i])) return false;
  return true;
}

/**
 * Pure error at rounding level: SS_PE ≤ this·SSR counts as zero (replicates that agree to the last digits;
 * the square of the 1e-12 relative residual level of engine/run/fit-stats.ts).
 */
const PURE_ERROR_ROUNDING = 1e-24;

export const lackOfFitNotes = {
  noReplicates: 'no replicates: no predictor setting occurs twice, so there is no pure error to test the model against',
  tooFewLevels: (m: number, k: number) => `${m} distinct predictor setting${m === 1 ? '' : 's'} for ${k} parameters: the model can pass through every setting's mean, so its lack of fit cannot be tested`,
  noPureError: 'the replicates agree exactly (pure error 0), so the F ratio is not defined',
} as const;

/**
 * `columns`: the predictor columns (a setting is a row's values in all of them); `r`: the weighted residuals
 * √wᵢ·eᵢ/c in the fit's scale c; `weights`: wᵢ or null; `rank`: k. Sums of squares are returned in response units
 * (times c²).
 */
export function lackOfFit(columns: readonly ArrayLike<number>[], r: ArrayLike<number>, weights: ArrayLike<number> | null, rank: number, c = 1): LackOfFitTest {
  const n = r.length;
  const { groupOf, m } = settings(columns, n);
  const count = new Int32Array(m);
  const wSum = new Float64Array(m);
  const weSum = new Float64Array(m);
  // eᵢ/c = rᵢ/√wᵢ, so wᵢ·eᵢ/c = rᵢ·√wᵢ
  for (let i = 0; i < n; i++) {
    const g = groupOf[i];
    const w = weights ? weights[i] : 1;
    count[g]++;
    wSum[g] += w;
    weSum[g] += r[i] * Math.sqrt(w);
  }
  let replicatedRows = 0;
  for (let g = 0; g < m; g++) if (count[g] > 1) replicatedRows += count[g];
  const dfLackOfFit = m - rank;
  const dfPureError = n - m;
  const none = (note: string): LackOfFitTest => ({ levels: m, replicatedRows, ssLackOfFit: null, ssPureError: null, dfLackOfFit, dfPureError, f: null, pValue: null, note });
  if (dfPureError <= 0) return none(lackOfFitNotes.noReplicates);
  if (dfLackOfFit <= 0) return none(lackOfFitNotes.tooFewLevels(m, rank));
  let pe = 0;
  for (let i = 0; i < n; i++) {
    const g = groupOf[i];
    const w = weights ? weights[i] : 1;
    const d = r[i] - Math.sqrt(w) * (weSum[g] / wSum[g]); // √wᵢ(eᵢ − ē_g)/c
    pe += d * d;
  }
  let lof = 0;
  for (let g = 0; g < m; g++) lof += (weSum[g] * weSum[g]) / wSum[g]; // W_g·ē_g²/c²
  if (!(pe > PURE_ERROR_ROUNDING * (pe + lof))) return none(lackOfFitNotes.noPureError);
  const f = (lof / dfLackOfFit) / (pe / dfPureError);
  return { levels: m, replicatedRows, ssLackOfFit: c * c * lof, ssPureError: c * c * pe, dfLackOfFit, dfPureError, f, pValue: fUpper(f, dfLackOfFit, dfPureError), note: null };
}

/** The setting of each row (0…m − 1) and the number m of distinct settings: rows equal in every column share one. */
export function settings(columns: readonly ArrayLike<number>[], n: number): { groupOf: Int32Array; m: number } {
  // one predictor column (the usual case): the same comparison without the loop over columns
  const only = columns.length === 1 ? columns[0] : null;
  const compare = only
    ? (a: number, b: number): number => {
      const d = only[a] - only[b];
      return d !== 0 ? (d < 0 ? -1 : 1) : 0;
    }
    : (a: number, b: number): number => {
      for (const col of columns) {
        const d = col[a] - col[b];
        if (d !== 0) return d < 0 ? -1 : 1;
      }
      return 0;
    };
  const order = new Int32Array(n);
  for (let i = 0; i < n; i++) order[i] = i;
  let sorted = true;
  for (let i = 1; i < n && sorted; i++) sorted = compare(i - 1, i) <= 0;
  // finite settings (the usual case): the same order in linear time (radix-order.ts); equal rows share a setting whatever their order
  if (!sorted) {
    if (columns.every((col) => allFinite(col, n))) order.set(radixOrder(columns, n));
    else order.sort(compare);
  }
  const groupOf = new Int32Array(n);
  let m = 0;
  for (let k = 0; k < n; k++) {
    if (k > 0 && compare(order[k - 1], order[k]) !== 0) m++;
    groupOf[order[k]] = m;
  }
  return { groupOf, m: n > 0 ? m + 1 : 0 };
}
