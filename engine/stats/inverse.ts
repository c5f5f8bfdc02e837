/**
 * Inverse prediction (calibration): the predictor value x̂ where the fitted
 * curve equals an observed response y₀, and an interval for it obtained by
 * inverting the prediction band: all x whose prediction interval contains y₀
 * (Draper & Smith 1998, Applied Regression Analysis, 3rd ed., §3.2 "inverse
 * regression (straight line case)"; the same construction is applied to any
 * single-predictor model through its delta-method band).
 *
 * Search is restricted to the data range [lo, hi]: the curve is scanned on an
 * evenly spaced grid (default 200 points) for sign changes of f(x) − y₀,
 * each bracket refined with Brent's method (./root.ts). With several
 * solutions the smallest x is reported and the message says so. Interval ends
 * are where |f(x) − y₀| equals the prediction half-width; an end that does not
 * occur inside the data range is null.
 */
import type { InversePrediction } from '../result';
import type { BandPoints } from './bands';
import { grid } from './bands';
import { brentRoot } from './root';
import { inverseText } from '../messages';
import { formatNumber } from '../format';

/** Band values at predictor values (fitted and prediction half-widths are used). */
export type Curve = (xs: Float64Array) => BandPoints;

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
  if (roots.length === 0) {
    let fmin = Infinity;
    let fmax = -Infinity;
    for (const f of b.fitted) {
      if (f < fmin) fmin = f;
      if (f > fmax) fmax = f;
    }
    return {
      response: y0,
      x: null,
      interval: [null, null],
      message: inverseText.noCrossing(lo, hi, y0, fmin, fmax),
    };
  }
  const x = roots[0];

  let lower: number | null = null;
  for (let k = firstBracket; k >= 0; k--) {
    if (xs[k] < x && Math.abs(b.fitted[k] - y0) - b.prediction[k] > 0) {
      lower = brentRoot(outside, xs[k], x);
      break;
    }
  }
  let upper: number | null = null;
  for (let k = firstBracket + 1; k < count; k++) {
    if (xs[k] > x && Math.abs(b.fitted[k] - y0) - b.prediction[k] > 0) {
      upper = brentRoot(outside, x, xs[k]);
      break;
    }
  }
  const notes: string[] = [];
  if (roots.length > 1) notes.push(`${roots.length} solutions in the data range (${roots.map((r) => formatNumber(r)).join(', ')}); the smallest is reported`);
  if (lower === null || upper === null) notes.push(inverseText.openAtEdge);
  return { response: y0, x, interval: [lower, upper], ...(notes.length ? { message: notes.join('; ') } : {}) };
}
