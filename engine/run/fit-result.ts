/**
 * Building FitResult values: the failed/empty shape (a fit that could not
 * run still yields a complete result with stop `failed` and its reason), and
 * parameter rows.
 */
import type { FitPlan, LossKind, Method } from '../../parser/plan';
import type { FitResult, FitWarning, GoodnessOfFit, ParameterResult, StopReason } from '../result';
import type { FitData } from './fit-data';
import { exprText } from '../../parser/plan-expr';
import { isLinearInParameters } from '../compile';
import { toNumberArray } from './number-array';

export function emptyGoodness(n: number, p: number): GoodnessOfFit {
  return { n, p, dof: n - p, ssr: NaN, rmse: NaN, r2: NaN, adjR2: NaN, chi2: null, chi2Reduced: null, logLikelihood: NaN, aic: NaN, aicc: NaN, bic: NaN, condition: NaN };
}

/** Method reported for a fit that never reached a solver: what `auto` would have chosen. */
export function plannedMethod(method: Method, loss: LossKind, linear = true): Exclude<Method, 'auto'> {
  if (method === 'auto') return loss === 'squared' && linear ? 'linear' : 'levenberg_marquardt';
  return method;
}

function modelIsLinear(fit: FitPlan): boolean {
  const free = fit.parameters.filter((p) => !p.fixed).map((p) => p.name);
  return fit.blocks.every((b) => isLinearInParameters(b.model, free));
}

export function failedFit(fit: FitPlan, data: FitData | null, stop: StopReason, warnings: FitWarning[], elapsedMs = 0): FitResult {
  const free = fit.parameters.filter((p) => !p.fixed).length;
  const n = data?.n ?? 0;
  const P = fit.parameters.length;
  return {
    name: fit.name,
    ...(data?.group !== undefined ? { group: data.group } : {}),
    method: plannedMethod(fit.options.method, fit.options.loss, modelIsLinear(fit)),
    loss: fit.options.loss,
    level: fit.options.level,
    stop,
    iterations: 0,
    evaluations: 0,
    parameters: fit.parameters.map((p) => ({
      name: p.name,
      estimate: p.initial ?? NaN,
      stderr: null,
      lower: null,
      upper: null,
      relativeStderr: null,
      fixed: p.fixed,
      atBound: null,
      initial: p.initial ?? NaN,
      start: p.initial === undefined ? 'guessed' : 'given',
      ...(p.unit !== undefined ? { unit: p.unit } : {}),
    })),
    covariance: Array.from({ length: P }, () => new Array<number>(P).fill(NaN)),
    correlation: Array.from({ length: P }, () => new Array<number>(P).fill(NaN)),
    goodness: emptyGoodness(n, free),
    residuals: { durbinWatson: null, runs: null, shapiroWilk: null },
    points: {
      row: data ? toNumberArray(data.lines) : [],
      x: data?.x ? toNumberArray(data.x) : null,
      y: data ? toNumberArray(data.y) : [],
      fitted: new Array<number>(n).fill(NaN),
      residual: new Array<number>(n).fill(NaN),
      standardized: new Array<number>(n).fill(NaN),
      studentized: new Array<number>(n).fill(NaN),
      deletedStudentized: new Array<number>(n).fill(NaN),
      leverage: new Array<number>(n).fill(NaN),
      cooksDistance: new Array<number>(n).fill(NaN),
      weight: data?.weights ? toNumberArray(data.weights) : null,
    },
    bands: null,
    predictor: data?.predictor ?? fit.blocks[0]?.predictor ?? null,
    response: fit.blocks[0] ? exprText(fit.blocks[0].response) : '',
    sigmaAbsolute: fit.blocks[0]?.sigma !== undefined,
    rowsDropped: data?.rowsDropped ?? 0,
    ...(data ? excludedFields(data) : {}),
    warnings,
    elapsedMs,
  };
}

/**
 * The result's `excluded` field for rows left out by a weight of 0 (nothing when there are none), and the
 * account of the rows left out by reason (`rowAccount`, `fitRowAccount` for a per-group fit).
 */
export function excludedFields(data: FitData): Pick<FitResult, 'excluded' | 'rowAccount' | 'fitRowAccount'> {
  const e = data.excluded;
  const accounts = { ...(data.rowAccount ? { rowAccount: data.rowAccount } : {}), ...(data.fitRowAccount ? { fitRowAccount: data.fitRowAccount } : {}) };
  if (!e || e.lines.length === 0) return accounts;
  return { excluded: { reason: 'weight_zero', row: toNumberArray(e.lines), x: e.x ? toNumberArray(e.x) : null, y: toNumberArray(e.y) }, ...accounts };
}

/** Full P×P matrix in plan parameter order from a free-parameter p×p flat matrix; fixed rows/columns get `fill`. */
export function expandMatrix(fit: FitPlan, free: ArrayLike<number> | number[][], fill: number): number[][] {
  const idx: number[] = [];
  fit.parameters.forEach((p) => idx.push(p.fixed ? -1 : idx.filter((i) => i >= 0).length));
  const p = idx.filter((i) => i >= 0).length;
  const get = (j: number, k: number) => (Array.isArray(free) ? (free as number[][])[j][k] : (free as ArrayLike<number>)[j * p + k]);
  return idx.map((j) => idx.map((k) => (j >= 0 && k >= 0 ? get(j, k) : fill)));
}

export function parameterRow(
  plan: FitPlan['parameters'][number],
  values: { estimate: number; stderr: number; lower: number; upper: number; initial: number; guessed: boolean; atBound: 'lower' | 'upper' | null },
): ParameterResult {
  const fixed = plan.fixed;
  const se = fixed ? null : values.stderr;
  return {
    name: plan.name,
    estimate: values.estimate,
    stderr: se,
    lower: fixed ? null : values.lower,
    upper: fixed ? null : values.upper,
    relativeStderr: se === null || values.estimate === 0 ? null : Math.abs(se / values.estimate),
    fixed,
    atBound: fixed ? null : values.atBound,
    initial: values.initial,
    start: values.guessed ? 'guessed' : 'given',
    ...(plan.unit !== undefined ? { unit: plan.unit } : {}),
  };
}
