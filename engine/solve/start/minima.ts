/**
 * Telling minima apart. Two converged fits reached the same minimum when
 * their sums of squares agree within SAME_SSR_RTOL relative, plus a floor
 * at the rounding level of the data, SSR_FLOOR·Σ(√wᵢyᵢ)² (the rule of the
 * NIST StRD harness for residuals at the rounding level of the data).
 * Distinct local minima of real data practically never share their SSR to
 * 8 digits, while one minimum reached from different starts agrees to about
 * the solver tolerance (1e-10); equal SSR with different parameters is a
 * relabelling (e.g. two exchanged peaks) or a flat direction, and is
 * reported as one minimum.
 * A minimum counts as lower than another only when its SSR is below by more
 * than LOWER_RTOL relative (1 ppm) plus the floor: smaller differences have
 * no practical consequence and may be convergence noise.
 */

export const SAME_SSR_RTOL = 1e-8;
export const LOWER_RTOL = 1e-6;
export const SSR_FLOOR = 1e-20;

export interface Minimum {
  ssr: number;
  theta: Float64Array;
  converged: boolean;
  /** How many refined candidates ended here. */
  hits: number;
  /** Whether the fit from the start (given or data-driven) ended here. */
  fromStart: boolean;
}

/** Σ(√wᵢyᵢ)², the scale of the SSR floor. */
export function responseScale(y: ArrayLike<number>, sqrtW: ArrayLike<number> | null): number {
  let s = 0;
  for (let i = 0; i < y.length; i++) s += ((sqrtW ? sqrtW[i] : 1) * y[i]) ** 2;
  return s;
}

export function sameMinimum(a: number, b: number, scale: number): boolean {
  return Math.abs(a - b) <= SAME_SSR_RTOL * Math.max(a, b) + SSR_FLOOR * scale;
}

export function isLower(candidate: number, than: number, scale: number): boolean {
  return candidate < than - (LOWER_RTOL * than + SSR_FLOOR * scale);
}

/** Adds a fit's end point to the list (merging with an equal minimum), keeping the list sorted by SSR. */
export function addMinimum(list: Minimum[], m: Omit<Minimum, 'hits'>, scale: number): void {
  if (!Number.isFinite(m.ssr)) return;
  const same = list.find((x) => x.converged === m.converged && sameMinimum(x.ssr, m.ssr, scale));
  if (same) {
    same.hits++;
    same.fromStart ||= m.fromStart;
    return;
  }
  list.push({ ...m, theta: Float64Array.from(m.theta), hits: 1 });
  list.sort((a, b) => a.ssr - b.ssr);
}
