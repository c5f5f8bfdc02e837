/**
 * The least-squares problem of a fit rebuilt from its plan and rows, exactly as
 * engine/run/fit.ts builds it (free model, bounds, weights, the response scale
 * c of engine/linalg/scale.ts), for the refits of the bootstrap
 * (engine/run/bootstrap.ts) and the profiles of derived quantities
 * (engine/run/derived-profile.ts). Rows may be chosen (`rows`, with repeats)
 * and the response replaced (`response`).
 */
import type { FitPlan } from '../../parser/plan';
import { compileModel, type CompiledModel } from '../compile';
import { responseScale } from '../linalg/scale';
import { modelProblem, type LeastSquaresProblem } from '../solve';
import { freeModel } from './curve';
import type { FitData } from './fit-data';

export interface RefitModel {
  model: CompiledModel;
  free: string[];
  lower: Float64Array;
  upper: Float64Array;
}

export function refitModel(fit: FitPlan, data: FitData): RefitModel {
  const { expr, free } = freeModel(fit);
  const freePlans = fit.parameters.filter((q) => !q.fixed);
  return {
    model: compileModel(expr, free, data.modelColumns),
    free,
    lower: Float64Array.from(freePlans, (q) => q.lower ?? -Infinity),
    upper: Float64Array.from(freePlans, (q) => q.upper ?? Infinity),
  };
}

export interface RefitProblem {
  problem: LeastSquaresProblem;
  /** The response scale c: the problem's residuals are the data's divided by c. */
  scale: number;
  n: number;
}

/** The fit's problem over `rows` (default all, in order) with response `response` (default the data's; indexed like the data's rows). */
export function refitProblem(m: RefitModel, data: FitData, rows?: Int32Array, response?: Float64Array): RefitProblem {
  const y0 = response ?? data.y;
  const pick = (a: Float64Array): Float64Array => (rows ? Float64Array.from(rows, (i) => a[i]) : a);
  const n = rows ? rows.length : data.n;
  const y = pick(y0);
  const columns = rows ? data.columns.map(pick) : data.columns;
  const rawSqrtW = data.weights ? pick(data.weights).map(Math.sqrt) : null;
  const c = responseScale(y, rawSqrtW, n);
  const sqrtW = c === 1 ? rawSqrtW : rawSqrtW ? rawSqrtW.map((v) => v / c) : new Float64Array(n).fill(1 / c);
  const problem = modelProblem({ model: m.model, columns, response: y, n, ...(sqrtW ? { sqrtWeights: sqrtW } : {}), lower: m.lower, upper: m.upper });
  return { problem, scale: c, n };
}
