/**
 * The box the multi-start search (explore.ts) spreads its design over, per
 * nonlinear parameter with guess g (the given or data-driven start), bounds
 * [lower, upper] and structural role (roles.ts; S the predictor's spread,
 * h its smallest spacing):
 *   - both bounds finite: [lower, upper]; on a log scale when
 *     0 < lower and upper/lower ≥ LOG_RATIO (or the mirror for upper < 0);
 *     with one bound at 0 and a scale or rate role, the role's log box
 *     (below) cut to the bounds (a potency in [0, 1000] is searched by decades,
 *     not evenly);
 *   - location (a peak centre, a shift): the values that put it inside the
 *     data, linear scale;
 *   - scale (units of the predictor, as tau in x/tau): |p| from
 *     min(h, m)/ROLE_FACTOR to ROLE_FACTOR·S (m the smallest non-zero |x|:
 *     on log-spaced doses a potency may lie below the lowest dose), log scale;
 *     a period inside sin or cos from 2h (shorter periods are aliases of
 *     longer ones on evenly spaced data, with the same sum of squares);
 *   - rate (units of 1/predictor, as k in k·x): the reciprocals, |p| from
 *     1/(ROLE_FACTOR·S) to ROLE_FACTOR/min(h, m), to 1/(2h) inside sin or cos;
 *   (scale and rate keep the sign of g, positive when g = 0;)
 *   - otherwise, with one bound b finite: distances from b on a log scale,
 *     |g − b|/BOX_FACTOR … |g − b|·BOX_FACTOR (1/BOX_FACTOR … BOX_FACTOR
 *     when g sits on b), towards the open side;
 *   - no bound: magnitudes |g|/BOX_FACTOR … |g|·BOX_FACTOR on a log scale
 *     with the sign of g (1/BOX_FACTOR … BOX_FACTOR, positive, when g = 0).
 * The search does not flip the sign of an unbounded parameter; the
 * data-driven start has compared both signs (grid.ts). Role boxes are cut to
 * the bounds. The start itself is always among the candidates, so a box
 * need not contain it.
 * BOX_FACTOR = 100: two decades either way, wide enough for a start that is
 * off by an order of magnitude and narrow enough for a few dozen points.
 * ROLE_FACTOR = 10: a decade beyond the finest detail and the whole range of
 * the data covers what they can resolve.
 */
import type { Role } from './roles';
import type { StartParameter } from './types';

export const BOX_FACTOR = 100;
export const ROLE_FACTOR = 10;
/** Bounds this far apart (ratio) are searched on a log scale. */
export const LOG_RATIO = 100;

export interface BoxSide {
  /** Parameter name. */
  name: string;
  /** Ends of the box (lower < upper). */
  lower: number;
  upper: number;
  /** Log scale: the distance |value − origin| is spread geometrically (origin: the finite bound, or 0). */
  scale: 'linear' | 'log';
  origin: number;
}

export function searchBox(par: StartParameter, guess: number, role: Role | undefined): BoxSide {
  const { name, lower, upper } = par;
  const lo = Number.isFinite(lower);
  const hi = Number.isFinite(upper);
  const g = Number.isFinite(guess) ? guess : 0;
  if (lo && hi) {
    if ((lower > 0 && upper / lower >= LOG_RATIO) || (upper < 0 && lower / upper >= LOG_RATIO)) return { name, lower, upper, scale: 'log', origin: 0 };
    const roleBox = role && role.kind !== 'location' && (lower === 0 || upper === 0) ? magnitudeBox(name, role, lower, upper, upper === 0 ? -1 : 1) : null;
    return roleBox ?? { name, lower, upper, scale: 'linear', origin: 0 };
  }
  if (role?.kind === 'location') {
    const a = Math.max(lower, role.min);
    const b = Math.min(upper, role.max);
    if (a < b) return { name, lower: a, upper: b, scale: 'linear', origin: 0 };
  } else if (role) {
    const box = magnitudeBox(name, role, lower, upper, g < 0 ? -1 : 1);
    if (box) return box;
  }
  if (lo || hi) {
    const base = lo ? lower : upper;
    const dist = Math.abs(g - base);
    const m = dist > 0 ? dist : 1;
    const near = m / BOX_FACTOR;
    const far = m * BOX_FACTOR;
    return lo
      ? { name, lower: lower + near, upper: lower + far, scale: 'log', origin: lower }
      : { name, lower: upper - far, upper: upper - near, scale: 'log', origin: upper };
  }
  const m = g !== 0 ? Math.abs(g) : 1;
  return g < 0
    ? { name, lower: -m * BOX_FACTOR, upper: -m / BOX_FACTOR, scale: 'log', origin: 0 }
    : { name, lower: m / BOX_FACTOR, upper: m * BOX_FACTOR, scale: 'log', origin: 0 };
}

/** The log box of a scale or rate role (module comment) on the side `sign`, cut to [lower, upper]; null when empty. */
function magnitudeBox(name: string, role: Extract<Role, { kind: 'scale' | 'rate' }>, lower: number, upper: number, sign: 1 | -1): BoxSide | null {
  const fine = role.periodic ? 2 * role.spacing : Math.min(role.spacing, role.smallest) / ROLE_FACTOR;
  const coarse = ROLE_FACTOR * role.spread;
  const [near, far] = role.kind === 'scale' ? [fine, coarse] : [1 / coarse, 1 / fine];
  const a = Math.max(lower, sign > 0 ? near : -far);
  const b = Math.min(upper, sign > 0 ? far : -near);
  return a < b && (a > 0 || b < 0) ? { name, lower: a, upper: b, scale: 'log', origin: 0 } : null;
}

/** The value at unit coordinate u ∈ [0, 1) of a box side (log scale: |value − origin| spread geometrically). */
export function boxValue(side: BoxSide, u: number): number {
  const { lower, upper, origin } = side;
  const linear = lower + u * (upper - lower);
  if (side.scale === 'linear') return linear;
  const dl = Math.abs(lower - origin);
  const du = Math.abs(upper - origin);
  // a log side never straddles its origin (its ends are at least m/BOX_FACTOR away); linear if it did
  if (!(dl > 0 && du > 0) || (lower - origin) * (upper - origin) < 0) return linear;
  const sign = upper > origin ? 1 : -1;
  const a = Math.min(dl, du);
  const b = Math.max(dl, du);
  const d = sign > 0 ? a * (b / a) ** u : b * (a / b) ** u;
  return origin + sign * d;
}
