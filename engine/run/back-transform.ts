/**
 * The inverse of a response transform: for a fit whose response is a function
 * h of one column (`model ln(rate) = …`), the map from the model's scale back
 * to the column's, v = h⁻¹(t), so predictions and their interval ends can be
 * reported where the user measures. An interval [a, b] on the model's scale
 * maps to [h⁻¹(a), h⁻¹(b)] (swapped when h decreases): for a monotone h the
 * probability content is kept, and the interval is not symmetric about
 * h⁻¹(fitted) (e.g. Draper & Smith 1998, Applied Regression Analysis, §13.2;
 * common practice). h⁻¹(fitted) estimates the median of the response, not its
 * mean, when the errors are symmetric on the model's scale.
 *
 * Method: h is evaluated once on a grid of ±10^(k/8), k = −2400…2400, and 0;
 * where h is finite it must be strictly monotone over the grid, else there is
 * no inverse (null, and the query keeps the model's scale). Each t is then
 * bracketed between grid neighbours and solved by Brent's method (engine/stats/root.ts)
 * with tolerance 0, i.e. to a bracket of 2ε·|v| (full double precision). A t
 * outside the grid's range of h gives NaN.
 */
import type { Expr } from '../../parser/plan';
import { compileColumnExpr } from '../compile';
import { brentRoot } from '../stats/root';

/** Grid exponent steps per decade and the decades each side of 1 (10^-300 … 10^300). */
const STEPS_PER_DECADE = 8;
const DECADES = 300;

export interface BackTransform {
  /** v = h⁻¹(t), NaN when t is outside h's range on the grid. */
  inverse: (t: number) => number;
  /** h decreases (interval ends swap). */
  decreasing: boolean;
}

/** The inverse of the response expression of one column, or null when it is the column itself or not monotone. */
export function backTransform(response: Expr, column: string): BackTransform | null {
  if (response.kind === 'column') return null;
  const h = compileColumnExpr(response, [column]);
  const k = DECADES * STEPS_PER_DECADE;
  const vs = new Float64Array(4 * k + 3);
  let i = 0;
  for (let j = k; j >= -k; j--) vs[i++] = -(10 ** (j / STEPS_PER_DECADE));
  vs[i++] = 0;
  for (let j = -k; j <= k; j++) vs[i++] = 10 ** (j / STEPS_PER_DECADE);
  const ts = new Float64Array(i);
  h([vs.subarray(0, i)], i, ts);
  const xs: number[] = [];
  const ys: number[] = [];
  for (let j = 0; j < i; j++) {
    if (Number.isFinite(ts[j])) {
      xs.push(vs[j]);
      ys.push(ts[j]);
    }
  }
  if (xs.length < 2) return null;
  const decreasing = ys[1] < ys[0];
  for (let j = 1; j < ys.length; j++) if (decreasing ? !(ys[j] < ys[j - 1]) : !(ys[j] > ys[j - 1])) return null;
  const one = (v: number) => {
    const out = new Float64Array(1);
    h([Float64Array.of(v)], 1, out);
    return out[0];
  };
  const inverse = (t: number): number => {
    if (!Number.isFinite(t)) return NaN;
    // binary search for the grid cell holding t
    let a = 0;
    let b = ys.length - 1;
    const above = (j: number) => (decreasing ? ys[j] <= t : ys[j] >= t);
    if (!above(b) || above(a) && ys[a] !== t) return ys[a] === t ? xs[a] : NaN;
    while (b - a > 1) {
      const m = (a + b) >> 1;
      if (above(m)) b = m;
      else a = m;
    }
    if (ys[b] === t) return xs[b];
    const r = brentRoot((v) => one(v) - t, xs[a], xs[b], 0);
    return r ?? NaN;
  };
  return { inverse, decreasing };
}
