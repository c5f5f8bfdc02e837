/**
 * The general fallback for starting values: a coarse search over the
 * nonlinear parameters, each candidate scored by the SSR after the linear
 * parameters are solved exactly (separable.ts).
 *
 * One or two nonlinear parameters: the full product of candidates (when
 * n·|C|^|N| ≤ MAX_GRID_WORK row evaluations), otherwise cyclic coordinate
 * search (GRID_SWEEPS sweeps) from the first candidate.
 * Candidates for one parameter (C ≈ 17–40 values):
 *   - both bounds finite: 16 interior points, log-spaced when 0 < lower and
 *     upper/lower ≥ 100, else evenly spaced;
 *   - one bound b finite: b ± m for magnitudes m (towards the open side);
 *   - no bounds: ±m;
 *   with magnitudes m = 10^(k/2), k = −8..8 (1e-4 … 1e4), plus the spread of
 *   each model column and its reciprocal (time constants and rates).
 * Non-finite SSR candidates are skipped; if every candidate fails, the first
 * candidate is used (1, the bound ± 1, or the lowest interior grid point).
 */
import type { StartParameter } from './types';
import type { SeparableSolver } from './separable';

/** Full grid product only up to this many row evaluations (n·candidates). */
export const MAX_GRID_WORK = 4e6;
/** Sweeps of the cyclic coordinate search. */
export const GRID_SWEEPS = 3;

/** Candidate values for one nonlinear parameter (see the module comment). */
export function candidates(par: StartParameter, cols: readonly Float64Array[]): number[] {
  const { lower, upper } = par;
  const lo = Number.isFinite(lower);
  const hi = Number.isFinite(upper);
  if (lo && hi) {
    const k = 16;
    const logSpaced = lower > 0 && upper / lower >= 100;
    return Array.from({ length: k }, (_, i) => {
      const u = (i + 0.5) / k;
      return logSpaced ? lower * (upper / lower) ** u : lower + (upper - lower) * u;
    });
  }
  const mags = magnitudes(cols);
  if (lo) return mags.map((m) => lower + m);
  if (hi) return mags.map((m) => upper - m);
  return [...mags, ...mags.map((m) => -m)];
}

function magnitudes(cols: readonly Float64Array[]): number[] {
  const set = new Set<number>([1]);
  for (let k = -8; k <= 8; k++) set.add(10 ** (k / 2));
  for (const c of cols) {
    const { min, max } = extent(c);
    const spread = max - min;
    if (spread > 0 && Number.isFinite(spread)) {
      set.add(spread);
      set.add(1 / spread);
    }
  }
  // 1 first: the fallback centre when every candidate fails
  return [...set].sort((a, b) => (a === 1 ? -1 : b === 1 ? 1 : a - b));
}

/** Smallest and largest finite value of a column (±Infinity when it has none). */
export function extent(c: ArrayLike<number>): { min: number; max: number } {
  let min = Infinity;
  let max = -Infinity;
  for (let i = 0; i < c.length; i++) {
    const v = c[i];
    if (v < min) min = v;
    if (v > max) max = v;
  }
  return { min, max };
}

function forEachProduct(lists: number[][], visit: (values: number[]) => void): void {
  const idx = lists.map(() => 0);
  for (;;) {
    visit(idx.map((i, k) => lists[k][i]));
    let k = lists.length - 1;
    while (k >= 0 && ++idx[k] === lists[k].length) idx[k--] = 0;
    if (k < 0) return;
  }
}

/**
 * Searches the nonlinear parameters `nonlinear` of `theta` on the candidate
 * grid (module comment), the linear ones solved by `sep` for each candidate.
 * Leaves the best point in `theta` and returns the number of candidates scored.
 */
export function gridSearch(theta: Float64Array, nonlinear: readonly number[], parameters: readonly StartParameter[], cols: readonly Float64Array[], n: number, sep: SeparableSolver): number {
  const cands = nonlinear.map((j) => candidates(parameters[j], cols));
  const work = n * cands.reduce((a, c) => a * c.length, 1);
  const best = { ssr: Infinity, values: cands.map((c) => c[0]) };
  const trial = Float64Array.from(theta);
  let evaluated = 0;
  const tryValues = (values: number[]) => {
    nonlinear.forEach((j, k) => (trial[j] = values[k]));
    const s = sep.solve(trial);
    evaluated++;
    if (s < best.ssr) {
      best.ssr = s;
      best.values = [...values];
    }
  };
  if (nonlinear.length <= 2 && work <= MAX_GRID_WORK) {
    forEachProduct(cands, tryValues);
  } else {
    for (let sweep = 0; sweep < GRID_SWEEPS; sweep++) {
      for (let k = 0; k < nonlinear.length; k++) {
        for (const v of cands[k]) {
          const values = [...best.values];
          values[k] = v;
          tryValues(values);
        }
      }
    }
  }
  nonlinear.forEach((j, k) => (theta[j] = best.values[k]));
  sep.solve(theta);
  return evaluated;
}
