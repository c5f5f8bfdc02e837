/**
 * Confidence and prediction bands by the delta method (first-order
 * linearisation of the model in its parameters; e.g. Seber & Wild 1989,
 * Nonlinear Regression, ch. 5): at a predictor value x₀ with gradient
 * g = ∂f(x₀; θ)/∂θ at θ̂ and parameter covariance C,
 *   confidence: f(x₀) ± t·√(gᵀCg),
 *   prediction: f(x₀) ± t·√(gᵀCg + v(x₀)),
 * where t = t_{(1+level)/2, dof} and v(x₀) is the variance of one new
 * observation at x₀ (s² unweighted; s²/w(x₀) with relative weights; σ(x₀)²
 * when σ is absolute - supplied by the caller as its root).
 *
 * Scale: C is given factored as standard errors and correlations (C =
 * diag(se)·ρ·diag(se)) and √(gᵀCg) is formed as m·√((v/m)ᵀρ(v/m)) with
 * vⱼ = gⱼ·seⱼ, m = max|vⱼ| (engine/linalg/scale.ts), and the prediction
 * half-width as t·hypot(√(gᵀCg), √v): nothing is squared, so bands of data
 * near 1e-300 or 1e+300 are as accurate as near 1.
 */
import type { Bands, Prediction } from '../result';
import { quadraticFormRoot } from '../linalg/scale';

/** Covariance of p estimates as standard errors and a correlation matrix (flat p×p, ρⱼⱼ = 1). */
export interface FactoredCovariance {
  p: number;
  se: ArrayLike<number>;
  corr: ArrayLike<number>;
}

/** The factored form of a flat p×p covariance C (for callers that hold C; a zero variance gets correlations 0). */
export function factorCovariance(cov: ArrayLike<number>, p: number): FactoredCovariance {
  const se = Float64Array.from({ length: p }, (_, j) => (cov[j * p + j] >= 0 ? Math.sqrt(cov[j * p + j]) : NaN));
  const corr = new Float64Array(p * p);
  for (let j = 0; j < p; j++) {
    for (let k = 0; k < p; k++) {
      const d = se[j] * se[k];
      corr[j * p + k] = j === k ? (Number.isNaN(se[j]) ? NaN : 1) : d > 0 ? cov[j * p + k] / d : d === 0 ? 0 : NaN;
    }
  }
  return { p, se, corr };
}

/** Model values and their parameter gradient at predictor values (gradient m×p, column-major). */
export type ModelAt = (xs: Float64Array) => { f: Float64Array; gradient: Float64Array };

/** Standard deviation of a single new observation at each predictor value. */
export type NewObservationSd = (xs: Float64Array) => Float64Array;

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

/** Band half-widths at the given predictor values. */
export function bandsAt(xs: Float64Array, modelAt: ModelAt, cov: FactoredCovariance, t: number, newSd: NewObservationSd): BandPoints {
  const m = xs.length;
  const p = cov.p;
  const { f, gradient } = modelAt(xs);
  const sd = newSd(xs);
  const confidence = new Float64Array(m);
  const prediction = new Float64Array(m);
  const v = new Float64Array(p);
  for (let i = 0; i < m; i++) {
    for (let j = 0; j < p; j++) v[j] = gradient[j * m + i] * cov.se[j];
    const se = quadraticFormRoot(v, cov.corr, p);
    confidence[i] = t * se;
    prediction[i] = t * Math.hypot(se, sd[i]);
  }
  return { fitted: f, confidence, prediction };
}

/** Bands over `grid(min, max, count)` as the result's `Bands`. */
export function bandsOver(min: number, max: number, modelAt: ModelAt, cov: FactoredCovariance, t: number, newSd: NewObservationSd, count = 200): Bands {
  const xs = grid(min, max, count);
  const b = bandsAt(xs, modelAt, cov, t, newSd);
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
export function predictAt(values: readonly number[], modelAt: ModelAt, cov: FactoredCovariance, t: number, newSd: NewObservationSd): Prediction[] {
  const xs = Float64Array.from(values);
  const b = bandsAt(xs, modelAt, cov, t, newSd);
  return values.map((x, i) => ({
    x,
    fitted: b.fitted[i],
    confidence: [b.fitted[i] - b.confidence[i], b.fitted[i] + b.confidence[i]] as [number, number],
    prediction: [b.fitted[i] - b.prediction[i], b.fitted[i] + b.prediction[i]] as [number, number],
  }));
}
