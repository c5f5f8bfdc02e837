/**
 * The fitted curve of a single-predictor fit as functions for bands,
 * predictions and inverse predictions: model values and parameter gradients
 * at any predictor values, the parameter covariance (factored as standard
 * errors and correlations, engine/stats/bands.ts), the t critical value and
 * the standard deviation of one new observation.
 *
 * Rebuilt from plain data (the plan and the fit's numbers), so queries work
 * the same on results computed in another thread.
 *
 * Variance of one new observation at x, given as its root:
 * - unweighted: s²;
 * - relative weights: s²/w(x) when the weight expression reads no column but
 *   the predictor;
 * - absolute σ: σ(x)² when the sigma expression reads no column but the
 *   predictor.
 * Queries (`querySd`) take a σ or w the spec states for the new observation
 * instead, and divide the variance by m for the mean of m readings; with a
 * sigma or weight of other columns and nothing stated they get null and are
 * refused (engine/run/queries.ts): the value at a new point is not on the
 * curve, and an average over the fitted rows would misstate it (twice too
 * wide at the low end of a 1/x² calibration). The band drawn with the fit
 * (`newSd`) has no prediction part then (NaN: the chart draws the confidence
 * band alone and says why), rather than an average over the fitted rows.
 * Roots are formed without squaring s or σ (s·√(1/w), …), so they stay in
 * range for data near 1e-300 or 1e+300.
 */
import type { Expr, FitPlan } from '../../parser/plan';
import { compileColumnExpr, sharedModel } from '../compile';
import type { FitResult, ObservationSource } from '../result';
import type { FactoredCovariance, ModelAt, NewObservationSd } from '../stats/bands';
import { tCritical } from '../stats/distributions';
import { columnsOf, substituteParams } from '../../parser/plan-expr';

/** The model with fixed parameters replaced by their values, and the free parameter names. */
export function freeModel(fit: FitPlan): { expr: Expr; free: string[]; fixed: Map<string, number> } {
  const fixed = new Map<string, number>();
  for (const p of fit.parameters) if (p.fixed) fixed.set(p.name, p.initial ?? NaN);
  return { expr: substituteParams(fit.blocks[0].model, fixed), free: fit.parameters.filter((p) => !p.fixed).map((p) => p.name), fixed };
}

/**
 * `freeModel` of a plan's fit, computed once per fit plan object (plans are
 * not modified after checking) and shared by its groups; read-only.
 */
export function planFreeModel(fit: FitPlan): { readonly expr: Expr; readonly free: readonly string[] } {
  let m = freeModels.get(fit);
  if (!m) {
    const { expr, free } = freeModel(fit);
    m = { expr, free: Object.freeze(free) };
    freeModels.set(fit, m);
  }
  return m;
}
const freeModels = new WeakMap<FitPlan, { readonly expr: Expr; readonly free: readonly string[] }>();

export interface CurveInput {
  fit: FitPlan;
  predictor: string;
  /** Free-parameter estimates. */
  estimates: Float64Array;
  /** Covariance of the free-parameter estimates. */
  cov: FactoredCovariance;
  dof: number;
  level: number;
  /** Residual standard deviation s. */
  rmse: number;
  sigmaAbsolute: boolean;
}

export interface Curve {
  modelAt: ModelAt;
  /** For the band drawn with the fit (see the module comment). */
  newSd: NewObservationSd;
  /**
   * For a query: the root of the new-observation variance at each x, divided by `readings`, from the stated σ
   * (or w) when given, else from the fit's expression at x; null when the expression reads other columns
   * and nothing is stated. `source` says which.
   */
  querySd: (stated: { kind: 'sigma' | 'weight'; value: number } | undefined, readings: number) => { sd: NewObservationSd; source: ObservationSource } | null;
  cov: FactoredCovariance;
  p: number;
  /** t_{(1+level)/2, dof} (NaN when dof ≤ 0). */
  t: number;
}

export function buildCurve(input: CurveInput): Curve {
  const { fit, predictor, estimates } = input;
  const { expr, free } = planFreeModel(fit);
  const model = sharedModel(expr, free, [predictor]);
  const p = free.length;
  const modelAt: ModelAt = (xs) => {
    const m = xs.length;
    const f = new Float64Array(m);
    const gradient = new Float64Array(m * p);
    model.valueAndJacobian(estimates, [xs], m, f, gradient);
    return { f, gradient };
  };
  return { modelAt, newSd: newObservationSd(input), querySd: (stated, readings) => querySd(input, stated, readings), cov: input.cov, p, t: tCritical(input.level, input.dof) };
}

function querySd(input: CurveInput, stated: { kind: 'sigma' | 'weight'; value: number } | undefined, readings: number): { sd: NewObservationSd; source: ObservationSource } | null {
  const block = input.fit.blocks[0];
  const s = input.rmse;
  const root = Math.sqrt(readings);
  const fill = (v: number): NewObservationSd => (xs) => new Float64Array(xs.length).fill(v);
  const absolute = input.sigmaAbsolute && block.sigma !== undefined;
  if (stated) {
    // σ stated for a σ-weighted fit; w stated for a relatively weighted one (the checker holds the pairing)
    if (stated.kind === 'sigma') return { sd: fill(absolute ? stated.value / root : NaN), source: 'stated' };
    return { sd: fill(s / Math.sqrt(stated.value) / root), source: 'stated' };
  }
  const expr = absolute ? block.sigma : block.weight;
  if (!expr) return { sd: fill(s / root), source: 'residual' };
  if (!columnsOf(expr).every((c) => c === input.predictor)) return null;
  const f = compileColumnExpr(expr, [input.predictor]);
  const at = (xs: Float64Array) => {
    const out = new Float64Array(xs.length);
    f([xs], xs.length, out);
    return out;
  };
  return absolute
    ? { sd: (xs) => at(xs).map((v) => Math.abs(v) / root), source: 'expression' }
    : { sd: (xs) => at(xs).map((w) => (w > 0 ? s / Math.sqrt(w) / root : NaN)), source: 'expression' };
}

function newObservationSd(input: CurveInput): NewObservationSd {
  const block = input.fit.blocks[0];
  const s = input.rmse;
  const onPredictor = (e: Expr) => columnsOf(e).every((c) => c === input.predictor);
  const evalAt = (e: Expr, xs: Float64Array) => {
    const out = new Float64Array(xs.length);
    compileColumnExpr(e, [input.predictor])([xs], xs.length, out);
    return out;
  };
  const fill = (v: number) => (xs: Float64Array) => new Float64Array(xs.length).fill(v);
  if (input.sigmaAbsolute && block.sigma) {
    const sigma = block.sigma;
    if (onPredictor(sigma)) return (xs) => evalAt(sigma, xs).map(Math.abs);
    return fill(NaN);
  }
  if (block.weight) {
    const weight = block.weight;
    if (onPredictor(weight)) return (xs) => evalAt(weight, xs).map((wx) => s / Math.sqrt(wx));
    return fill(NaN);
  }
  return fill(s);
}

/** Free-parameter estimates and their covariance (standard errors and correlations) out of a FitResult. */
export function freeParts(result: FitResult): { estimates: Float64Array; cov: FactoredCovariance } {
  const idx = result.parameters.map((p, i) => (p.fixed ? -1 : i)).filter((i) => i >= 0);
  const p = idx.length;
  const corr = new Float64Array(p * p);
  idx.forEach((a, j) => idx.forEach((b, k) => (corr[j * p + k] = result.correlation[a]?.[b] ?? NaN)));
  const se = Float64Array.from(idx, (i) => result.parameters[i].stderr ?? NaN);
  return { estimates: Float64Array.from(idx, (i) => result.parameters[i].estimate), cov: { p, se, corr } };
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
  });
}
