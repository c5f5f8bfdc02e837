/**
 * The fitted curve of a single-predictor fit as functions for bands,
 * predictions and inverse predictions: model values and parameter gradients
 * at any predictor values, the parameter covariance, the t critical value
 * and the variance of one new observation.
 *
 * Rebuilt from plain data (the plan and the fit's numbers), so queries work
 * the same on results computed in another thread.
 *
 * Variance of one new observation at x (prediction band):
 * - unweighted: s²;
 * - relative weights: s²/w(x) when the weight expression reads no column but
 *   the predictor, else s²·mean(1/wᵢ) over the fitted rows;
 * - absolute σ: σ(x)² when the sigma expression reads no column but the
 *   predictor, else mean(σᵢ²) over the fitted rows.
 */
import type { Expr, FitPlan } from '../../parser/plan';
import { compileColumnExpr, compileModel } from '../compile';
import type { FitResult } from '../result';
import type { ModelAt, NewObservationVariance } from '../stats/bands';
import { tCritical } from '../stats/distributions';
import { columnsOf, substituteParams } from './expr';

/** The model with fixed parameters replaced by their values, and the free parameter names. */
export function freeModel(fit: FitPlan): { expr: Expr; free: string[]; fixed: Map<string, number> } {
  const fixed = new Map<string, number>();
  for (const p of fit.parameters) if (p.fixed) fixed.set(p.name, p.initial ?? NaN);
  return { expr: substituteParams(fit.blocks[0].model, fixed), free: fit.parameters.filter((p) => !p.fixed).map((p) => p.name), fixed };
}

export interface CurveInput {
  fit: FitPlan;
  predictor: string;
  /** Free-parameter estimates. */
  estimates: Float64Array;
  /** Scaled covariance of the free parameters, p×p flat. */
  cov: ArrayLike<number>;
  dof: number;
  level: number;
  /** Residual standard deviation s. */
  rmse: number;
  sigmaAbsolute: boolean;
  /** Weights of the fitted rows (for the fallback new-observation variance), or null. */
  weights: ArrayLike<number> | null;
}

export interface Curve {
  modelAt: ModelAt;
  newVar: NewObservationVariance;
  cov: ArrayLike<number>;
  p: number;
  /** t_{(1+level)/2, dof} (NaN when dof ≤ 0). */
  t: number;
}

export function buildCurve(input: CurveInput): Curve {
  const { fit, predictor, estimates } = input;
  const { expr, free } = freeModel(fit);
  const model = compileModel(expr, free, [predictor]);
  const p = free.length;
  const modelAt: ModelAt = (xs) => {
    const m = xs.length;
    const f = new Float64Array(m);
    const gradient = new Float64Array(m * p);
    model.valueAndJacobian(estimates, [xs], m, f, gradient);
    return { f, gradient };
  };
  return { modelAt, newVar: newObservationVariance(input), cov: input.cov, p, t: tCritical(input.level, input.dof) };
}

function newObservationVariance(input: CurveInput): NewObservationVariance {
  const block = input.fit.blocks[0];
  const s2 = input.rmse * input.rmse;
  const meanInverse = () => {
    const w = input.weights;
    if (!w || w.length === 0) return 1;
    let s = 0;
    for (let i = 0; i < w.length; i++) s += 1 / w[i];
    return s / w.length;
  };
  const onPredictor = (e: Expr) => columnsOf(e).every((c) => c === input.predictor);
  const evalAt = (e: Expr, xs: Float64Array) => {
    const out = new Float64Array(xs.length);
    compileColumnExpr(e, [input.predictor])([xs], xs.length, out);
    return out;
  };
  if (input.sigmaAbsolute && block.sigma) {
    const sigma = block.sigma;
    if (onPredictor(sigma)) return (xs) => evalAt(sigma, xs).map((v) => v * v);
    const v = meanInverse();
    return (xs) => new Float64Array(xs.length).fill(v);
  }
  if (block.weight) {
    const weight = block.weight;
    if (onPredictor(weight)) return (xs) => evalAt(weight, xs).map((w) => s2 / w);
    const v = s2 * meanInverse();
    return (xs) => new Float64Array(xs.length).fill(v);
  }
  return (xs) => new Float64Array(xs.length).fill(s2);
}

/** Free-parameter estimates and covariance (flat p×p) out of a FitResult. */
export function freeParts(result: FitResult): { estimates: Float64Array; cov: Float64Array } {
  const idx = result.parameters.map((p, i) => (p.fixed ? -1 : i)).filter((i) => i >= 0);
  const p = idx.length;
  const cov = new Float64Array(p * p);
  idx.forEach((a, j) => idx.forEach((b, k) => (cov[j * p + k] = result.covariance[a]?.[b] ?? NaN)));
  return { estimates: Float64Array.from(idx, (i) => result.parameters[i].estimate), cov };
}

/** The curve of a finished single-predictor fit, or null when it has no predictor. */
export function curveFromResult(fit: FitPlan, result: FitResult): Curve | null {
  if (result.predictor === null) return null;
  const { estimates, cov } = freeParts(result);
  return buildCurve({
    fit,
    predictor: result.predictor,
    estimates,
    cov,
    dof: result.goodness.dof,
    level: result.level,
    rmse: result.goodness.rmse,
    sigmaAbsolute: result.sigmaAbsolute,
    weights: result.points.weight,
  });
}
