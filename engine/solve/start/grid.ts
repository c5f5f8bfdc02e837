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
 *   each model column and its reciprocal (time constants and rates);
 *   - and, by structural role (roles.ts; S the predictor's spread, h its
 *     smallest spacing), within the bounds: a location, ROLE_CANDIDATES
 *     evenly spaced points over the values that put it inside the data; a
 *     scale or rate, ROLE_CANDIDATES log-spaced magnitudes from h to 2·S (rates:
 *     their reciprocals), with the sign of the bound side; a period or
 *     frequency inside sin or cos, frequencies evenly spaced from 1/(2·S) to the
 *     Nyquist frequency 1/(2·h) in steps of 1/(4·S) (four per resolvable
 *     frequency, the periodogram's natural resolution 1/S oversampled), at most
 *     MAX_PERIODIC_CANDIDATES.
 * Non-finite SSR candidates are skipped; if every candidate fails, the first
 * candidate is used (1, the bound ± 1, or the lowest interior grid point).
 */
import type { StartParameter } from './types';
import type { SeparableSolver } from './separable';
import type { Role } from './roles';

/** Full grid product only up to this many row evaluations (n·candidates). */
export const MAX_GRID_WORK = 4e6;
/** Sweeps of the cyclic coordinate search. */
export const GRID_SWEEPS = 3;
/** Candidates per location, scale or rate parameter from its role. */
export const ROLE_CANDIDATES = 32;
/** At most this many frequencies for a periodic parameter. */
export const MAX_PERIODIC_CANDIDATES = 1000;

/** Candidate values for one nonlinear parameter (see the module comment). */
export function candidates(par: StartParameter, cols: readonly Float64Array[], role?: Role): number[] {
  const { lower, upper } = par;
  const lo = Number.isFinite(lower);
  const hi = Number.isFinite(upper);
  let base: number[];
  if (lo && hi) {
    const k = 16;
    const logSpaced = lower > 0 && upper / lower >= 100;
    base = Array.from({ length: k }, (_, i) => {
      const u = (i + 0.5) / k;
      return logSpaced ? lower * (upper / lower) ** u : lower + (upper - lower) * u;
    });
  } else {
    const mags = magnitudes(cols);
    base = lo ? mags.map((m) => lower + m) : hi ? mags.map((m) => upper - m) : [...mags, ...mags.map((m) => -m)];
  }
  if (!role) return base;
  const extra = roleCandidates(role, upper <= 0 && !(lower >= 0) ? -1 : 1).filter((v) => v >= lower && v <= upper && !base.includes(v));
  return [...base, ...extra];
}

/** Candidates from a parameter's structural role (module comment); `sign` picks the side for magnitudes. */
function roleCandidates(role: Role, sign: 1 | -1): number[] {
  if (role.kind === 'location') {
    const { min, max } = role;
    if (!(max > min)) return [min];
    return Array.from({ length: ROLE_CANDIDATES }, (_, i) => min + ((i + 0.5) / ROLE_CANDIDATES) * (max - min));
  }
  const { spread: S, spacing: h } = role;
  if (role.periodic) {
    const step = 1 / (4 * S);
    const count = Math.min(MAX_PERIODIC_CANDIDATES, Math.floor((1 / (2 * h) - 1 / (2 * S)) / step) + 1);
    return Array.from({ length: count }, (_, i) => {
      const f = 1 / (2 * S) + i * step;
      return sign * (role.kind === 'scale' ? 1 / f : f);
    });
  }
  const a = h;
  const b = 2 * S;
  if (!(b > a)) return [];
  return Array.from({ length: ROLE_CANDIDATES }, (_, i) => {
    const m = a * (b / a) ** ((i + 0.5) / ROLE_CANDIDATES);
    return sign * (role.kind === 'scale' ? m : 1 / m);
  });
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
export function gridSearch(
  theta: Float64Array,
  nonlinear: readonly number[],
  parameters: readonly StartParameter[],
  cols: readonly Float64Array[],
  n: number,
  sep: SeparableSolver,
  roles: ReadonlyMap<string, Role> = new Map(),
): number {
  const cands = nonlinear.map((j) => candidates(parameters[j], cols, roles.get(parameters[j].name)));
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
