/**
 * The spec's queries over finished fits: predict (fitted value with
 * confidence and prediction intervals; a transformed response also on its
 * column's scale, ./back-transform.ts), invert (predictor value for a
 * response, or the mean of several readings, engine/stats/inverse.ts),
 * backcalc (every standard read back through the curve) and compare (AICc, ΔAICc, Akaike weights
 * and, for two fits of the same data and response with different parameter
 * counts, the extra-sum-of-squares F test). Per-group fits answer once per group.
 * A fit (or group) that did not converge answers with its numbers withheld,
 * the way its own statistics are (engine/front/views/summary.ts `fitStatus`): the
 * values asked for are listed with null results and `withheld` says why.
 */
import type { ExpectTarget, FitPlan, NewObservation, Query, Range } from '../../parser/plan';
import { compileColumnExpr } from '../compile';
import { errorText, runText, withheldText } from '../messages';
import type { BackCalculation, FitResult, InversePrediction, JointFitResult, ObservationSource, Prediction, QueryResult, RunError } from '../result';
import { bandsAt, predictAt } from '../stats/bands';
import { compareQuery } from './compare-query';
import { compareGrouped, comparesGroups } from './compare-groups';
import { inversePrediction } from '../stats/inverse';
import { curveFromResult } from './curve';
import { backTransform, type BackTransform } from './back-transform';
import { columnsOf, exprText } from '../../parser/plan-expr';

export interface QueryContext {
  fitPlans: ReadonlyMap<string, FitPlan>;
  /** Results by fit name (several for per-group fits; empty when the fit did not run). */
  results: ReadonlyMap<string, FitResult[]>;
  /** The joint fits of the run (for `compare` of fits with shared parameters; absent: none). */
  joint?: readonly JointFitResult[];
}

export function runQueries(queries: readonly Query[], ctx: QueryContext): { results: QueryResult[]; errors: RunError[] } {
  const results: QueryResult[] = [];
  const errors: RunError[] = [];
  for (const q of queries) {
    const out = q.kind === 'compare' ? compare(q, ctx) : q.kind === 'predict' ? predict(q, ctx) : q.kind === 'backcalc' ? backcalc(q, ctx) : invert(q, ctx);
    for (const r of out.results) results.push(r);
    for (const e of out.errors) errors.push(e);
  }
  return { results, errors };
}

type Out = { results: QueryResult[]; errors: RunError[] };

function lookup(name: string, q: Query, ctx: QueryContext): { plan: FitPlan; results: FitResult[] } | RunError {
  const plan = ctx.fitPlans.get(name);
  if (!plan) return { code: 'unknown_fit', message: errorText.unknownFit(name), range: q.range };
  const results = ctx.results.get(name) ?? [];
  if (results.length === 0) return { code: 'fit_not_run', message: runText.fitNotRun(name), range: q.range, fit: name };
  return { plan, results };
}

/** `fit` or `fit [group]`. */
const label = (fit: string, r: FitResult): string => runText.fitLabel(fit, r.group);

const isError = (x: unknown): x is RunError => typeof x === 'object' && x !== null && 'code' in x && 'message' in x;

/** The fitted points' predictor range, or null when there are none. */
function rangeOf(xs: readonly number[]): [number, number] | null {
  // (a loop, not Math.min(...xs): a call takes at most about 10⁵ arguments, data can be longer)
  let lo = Infinity;
  let hi = -Infinity;
  for (const x of xs) {
    if (x < lo) lo = x;
    if (x > hi) hi = x;
  }
  return lo <= hi ? [lo, hi] : null;
}

/** The stated spread for the i-th query value (one value for all, or one per value). */
function statedAt(observation: NewObservation | undefined, i: number): { kind: 'sigma' | 'weight'; value: number } | undefined {
  if (!observation) return undefined;
  return { kind: observation.kind, value: observation.values.length === 1 ? observation.values[0] : observation.values[i] ?? NaN };
}

/** The refusal of a query on a fit whose sigma/weight reads other columns, with nothing stated (the checker reports it first). */
function spreadRefusal(plan: FitPlan, predictor: string, q: { kind: string; fit: string; range: Range }, example: string): RunError {
  const block = plan.blocks[0];
  const kind = block.sigma ? 'sigma' : 'weight';
  const cols = columnsOf((block.sigma ?? block.weight)!).filter((c) => c !== predictor);
  return { code: 'new_sigma_needed', message: errorText.newSigmaNeeded(q.fit, kind, cols, predictor, example), range: q.range, fit: q.fit };
}

/** The inverse of a response transform of one column (`ln(rate)`), or null (engine/run/back-transform.ts). */
function transformOf(plan: FitPlan): { column: string; expression: string; back: BackTransform } | null {
  const response = plan.blocks[0].response;
  const cols = columnsOf(response);
  if (response.kind === 'column' || cols.length !== 1) return null;
  const back = backTransform(response, cols[0]);
  return back ? { column: cols[0], expression: exprText(response), back } : null;
}

/** Predictions at the query's values (one new observation each), or a refusal. */
export function predictions(
  plan: FitPlan, r: FitResult, values: readonly number[], observation: NewObservation | undefined, q: { kind: string; fit: string; range: Range },
): { predictions: Prediction[]; source: ObservationSource; range: [number, number] | null } | RunError {
  const curve = curveFromResult(plan, r)!;
  const range = r.points.x ? rangeOf(r.points.x) : null;
  const transform = transformOf(plan);
  let source: ObservationSource = 'residual';
  const out: Prediction[] = [];
  for (let i = 0; i < values.length; i++) {
    const spread = curve.querySd(statedAt(observation, i), 1);
    if (!spread) return spreadRefusal(plan, r.predictor!, q, `predict ${q.fit} at ${r.predictor} = ${values.join(', ')}`);
    source = spread.source;
    const x = values[i];
    const [p] = predictAt([x], curve.modelAt, curve.cov, curve.t, spread.sd);
    const sd = spread.sd(Float64Array.of(x))[0];
    const beyond = range !== null && (x < range[0] || x > range[1]);
    let original: Prediction['original'];
    if (transform) {
      const inv = transform.back.inverse;
      const pair = (a: number, b: number): [number, number] => (transform.back.decreasing ? [inv(b), inv(a)] : [inv(a), inv(b)]);
      original = { fitted: inv(p.fitted), confidence: pair(...p.confidence), prediction: pair(...p.prediction) };
    }
    out.push({ ...p, observationSd: sd, ...(beyond ? { extrapolated: true } : {}), ...(original ? { original } : {}) });
  }
  return { predictions: out, source, range };
}

function predict(q: Extract<Query, { kind: 'predict' }>, ctx: QueryContext): Out {
  const found = lookup(q.fit, q, ctx);
  if (isError(found)) return { results: [], errors: [found] };
  const out: Out = { results: [], errors: [] };
  const transform = transformOf(found.plan);
  for (const r of found.results) {
    const curve = curveFromResult(found.plan, r);
    if (!curve || r.predictor === null) {
      out.errors.push({ code: 'no_predictor', message: errorText.noPredictor(q.fit, 'predict', columnsOf(found.plan.blocks[0].model)), range: q.range, fit: q.fit });
      return out;
    }
    if (q.variable !== r.predictor) {
      out.errors.push({ code: 'wrong_variable', message: errorText.wrongVariable(q.fit, q.variable, r.predictor), range: q.range, fit: q.fit });
      return out;
    }
    const head = {
      kind: 'predict' as const, fit: q.fit, ...(r.group !== undefined ? { group: r.group } : {}), variable: q.variable,
      ...(transform ? { transform: { column: transform.column, expression: transform.expression } } : {}),
    };
    if (!r.stop.converged) {
      out.results.push({
        ...head,
        predictions: q.values.map((x) => ({ x, fitted: NaN, confidence: [NaN, NaN], prediction: [NaN, NaN] })),
        withheld: withheldText.query(label(q.fit, r), 'predictions', r.stop.code),
      });
      continue;
    }
    const p = predictions(found.plan, r, q.values, q.observation, q);
    if (isError(p)) {
      out.errors.push(p);
      return out;
    }
    out.results.push({ ...head, predictions: p.predictions, observation: p.source, ...(p.range ? { range: p.range } : {}) });
  }
  return out;
}

/** The map from a response column value to the model's response scale (`ln(rate)` at rate = v), or null when the query's column is not the response's one column. */
function responseMap(plan: FitPlan, column: string): ((v: number) => number) | null {
  const response = plan.blocks[0].response;
  const responseColumns = columnsOf(response);
  if (response.kind === 'column' && response.name === column) return (v) => v;
  if (responseColumns.length !== 1 || responseColumns[0] !== column) return null;
  const f = compileColumnExpr(response, responseColumns);
  return (v) => {
    const out = new Float64Array(1);
    f([Float64Array.of(v)], 1, out);
    return out[0];
  };
}

/** Inverse predictions at the query's responses (means of `readings` readings), or a refusal. */
export function inversions(
  plan: FitPlan, r: FitResult, values: readonly number[], readings: number, observation: NewObservation | undefined, column: string, q: { kind: string; fit: string; range: Range },
): { inversions: InversePrediction[]; source: ObservationSource } | RunError {
  const curve = curveFromResult(plan, r)!;
  const range = rangeOf(r.points.x ?? []);
  if (!range) return { code: 'no_points', message: errorText.noPoints(label(q.fit, r), 'invert'), range: q.range, fit: q.fit };
  const transform = responseMap(plan, column)!;
  const response = plan.blocks[0].response;
  let source: ObservationSource = 'residual';
  const out: InversePrediction[] = [];
  for (let i = 0; i < values.length; i++) {
    const spread = curve.querySd(statedAt(observation, i), readings);
    if (!spread) return spreadRefusal(plan, r.predictor!, q, `invert ${q.fit} at ${column} = ${values.join(', ')}`);
    source = spread.source;
    const v = values[i];
    const y0 = transform(v);
    if (!Number.isFinite(y0)) {
      out.push({ response: v, x: null, interval: [null, null], message: runText.notDefinedAt(exprText(response), column, v) });
      continue;
    }
    const band = (xs: Float64Array) => bandsAt(xs, curve.modelAt, curve.cov, curve.t, spread.sd);
    out.push({ ...inversePrediction(y0, range[0], range[1], band), response: v });
  }
  return { inversions: out, source };
}

function invert(q: Extract<Query, { kind: 'invert' }>, ctx: QueryContext): Out {
  const found = lookup(q.fit, q, ctx);
  if (isError(found)) return { results: [], errors: [found] };
  // The query names a column; a response expression of that one column (e.g. ln(rate)) maps the value first.
  if (!responseMap(found.plan, q.response)) {
    return { results: [], errors: [{ code: 'wrong_response', message: errorText.wrongResponse(q.fit, q.response, columnsOf(found.plan.blocks[0].response)), range: q.range, fit: q.fit }] };
  }
  const readings = q.readings ?? 1;
  const out: Out = { results: [], errors: [] };
  for (const r of found.results) {
    const curve = curveFromResult(found.plan, r);
    if (!curve || !r.points.x) {
      out.errors.push({ code: 'no_predictor', message: errorText.noPredictor(q.fit, 'invert', columnsOf(found.plan.blocks[0].model)), range: q.range, fit: q.fit });
      return out;
    }
    const head = { kind: 'invert' as const, fit: q.fit, ...(r.group !== undefined ? { group: r.group } : {}), response: q.response, ...(readings !== 1 ? { readings } : {}) };
    if (!r.stop.converged) {
      out.results.push({
        ...head,
        inversions: q.values.map((v) => ({ response: v, x: null, interval: [null, null] })),
        withheld: withheldText.query(label(q.fit, r), 'inverse predictions', r.stop.code),
      });
      continue;
    }
    if (r.points.x.length === 0) {
      // the fit has no points (its data had no usable rows): a data problem, reported with the fit
      out.errors.push({ code: 'no_points', message: errorText.noPoints(label(q.fit, r), 'invert'), range: q.range, fit: q.fit });
      continue;
    }
    const inv = inversions(found.plan, r, q.values, readings, q.observation, q.response, q);
    if (isError(inv)) {
      out.errors.push(inv);
      return out;
    }
    out.results.push({ ...head, inversions: inv.inversions, observation: inv.source });
  }
  return out;
}

/**
 * `backcalc FIT`: every fitted point (standard) read back through the curve -
 * its response inverted as `invert` does, one new reading whose spread is
 * the standard's own (its σᵢ, or s/√wᵢ, from the fit's weights; s unweighted),
 * the percent deviation 100·(x̂ − x)/x from its nominal predictor value x and the
 * interval's ends as percent deviations too.
 */
function backcalc(q: Extract<Query, { kind: 'backcalc' }>, ctx: QueryContext): Out {
  const found = lookup(q.fit, q, ctx);
  if (isError(found)) return { results: [], errors: [found] };
  const out: Out = { results: [], errors: [] };
  const responseText = exprText(found.plan.blocks[0].response);
  for (const r of found.results) {
    const curve = curveFromResult(found.plan, r);
    const xs = r.points.x;
    if (!curve || !xs || r.predictor === null) {
      out.errors.push({ code: 'no_predictor', message: errorText.noPredictor(q.fit, 'backcalc', columnsOf(found.plan.blocks[0].model)), range: q.range, fit: q.fit });
      return out;
    }
    const head = { kind: 'backcalc' as const, fit: q.fit, ...(r.group !== undefined ? { group: r.group } : {}), predictor: r.predictor, response: responseText };
    if (!r.stop.converged) {
      out.results.push({ ...head, standards: [], withheld: withheldText.query(label(q.fit, r), 'back-calculated standards', r.stop.code) });
      continue;
    }
    const range = rangeOf(xs);
    if (!range) {
      out.errors.push({ code: 'no_points', message: errorText.noPoints(label(q.fit, r), 'backcalc'), range: q.range, fit: q.fit });
      continue;
    }
    const w = r.points.weight;
    const s = r.goodness.rmse;
    const standards: BackCalculation[] = xs.map((nominal, i) => {
      const y0 = r.points.y[i];
      // the standard's own reading spread: σᵢ = 1/√wᵢ (absolute σ), s/√wᵢ (relative weights), s (unweighted)
      const sd = w ? (r.sigmaAbsolute ? 1 / Math.sqrt(w[i]) : s / Math.sqrt(w[i])) : s;
      const band = (v: Float64Array) => bandsAt(v, curve.modelAt, curve.cov, curve.t, (u) => new Float64Array(u.length).fill(sd));
      const inv = inversePrediction(y0, range[0], range[1], band);
      const pct = (v: number | null) => (v === null || nominal === 0 ? null : (100 * (v - nominal)) / nominal);
      return {
        row: r.points.row[i], nominal, response: y0, x: inv.x, interval: inv.interval,
        ...(inv.ends ? { ends: inv.ends } : {}), ...(inv.extrapolated ? { extrapolated: true } : {}),
        deviationPercent: pct(inv.x), deviationInterval: [pct(inv.interval[0]), pct(inv.interval[1])],
        ...(inv.message ? { message: inv.message } : {}),
      };
    });
    out.results.push({ ...head, standards });
  }
  return out;
}

function compare(q: Extract<Query, { kind: 'compare' }>, ctx: QueryContext): Out {
  return comparesGroups(q, ctx) ? compareGrouped(q, ctx) : compareQuery(q, ctx);
}

/**
 * The number an `expect FIT.MEMBER at COLUMN = VALUE` tests, from the same
 * computation as `predict` or `invert` at that one point (a transformed
 * response on its column's scale, as reported). NaN with `why` when there is
 * no such number: an open inverse end, no crossing, a refusal.
 */
export function queryNumber(plan: FitPlan, r: FitResult, t: Extract<ExpectTarget, { kind: 'query' }>, range: Range): { value: number; why?: string } {
  if (r.predictor === null || !curveFromResult(plan, r)) return { value: NaN, why: errorText.noPredictor(t.fit, t.query, columnsOf(plan.blocks[0].model)) };
  const q = { kind: t.query, fit: t.fit, range };
  if (t.query === 'predict') {
    const p = predictions(plan, r, [t.value], t.observation, q);
    if (isError(p)) return { value: NaN, why: p.message };
    const one = p.predictions[0];
    const src = one.original ?? one;
    const value = t.member === 'fitted' ? src.fitted
      : t.member === 'confidence.lower' ? src.confidence[0] : t.member === 'confidence.upper' ? src.confidence[1]
      : t.member === 'prediction.lower' ? src.prediction[0] : src.prediction[1];
    return { value };
  }
  if (!responseMap(plan, t.column)) return { value: NaN, why: errorText.wrongResponse(t.fit, t.column, columnsOf(plan.blocks[0].response)) };
  const inv = inversions(plan, r, [t.value], t.readings ?? 1, t.observation, t.column, q);
  if (isError(inv)) return { value: NaN, why: inv.message };
  const one = inv.inversions[0];
  const value = t.member === 'inverse' ? one.x : t.member === 'inverse.lower' ? one.interval[0] : one.interval[1];
  return value === null ? { value: NaN, why: one.message ?? '' } : { value };
}
