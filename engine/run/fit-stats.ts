/**
 * Statistics of a solved fit: covariance (engine/stats/covariance.ts),
 * parameter intervals, goodness of fit, per-point influence, residual
 * diagnostics in predictor order, bands, warnings.
 *
 * Residuals and Jacobian are those the solver returns at the final estimate
 * (SolveOutcome contract), re-evaluated for robust fits.
 * Covariance scale: s² = SSR/dof when the variance is estimated, 1 when σ is
 * absolute. Robust losses: the covariance is that of the final weighted
 * least-squares step of IRLS (Holland & Welsch 1977, Commun. Statist. A6:813–827),
 * i.e. J and r scaled by √ρ′(rᵢ²/c²), a common approximation; SSR, R² and
 * the points table use the plain (weighted) residuals.
 * A fit that did not converge is not a result: its standard errors,
 * intervals, covariance, goodness-of-fit figures (all but n, p, dof and the
 * SSR at the last iterate), residual diagnostics, per-point influence and
 * bands are withheld (NaN / null), and so are the warnings computed from
 * them (engine/stats/warnings.ts); fitted values and residuals at the last
 * iterate are kept, for the views to show as such.
 * Per-point influence (engine/stats/influence.ts: leverage from the QR factor
 * of the covariance Jacobian, Cook's distance, studentized deleted residuals)
 * uses s estimated from the residuals also when σ is absolute (a σ known up to
 * a factor gives the same figures); robust fits: leverage of the reweighted
 * Jacobian with the plain residuals, as before, and the curvature test on the
 * reweighted step's residuals (orthogonal to that Jacobian's span). The rows
 * flagged and their warnings: engine/stats/influence-flags.ts; lack of fit
 * (engine/stats/lack-of-fit.ts) over the model columns' settings.
 * The bands (the curve with its confidence and prediction bands over 200
 * predictor values) are computed when first read, from numbers fixed here
 * (engine/run/fit-bands.ts).
 * Residual diagnostics (Durbin–Watson, runs, Shapiro–Wilk, curvature) are null when
 * dof ≤ 0 or when the residuals are at rounding level:
 * √(SSR/n) ≤ ROUNDING_LEVEL·max|√wᵢyᵢ| (an exact fit; their signs and
 * distribution are then noise of the arithmetic, not of the data).
 */
import type { FitPlan } from '../../parser/plan';
import type { FitResult, FitWarning, ResidualDiagnostics } from '../result';
import { estimateCovariance, unscaledCovariance } from '../stats/covariance';
import type { LeastSquaresProblem } from '../solve/problem';
import type { SolveOutcome } from '../solve/types';
import { goodnessOfFit } from '../stats/goodness';
import { hatDiagonal, influence } from '../stats/influence';
import { influenceReport, influenceWarnings } from '../stats/influence-flags';
import { lackOfFit } from '../stats/lack-of-fit';
import { curvatureTest } from '../stats/curvature';
import { parameterIntervalsFromSe } from '../stats/intervals';
import { durbinWatson, orderBy, runsTest } from '../stats/residual-tests';
import { shapiroWilk } from '../stats/shapiro-wilk';
import { boundHit, fitWarnings } from '../stats/warnings';
import { deferredBands } from './fit-bands';
import { exprText } from '../../parser/plan-expr';
import type { FitData } from './fit-data';
import { emptyGoodness, excludedFields, expandMatrix, parameterRow } from './fit-result';
import { numberArrayOf, toNumberArray } from './number-array';
import { warningText } from '../messages';

export interface FitStatisticsInput {
  fit: FitPlan;
  data: FitData;
  problem: LeastSquaresProblem;
  outcome: SolveOutcome;
  linear: boolean;
  lower: Float64Array;
  upper: Float64Array;
  /** Starting values of the free parameters. */
  start: Float64Array;
  /** Response scale c (engine/linalg/scale.ts): the problem's residuals and Jacobian are those of the data divided by c. Default 1. */
  responseScale?: number;
  guessed: { names: string[]; how: string };
}

type StatFields = Pick<
  FitResult,
  'parameters' | 'covariance' | 'correlation' | 'goodness' | 'residuals' | 'points' | 'bands' | 'predictor' | 'response' | 'sigmaAbsolute' | 'rowsDropped' | 'excluded' | 'rowAccount' | 'fitRowAccount' | 'influence'
>;

export function fitStatistics(input: FitStatisticsInput): { fields: StatFields; warnings: FitWarning[] } {
  const { fit, data, problem, outcome } = input;
  const { n, p } = problem;
  const theta = outcome.theta;
  // The solvers return r and J at θ (SolveOutcome contract; J bit-identical to a
  // fresh evaluation, r too or, from the linear solver, evaluated in double-double
  // and so closer to the exact residuals; tested in test/solve). Reusing them saves
  // a pass over the data and keeps one n×p array instead of two; robust fits
  // re-evaluate, since their outcome carries reweighting state.
  const reuse = !outcome.robustWeights && outcome.jacobian.length === n * p && outcome.residuals.length === n;
  const r = reuse ? outcome.residuals : new Float64Array(n);
  if (!reuse) problem.residuals(theta, r);
  const jac = reuse ? outcome.jacobian : new Float64Array(n * p);
  if (!reuse && p > 0) problem.jacobian(theta, jac);

  // Not converged: nothing below is a statistic of a fit (module comment); only the SSR at the last iterate is kept.
  if (!outcome.stop.converged) return withheld(input, r);

  // Covariance Jacobian (robust: scaled by √ρ′)
  let jcov = jac;
  let rcov = r;
  const rw = outcome.robustWeights;
  if (rw) {
    jcov = jac.map((v, k) => v * Math.sqrt(rw[k % n]));
    rcov = r.map((v, i) => v * Math.sqrt(rw[i]));
  }
  // the solver's own factorisation of this very Jacobian, when it has one (SolveOutcome.factor): not factored twice
  const cov = unscaledCovariance(jcov, n, p, !rw && jcov === outcome.jacobian && outcome.factor ? { factor: outcome.factor } : {});
  const c = input.responseScale ?? 1;
  const goodness = goodnessOfFit({ residuals: r, y: data.y, weights: data.weights, p, sigmaAbsolute: data.sigmaAbsolute, condition: cov.condition, scale: c });
  // s/c from the scaled residuals, in range whatever the units (robust covariance: of the last reweighted step)
  const rootMean = (v: Float64Array) => {
    if (!(goodness.dof > 0)) return NaN;
    let ss = 0; // the same sum, in the same order, as v.reduce((a, x) => a + x * x, 0)
    for (let i = 0; i < v.length; i++) ss += v[i] * v[i];
    return Math.sqrt(ss / goodness.dof);
  };
  const sScaled = rootMean(r);
  // covariance k²·(J̃ᵀJ̃)⁻¹ of the scaled problem J̃ = J/c: k = s/c (variance estimated), 1/c (σ absolute)
  const estimated = estimateCovariance(cov, data.sigmaAbsolute ? 1 / c : rw ? rootMean(rcov) : sScaled);
  const scaled = estimated.covariance;
  const intervals = parameterIntervalsFromSe(theta, estimated.se, fit.options.level, goodness.dof);
  const correlation = rowsOf(estimated.correlation, p);

  // leverages hᵢ = ‖row i of Q₁‖² from the QR of the (robust: reweighted) Jacobian, unit-free (engine/stats/influence.ts)
  const qr = cov.factor;
  const h = qr ? hatDiagonal(qr) : new Float64Array(n).fill(p === 0 ? 0 : NaN);
  const inf = influence(r, h, sScaled, cov.rank, goodness.dof);
  const sqrtW = data.weights ? data.weights.map(Math.sqrt) : null;
  const fitted = data.y.map((y, i) => y - (c * r[i]) / (sqrtW ? sqrtW[i] : 1));

  const exactFit = residualsAtRoundingLevel(r, data, goodness.dof, c);
  const residuals: ResidualDiagnostics = exactFit
    ? { durbinWatson: null, runs: null, shapiroWilk: null, lackOfFit: lackOfFit(data.columns, r, data.weights, cov.rank, c), curvature: null }
    : (() => {
        const order = data.x ? orderBy(data.x) : undefined;
        return {
          durbinWatson: durbinWatson(r, order), runs: runsTest(r, order), shapiroWilk: shapiroWilk(r),
          lackOfFit: lackOfFit(data.columns, r, data.weights, cov.rank, c),
          // robust fits: the residuals of the last reweighted step, orthogonal to its Jacobian's span
          curvature: qr ? curvatureTest(qr, rcov, fitted, sqrtW && rw ? sqrtW.map((v, i) => v * Math.sqrt(rw[i])) : rw ? rw.map(Math.sqrt) : sqrtW) : null,
        };
      })();
  const influenceFlags = influenceReport({ inf, rows: data.lines, rank: cov.rank, linear: input.linear, exactFit });

  let bands: FitResult['bands'] = null;
  if (data.x && data.predictor && data.modelColumns.length === 1 && n > 0 && theta.every(Number.isFinite)) {
    let min = Infinity;
    let max = -Infinity;
    for (const v of data.x) {
      if (v < min) min = v;
      if (v > max) max = v;
    }
    // computed when first read (engine/run/fit-bands.ts): most runs of many groups never read them
    bands = deferredBands(fit, {
      predictor: data.predictor,
      estimates: theta,
      se: estimated.se,
      corr: estimated.correlation,
      dof: goodness.dof,
      level: fit.options.level,
      rmse: goodness.rmse,
      sigmaAbsolute: data.sigmaAbsolute,
      min,
      max,
    });
  }

  const parameters = parameterRows(input, theta, (j) => intervals[j]);

  const free = fit.parameters.filter((q) => !q.fixed).map((q, j) => ({ name: q.name, estimate: theta[j], lower: input.lower[j], upper: input.upper[j] }));
  const warnings = fitWarnings({
    free,
    correlation,
    condition: cov.condition,
    rank: cov.rank,
    undetermined: cov.dependent.map((j) => free[j].name),
    n,
    stop: outcome.stop,
    residuals,
    linear: input.linear,
    rowsDropped: data.rowsDropped,
    ...(data.droppedLines ? { droppedLines: data.droppedLines } : {}),
    file: data.file,
    guessed: input.guessed,
  });

  return {
    fields: {
      parameters,
      covariance: expandMatrix(fit, scaled, 0),
      correlation: expandMatrix(fit, correlation, NaN),
      goodness,
      residuals,
      points: pointTable(data, fitted, inf),
      bands,
      predictor: data.predictor,
      response: responseText(fit),
      sigmaAbsolute: data.sigmaAbsolute,
      rowsDropped: data.rowsDropped,
      ...excludedFields(data),
      influence: influenceFlags,
    },
    warnings: withExcludedWarning([...warnings, ...influenceWarnings(influenceFlags, inf, data.lines, residuals.lackOfFit, residuals.curvature, goodness.dof - 1)], data),
  };
}

/** The response expression as text, once per fit plan (shared by its groups). */
function responseText(fit: FitPlan): string {
  let t = responseTexts.get(fit);
  if (t === undefined) {
    t = exprText(fit.blocks[0].response);
    responseTexts.set(fit, t);
  }
  return t;
}
const responseTexts = new WeakMap<FitPlan, string>();

/** The warnings with one more naming the rows left out by weight 0, when there are any. */
function withExcludedWarning(warnings: FitWarning[], data: FitData): FitWarning[] {
  return data.excluded ? [...warnings, { code: 'rows_dropped', message: warningText.rows_excluded(data.excluded.lines.length, data.file, data.excluded.lines) }] : warnings;
}

/** A flat p×p matrix as nested rows. */
function rowsOf(flat: Float64Array, p: number): number[][] {
  return Array.from({ length: p }, (_, j) => Array.from(flat.subarray(j * p, (j + 1) * p)));
}

/** Relative size of residuals treated as rounding noise (see module comment). */
const ROUNDING_LEVEL = 1e-12;

/** `r` are the residuals divided by the response scale `c`. */
function residualsAtRoundingLevel(r: Float64Array, data: FitData, dof: number, c: number): boolean {
  if (dof <= 0) return true;
  let ss = 0;
  let ymax = 0;
  for (let i = 0; i < r.length; i++) {
    ss += r[i] * r[i];
    const wy = Math.abs(data.y[i]) * (data.weights ? Math.sqrt(data.weights[i]) : 1);
    if (wy > ymax) ymax = wy;
  }
  return Math.sqrt(ss / Math.max(1, r.length)) <= ROUNDING_LEVEL * (ymax / c);
}

/** The fields of a fit that did not converge: last-iterate values only, every statistic withheld. */
function withheld(input: FitStatisticsInput, r: Float64Array): { fields: StatFields; warnings: FitWarning[] } {
  const { fit, data, problem, outcome } = input;
  const { n, p } = problem;
  const theta = outcome.theta;
  // r is scaled by the response scale c (engine/linalg/scale.ts)
  const c = input.responseScale ?? 1;
  let ss = 0;
  for (let i = 0; i < n; i++) ss += r[i] * r[i];
  const ssr = c * c * ss;
  const goodness = { ...emptyGoodness(n, p), ssr: Number.isFinite(ssr) ? ssr : NaN };
  const sqrtW = data.weights ? data.weights.map(Math.sqrt) : null;
  const fitted = data.y.map((y, i) => y - (c * r[i]) / (sqrtW ? sqrtW[i] : 1));
  const parameters = parameterRows(input, theta, () => ({ stderr: NaN, lower: NaN, upper: NaN }));
  const P = fit.parameters.length;
  const nan = () => Array.from({ length: P }, () => new Array<number>(P).fill(NaN));
  const free = fit.parameters.filter((q) => !q.fixed).map((q, j) => ({ name: q.name, estimate: theta[j], lower: input.lower[j], upper: input.upper[j] }));
  const none = { durbinWatson: null, runs: null, shapiroWilk: null };
  const warnings = fitWarnings({
    free, correlation: nan(), condition: NaN, rank: p, undetermined: [], n, stop: outcome.stop, residuals: none, linear: input.linear,
    rowsDropped: data.rowsDropped, ...(data.droppedLines ? { droppedLines: data.droppedLines } : {}), file: data.file, guessed: input.guessed,
  });
  const missing = new Array<number>(n).fill(NaN);
  return {
    fields: {
      parameters,
      covariance: nan(),
      correlation: nan(),
      goodness,
      residuals: none,
      points: pointTable(data, fitted, { standardized: missing, studentized: missing, deletedStudentized: missing, leverage: missing, cooksDistance: missing }),
      bands: null,
      predictor: data.predictor,
      response: responseText(fit),
      sigmaAbsolute: data.sigmaAbsolute,
      rowsDropped: data.rowsDropped,
      ...excludedFields(data),
    },
    warnings: withExcludedWarning(warnings, data),
  };
}

/** The parameter rows of a result: free parameters with their interval (`intervalOf(j)`), fixed ones at their value. */
function parameterRows(input: FitStatisticsInput, theta: Float64Array, intervalOf: (j: number) => { stderr: number; lower: number; upper: number }): FitResult['parameters'] {
  const { fit } = input;
  const freeIndex = new Map<string, number>();
  fit.parameters.filter((q) => !q.fixed).forEach((q, j) => freeIndex.set(q.name, j));
  const guessed = new Set(input.guessed.names);
  return fit.parameters.map((q) => {
    const j = freeIndex.get(q.name);
    if (j === undefined) {
      const v = q.initial ?? NaN;
      return parameterRow(q, { estimate: v, stderr: NaN, lower: NaN, upper: NaN, initial: v, guessed: false, atBound: null });
    }
    return parameterRow(q, {
      estimate: theta[j],
      ...intervalOf(j),
      initial: input.start[j],
      guessed: guessed.has(q.name),
      atBound: boundHit(theta[j], input.lower[j], input.upper[j]),
    });
  });
}

/** The per-point table: data, fitted values and residuals, and the influence columns given. */
function pointTable(
  data: FitData,
  fitted: Float64Array,
  inf: { standardized: ArrayLike<number>; studentized: ArrayLike<number>; deletedStudentized: ArrayLike<number>; leverage: ArrayLike<number>; cooksDistance: ArrayLike<number> },
): FitResult['points'] {
  return {
    row: toNumberArray(data.lines),
    x: data.x ? toNumberArray(data.x) : null,
    y: toNumberArray(data.y),
    fitted: toNumberArray(fitted),
    residual: numberArrayOf(data.n, (i) => data.y[i] - fitted[i]),
    standardized: toNumberArray(inf.standardized),
    studentized: toNumberArray(inf.studentized),
    deletedStudentized: toNumberArray(inf.deletedStudentized),
    leverage: toNumberArray(inf.leverage),
    cooksDistance: toNumberArray(inf.cooksDistance),
    weight: data.weights ? toNumberArray(data.weights) : null,
  };
}
