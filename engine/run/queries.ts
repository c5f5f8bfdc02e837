/**
 * The spec's queries over finished fits: predict (fitted value with
 * confidence and prediction intervals), invert (predictor value for a
 * response, engine/stats/inverse.ts) and compare (AICc, ΔAICc, Akaike weights
 * and, for two fits of the same data and response with different parameter
 * counts, the extra-sum-of-squares F test). Per-group fits answer once per group.
 * A fit (or group) that did not converge answers with its numbers withheld,
 * the way its own statistics are (engine/front/views/summary.ts `fitStatus`): the
 * values asked for are listed with null results and `withheld` says why.
 */
import type { FitPlan, Query } from '../../parser/plan';
import { compileColumnExpr } from '../compile';
import { errorText, runText, withheldText } from '../messages';
import type { FitResult, InversePrediction, QueryResult, RunError } from '../result';
import { bandsAt, predictAt } from '../stats/bands';
import { akaikeRows, extraSumOfSquaresF, type CompareInput } from '../stats/compare';
import { inversePrediction } from '../stats/inverse';
import { curveFromResult } from './curve';
import { columnsOf, exprText } from '../../parser/plan-expr';

export interface QueryContext {
  fitPlans: ReadonlyMap<string, FitPlan>;
  /** Results by fit name (several for per-group fits; empty when the fit did not run). */
  results: ReadonlyMap<string, FitResult[]>;
}

export function runQueries(queries: readonly Query[], ctx: QueryContext): { results: QueryResult[]; errors: RunError[] } {
  const results: QueryResult[] = [];
  const errors: RunError[] = [];
  for (const q of queries) {
    const out = q.kind === 'compare' ? compare(q, ctx) : q.kind === 'predict' ? predict(q, ctx) : invert(q, ctx);
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

function predict(q: Extract<Query, { kind: 'predict' }>, ctx: QueryContext): Out {
  const found = lookup(q.fit, q, ctx);
  if (isError(found)) return { results: [], errors: [found] };
  const out: Out = { results: [], errors: [] };
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
    if (!r.stop.converged) {
      out.results.push({
        kind: 'predict', fit: q.fit, ...(r.group !== undefined ? { group: r.group } : {}), variable: q.variable,
        predictions: q.values.map((x) => ({ x, fitted: NaN, confidence: [NaN, NaN], prediction: [NaN, NaN] })),
        withheld: withheldText.query(label(q.fit, r), 'predictions', r.stop.code),
      });
      continue;
    }
    out.results.push({
      kind: 'predict',
      fit: q.fit,
      ...(r.group !== undefined ? { group: r.group } : {}),
      variable: q.variable,
      predictions: predictAt(q.values, curve.modelAt, curve.cov, curve.t, curve.newSd),
    });
  }
  return out;
}

function invert(q: Extract<Query, { kind: 'invert' }>, ctx: QueryContext): Out {
  const found = lookup(q.fit, q, ctx);
  if (isError(found)) return { results: [], errors: [found] };
  const response = found.plan.blocks[0].response;
  const responseColumns = columnsOf(response);
  // The query names a column; a response expression of that one column (e.g. ln(rate)) maps the value first.
  let transform: ((v: number) => number) | null = null;
  if (response.kind === 'column' && response.name === q.response) transform = (v) => v;
  else if (responseColumns.length === 1 && responseColumns[0] === q.response) {
    const f = compileColumnExpr(response, responseColumns);
    transform = (v) => {
      const out = new Float64Array(1);
      f([Float64Array.of(v)], 1, out);
      return out[0];
    };
  }
  if (!transform) {
    return { results: [], errors: [{ code: 'wrong_response', message: errorText.wrongResponse(q.fit, q.response, responseColumns), range: q.range, fit: q.fit }] };
  }
  const out: Out = { results: [], errors: [] };
  for (const r of found.results) {
    const curve = curveFromResult(found.plan, r);
    const xs = r.points.x;
    if (!curve || !xs) {
      out.errors.push({ code: 'no_predictor', message: errorText.noPredictor(q.fit, 'invert', columnsOf(found.plan.blocks[0].model)), range: q.range, fit: q.fit });
      return out;
    }
    if (!r.stop.converged) {
      out.results.push({
        kind: 'invert', fit: q.fit, ...(r.group !== undefined ? { group: r.group } : {}), response: q.response,
        inversions: q.values.map((v) => ({ response: v, x: null, interval: [null, null] })),
        withheld: withheldText.query(label(q.fit, r), 'inverse predictions', r.stop.code),
      });
      continue;
    }
    if (xs.length === 0) {
      // the fit has no points (its data had no usable rows): a data problem, reported with the fit
      out.errors.push({ code: 'no_points', message: errorText.noPoints(label(q.fit, r), 'invert'), range: q.range, fit: q.fit });
      continue;
    }
    // (a loop, not Math.min(...xs): a call takes at most about 10⁵ arguments, data can be longer)
    let lo = Infinity;
    let hi = -Infinity;
    for (const x of xs) {
      if (x < lo) lo = x;
      if (x > hi) hi = x;
    }
    const band = (v: Float64Array) => bandsAt(v, curve.modelAt, curve.cov, curve.t, curve.newSd);
    const inversions: InversePrediction[] = q.values.map((v) => {
      const y0 = transform!(v);
      if (!Number.isFinite(y0)) return { response: v, x: null, interval: [null, null], message: runText.notDefinedAt(exprText(response), q.response, v) };
      return { ...inversePrediction(y0, lo, hi, band), response: v };
    });
    out.results.push({ kind: 'invert', fit: q.fit, ...(r.group !== undefined ? { group: r.group } : {}), response: q.response, inversions });
  }
  return out;
}

function compare(q: Extract<Query, { kind: 'compare' }>, ctx: QueryContext): Out {
  const rows: CompareInput[] = [];
  const plans: FitPlan[] = [];
  // Fits without a result or not converged are left out and the others compared, while at least two remain;
  // with fewer, the first such fit decides the answer as before (its error, or the comparison withheld).
  const leftOut: { fit: string; reason: string }[] = [];
  let firstMissing: Out | undefined;
  for (const name of q.fits) {
    const found = lookup(name, q, ctx);
    if (isError(found)) {
      if (found.code !== 'fit_not_run') return { results: [], errors: [found] };
      leftOut.push({ fit: name, reason: withheldText.compareNoResult });
      firstMissing ??= { results: [], errors: [found] };
      continue;
    }
    if (found.results.length !== 1 || found.results[0].group !== undefined) {
      return { results: [], errors: [{ code: 'compare_grouped', message: errorText.comparePerGroup(name), range: q.range, fit: name }] };
    }
    const r = found.results[0];
    if (!r.stop.converged) {
      leftOut.push({ fit: name, reason: withheldText.compareNotConverged(r.stop.code) });
      firstMissing ??= { results: [{ kind: 'compare', fits: [...q.fits], rows: [], withheld: withheldText.query(name, 'sums of squares and information criteria', r.stop.code) }], errors: [] };
      continue;
    }
    const g = r.goodness;
    rows.push({ fit: name, n: g.n, p: g.p, ssr: g.ssr, aic: g.aic, aicc: g.aicc, bic: g.bic });
    plans.push(found.plan);
  }
  if (firstMissing && rows.length < 2) return firstMissing;
  const sameData = plans.every(
    (p) => p.blocks[0].data === plans[0].blocks[0].data && exprText(p.blocks[0].response) === exprText(plans[0].blocks[0].response),
  );
  const errors: RunError[] = [];
  if (!sameData || rows.some((r) => r.n !== rows[0].n)) {
    errors.push({ code: 'compare_different_data', message: errorText.compareMismatch(q.fits), range: q.range });
  }
  const fTest = rows.length === 2 && sameData ? extraSumOfSquaresF(rows[0], rows[1]) : null;
  return { results: [{ kind: 'compare', fits: [...q.fits], rows: akaikeRows(rows), ...(fTest ? { fTest } : {}), ...(leftOut.length ? { leftOut } : {}) }], errors };
}
