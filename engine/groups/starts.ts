/**
 * Starting values for the groups of a `per COLUMN` fit, decided once per fit
 * before the groups are dispatched (in this thread or on workers), so every
 * way of fitting the groups uses the same starts:
 *   - every free parameter has a start in the spec: the groups use it
 *     (`given`);
 *   - the model has a template shape (engine/solve/start/recognise.ts): each
 *     group computes its own start from its rows with that family's
 *     heuristic, which costs about one pass over the group (`per_group`);
 *   - otherwise the general method (separable grid search, guess.ts) runs
 *     once, on the rows of all groups pooled (every k-th row, at most
 *     MAX_START_ROWS), and its start is shared by every group (`pooled`) -
 *     running it per group would cost several times the fits themselves.
 * A group whose fit from the shared start does not converge is fitted again
 * from its own data (group-job.ts `fitOneGroup`).
 */
import type { FitPlan } from '../../parser/plan';
import { compileModel, isLinearInParameters } from '../compile';
import { freeModel } from '../run/curve';
import { holdParams } from '../../parser/plan-expr';
import type { FitData } from '../run/fit-data';
import { guessStart, MAX_START_ROWS, recogniseShape, type StartInput } from '../solve/start';
import { runText } from '../messages';

export type SharedStart =
  | { kind: 'given' }
  | { kind: 'per_group'; family: string }
  /** Free-parameter starts in declaration order (given ones copied), and how they were found. */
  | { kind: 'pooled'; theta: number[]; how: string };

/** The rows of all groups, every k-th one (k = ⌈rows/MAX_START_ROWS⌉), as one data set. */
function pooled(groups: readonly FitData[]): { cols: Float64Array[]; y: Float64Array; w: Float64Array | null; n: number } {
  const total = groups.reduce((s, g) => s + g.n, 0);
  const stride = Math.max(1, Math.ceil(total / MAX_START_ROWS));
  const m = Math.ceil(total / stride);
  const k = groups[0]?.columns.length ?? 0;
  const cols = Array.from({ length: k }, () => new Float64Array(m));
  const y = new Float64Array(m);
  const weighted = groups.some((g) => g.weights !== null);
  const w = weighted ? new Float64Array(m) : null;
  let at = 0;
  let next = 0;
  let i = 0;
  for (const g of groups) {
    for (let r = 0; r < g.n; r++, at++) {
      if (at !== next || i >= m) continue;
      for (let c = 0; c < k; c++) cols[c][i] = g.columns[c][r];
      y[i] = g.y[r];
      if (w) w[i] = g.weights ? g.weights[r] : 1;
      i++;
      next += stride;
    }
  }
  return { cols, y, w, n: i };
}

export function sharedStart(fit: FitPlan, groups: readonly FitData[]): SharedStart {
  const free = fit.parameters.filter((p) => !p.fixed);
  if (free.every((p) => p.initial !== undefined) || groups.length === 0) return { kind: 'given' };
  const { expr, free: names } = freeModel(fit);
  const structure = { expr, columns: groups[0].modelColumns };
  const shape = recogniseShape({ structure });
  if (shape) return { kind: 'per_group', family: shape.shape.family };
  const data = pooled(groups);
  const model = compileModel(expr, names, groups[0].modelColumns);
  const input: StartInput = {
    model,
    cols: data.cols,
    n: data.n,
    y: data.y,
    sqrtW: data.w ? data.w.map(Math.sqrt) : null,
    parameters: free.map((q) => ({ name: q.name, ...(q.initial !== undefined ? { initial: q.initial } : {}), lower: q.lower ?? -Infinity, upper: q.upper ?? Infinity })),
    isLinearIn: (sub) => isLinearInParameters(holdParams(expr, new Set(names.filter((f) => !sub.includes(f)))), sub),
    structure,
  };
  const guess = guessStart(input);
  const theta = Array.from(guess.theta, (v, j) => Math.min(input.parameters[j].upper, Math.max(input.parameters[j].lower, v)));
  return { kind: 'pooled', theta, how: runText.pooledStart(guess.how, groups.length) };
}
