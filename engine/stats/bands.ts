/**
 * Confidence and prediction bands by the delta method (first-order
 * linearisation of the model in its parameters; e.g. Seber & Wild 1989,
 * Nonlinear Regression, ch. 5): at a predictor value x₀ with gradient
 * g = ∂f(x₀; θ)/∂θ at θ̂ and parameter covariance C,
 *   confidence: f(x₀) ± t·√(gᵀCg),
 *   prediction: f(x₀) ± t·√(gᵀCg + v(x₀)),
 * where t = t_{(1+level)/2, dof} and v(x₀) is the variance of one new
 * observation at x₀ (s² unweighted; s²/w(x₀) with relative weights; σ(x₀)²
 * when σ is absolute - supplied by the caller).
 */
import type { Bands, Prediction } from '../result';

/** Model values and their parameter gradient at predictor values (gradient m×p, column-major). */
export type ModelAt = (xs: Float64Array) => { f: Float64Array; gradient: Float64Array };

/** Variance of a single new observation at each predictor value. */
export type NewObservationVariance = (xs: Float64Array) => Float64Array;

/** Ratio max/min above which a positive predictor range gets a log-spaced grid (dose series, dilutions). */
export const LOG_GRID_RATIO = 1000;

/**
 * `count` (≥ 2) points from `min` to `max`, both included. Default count 200.
 * Evenly spaced, or evenly spaced in log x when 0 < min and max/min > LOG_GRID_RATIO,
 * so curves over several decades are drawn smoothly on a log axis.
 */
export function grid(min: number, max: number, count = 200): Float64Array {
  const xs = new Float64Array(count);
  const log = min > 0 && max / min > LOG_GRID_RATIO;
  const a = log ? Math.log(min) : min;
  const b = log ? Math.log(max) : max;
  for (let k = 1; k < count - 1; k++) {
    const u = a + ((b - a) * k) / (count - 1);
    xs[k] = log ? Math.exp(u) : u;
  }
  xs[0] = min;
  xs[count - 1] = max;
  return xs;
}

export interface BandPoints {
  fitted: Float64Array;
  /** Confidence half-widths t·√(gᵀCg). */
  confidence: Float64Array;
  /** Prediction half-widths t·√(gᵀCg + v). */
  prediction: Float64Array;
}

/** Band half-widths at the given predictor values. `cov` is the scaled p×p covariance (flat). */
export function bandsAt(xs: Float64Array, modelAt: ModelAt, cov: ArrayLike<number>, p: number, t: number, newVar: NewObservationVariance): BandPoints {
  const m = xs.length;
  const { f, gradient } = modelAt(xs);
  const v = newVar(xs);
  const confidence = new Float64Array(m);
  const prediction = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    let q = 0;
    for (let j = 0; j < p; j++) {
      const gj = gradient[j * m + i];
      let row = 0;
      for (let k = 0; k < p; k++) row += cov[j * p + k] * gradient[k * m + i];
      q += gj * row;
    }
    q = Math.max(q, 0); // rounding can make gᵀCg slightly negative when it is ~0
    confidence[i] = t * Math.sqrt(q);
    prediction[i] = t * Math.sqrt(q + v[i]);
  }
  return { fitted: f, confidence, prediction };
}

/** Bands over `grid(min, max, count)` as the result's `Bands`. */
export function bandsOver(min: number, max: number, modelAt: ModelAt, cov: ArrayLike<number>, p: number, t: number, newVar: NewObservationVariance, count = 200): Bands {
  const xs = grid(min, max, count);
  const b = bandsAt(xs, modelAt, cov, p, t, newVar);
  const arr = (fn: (i: number) => number) => Array.from(xs, (_, i) => fn(i));
  return {
    x: Array.from(xs),
    fitted: Array.from(b.fitted),
    confidenceLower: arr((i) => b.fitted[i] - b.confidence[i]),
    confidenceUpper: arr((i) => b.fitted[i] + b.confidence[i]),
    predictionLower: arr((i) => b.fitted[i] - b.prediction[i]),
    predictionUpper: arr((i) => b.fitted[i] + b.prediction[i]),
  };
}

/** Predictions with confidence and prediction intervals at given values. */
export function predictAt(values: readonly number[], modelAt: ModelAt, cov: ArrayLike<number>, p: number, t: number, newVar: NewObservationVariance): Prediction[] {
  const xs = Float64Array.from(values);
  const b = bandsAt(xs, modelAt, cov, p, t, newVar);
  return values.map((x, i) => ({
    x,
    fitted: b.fitted[i],
    confidence: [b.fitted[i] - b.confidence[i], b.fitted[i] + b.confidence[i]] as [number, number],
    prediction: [b.fitted[i] - b.prediction[i], b.fitted[i] + b.prediction[i]] as [number, number],
  }));
}
