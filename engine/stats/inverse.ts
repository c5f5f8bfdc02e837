/**
 * Inverse prediction (calibration): the predictor value x̂ where the fitted
 * curve equals an observed response y₀, and an interval for it obtained by
 * inverting the prediction band: all x whose prediction interval contains y₀
 * (Draper & Smith 1998, Applied Regression Analysis, 3rd ed., §3.2 "inverse
 * regression (straight line case)"; the same construction is applied to any
 * single-predictor model through its delta-method band). When y₀ is the mean
 * of m replicate readings, the caller's band carries the new-reading variance
 * divided by m (Draper & Smith 1998, §3.2; common practice).
 *
 * Search: the curve is scanned on an evenly spaced grid over the data range
 * [lo, hi] (default 200 points; log-spaced for wide positive ranges, ./bands.ts
 * `grid`) for sign changes of f(x) − y₀, each bracket refined with Brent's
 * method (./root.ts). With several solutions the smallest x is reported and
 * the message says so. Without one inside, the scan continues up to
 * INVERSE_REACH.estimateMargin of the range beyond each end (engine/thresholds.ts);
 * a solution there is marked extrapolated.
 *
 * Interval ends are where |f(x) − y₀| equals the prediction half-width. Each
 * is sought inside the data range, then outward up to INVERSE_REACH.intervalReach
 * ranges beyond it (ends there marked `extrapolated`); an end not reached - the
 * band still holds y₀ at the reach, or the model is not finite there (the edge
 * of its domain) - is null and marked `open`: the interval is one-sided.
 */
import type { InversePrediction, InverseEnd } from '../result';
import type { BandPoints } from './bands';
import { grid, LOG_GRID_RATIO } from './bands';
import { brentRoot } from './root';
import { inverseText } from '../messages';
import { formatNumber } from '../format';
import { INVERSE_REACH } from '../thresholds';

/** Band values at predictor values (fitted and prediction half-widths are used). */
export type Curve = (xs: Float64Array) => BandPoints;

/** Points of the outward scan per data range (or per decade on a log-spaced range). */
const OUTWARD_POINTS = 100;

/**
 * `count` points going outward from `edge` (not included) to `reach` data ranges beyond it, on the side
 * `dir` (−1 below, +1 above): evenly spaced, or by equal factors when the data range is log-spaced.
 */
function outward(edge: number, dir: -1 | 1, lo: number, hi: number, reach: number): Float64Array {
  const log = lo > 0 && hi / lo > LOG_GRID_RATIO;
  const k = Math.max(1, Math.ceil(OUTWARD_POINTS * reach));
  const xs = new Float64Array(k);
  for (let i = 1; i <= k; i++) xs[i - 1] = log ? edge * 10 ** ((dir * reach * i) / k) : edge + (dir * reach * (hi - lo) * i) / k;
  return xs;
}

export function inversePrediction(y0: number, lo: number, hi: number, curve: Curve, count = 200): InversePrediction {
  const xs = grid(lo, hi, count);
  const b = curve(xs);
  const at = (x: number) => curve(Float64Array.of(x));
  const g = (x: number) => at(x).fitted[0] - y0;
  const outside = (x: number) => {
    const p = at(x);
    return Math.abs(p.fitted[0] - y0) - p.prediction[0];
  };

  const roots: number[] = [];
  let firstBracket = -1;
  for (let k = 0; k + 1 < count; k++) {
    const a = b.fitted[k] - y0;
    const c = b.fitted[k + 1] - y0;
    if (!Number.isFinite(a) || !Number.isFinite(c)) continue;
    if (a === 0 || a * c < 0 || (k + 2 === count && c === 0)) {
      const r = a === 0 ? xs[k] : c === 0 ? xs[k + 1] : brentRoot(g, xs[k], xs[k + 1]);
      if (r !== null && (roots.length === 0 || r > roots[roots.length - 1])) {
        roots.push(r);
        if (firstBracket < 0) firstBracket = k;
      }
    }
  }
  let x: number;
  let extrapolated = false;
  if (roots.length > 0) x = roots[0];
  else {
    // just beyond an end: the nearer crossing within the margin, below first
    const margin = INVERSE_REACH.estimateMargin;
    let found: number | null = null;
    for (const [edge, dir] of [[lo, -1], [hi, 1]] as const) {
      const ys = outward(edge, dir, lo, hi, margin);
      let prev = edge;
      let gp = g(edge);
      for (const xn of ys) {
        const gn = g(xn);
        if (!Number.isFinite(gn) || !Number.isFinite(gp)) break;
        if (gn === 0 || gp * gn < 0) {
          found = gn === 0 ? xn : brentRoot(g, Math.min(prev, xn), Math.max(prev, xn));
          break;
        }
        prev = xn;
        gp = gn;
      }
      if (found !== null) break;
    }
    if (found === null) {
      let fmin = Infinity;
      let fmax = -Infinity;
      for (const f of b.fitted) {
        if (f < fmin) fmin = f;
        if (f > fmax) fmax = f;
      }
      return { response: y0, x: null, interval: [null, null], message: inverseText.noCrossing(lo, hi, y0, fmin, fmax) };
    }
    x = found;
    extrapolated = true;
  }

  /** The end on side `dir`: inside the data grid, then outward; null when not reached. */
  const end = (dir: -1 | 1): { value: number | null; kind: InverseEnd } => {
    if (outside(x) > 0) return { value: null, kind: 'open' };
    let prev = x;
    for (let k = dir < 0 ? count - 1 : 0; k >= 0 && k < count; k += dir) {
      if ((dir < 0 ? xs[k] >= x : xs[k] <= x)) continue;
      const o = Math.abs(b.fitted[k] - y0) - b.prediction[k];
      if (!Number.isFinite(o)) return { value: null, kind: 'open' };
      if (o > 0) return { value: brentRoot(outside, Math.min(prev, xs[k]), Math.max(prev, xs[k])), kind: 'data' };
      prev = xs[k];
    }
    prev = dir < 0 ? Math.min(prev, lo) : Math.max(prev, hi);
    for (const xn of outward(dir < 0 ? lo : hi, dir, lo, hi, INVERSE_REACH.intervalReach)) {
      if ((dir < 0 ? xn >= x : xn <= x)) continue;
      const o = outside(xn);
      if (!Number.isFinite(o)) return { value: null, kind: 'open' };
      if (o > 0) return { value: brentRoot(outside, Math.min(prev, xn), Math.max(prev, xn)), kind: 'extrapolated' };
      prev = xn;
    }
    return { value: null, kind: 'open' };
  };
  const lower = end(-1);
  const upper = end(1);
  // an end computed beyond the data range counts as extrapolated; Brent returning null is open
  const kindOf = (e: { value: number | null; kind: InverseEnd }): InverseEnd => (e.value === null ? 'open' : e.value < lo || e.value > hi ? 'extrapolated' : e.kind);
  const ends: [InverseEnd, InverseEnd] = [kindOf(lower), kindOf(upper)];
  const notes: string[] = [];
  if (roots.length > 1) notes.push(`${roots.length} solutions in the data range (${roots.map((r) => formatNumber(r)).join(', ')}); the smallest is reported`);
  if (extrapolated) notes.push(inverseText.estimateBeyond(x < lo ? 'below' : 'above', x < lo ? lo : hi));
  if (ends[0] === 'open' || ends[1] === 'open') notes.push(inverseText.openSide(ends[0] === 'open', ends[1] === 'open'));
  if (ends[0] === 'extrapolated' || ends[1] === 'extrapolated') notes.push(inverseText.endsBeyond(ends[0] === 'extrapolated', ends[1] === 'extrapolated'));
  return {
    response: y0, x, interval: [lower.value, upper.value], ends,
    ...(extrapolated ? { extrapolated } : {}),
    ...(notes.length ? { message: notes.join('; ') } : {}),
  };
}
