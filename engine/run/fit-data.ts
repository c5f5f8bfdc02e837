/**
 * The numeric data one fit needs, taken from a loaded table: model columns,
 * response, weights, file lines, split per group for `per COLUMN` fits.
 * Plain typed arrays and strings only, so it can be sent to a worker thread.
 */
import type { DataSource, Expr, FitPlan, Range } from '../../parser/plan';
import { selectRows, type DataError, type DataTable } from '../data';
import { errorText } from '../messages';
import type { RunError } from '../result';
import { columnsOf } from './expr';

/** Evaluates a parameter-free expression over columns (engine/compile `compileColumnExpr`). */
export type ColumnCompiler = (expr: Expr, columns: readonly string[]) => (cols: readonly Float64Array[], n: number, out: Float64Array) => void;

export interface FitData {
  fit: string;
  /** Data source name and its path as written in the spec. */
  source: string;
  file: string;
  group?: string;
  n: number;
  /** Columns read by the model, in first-appearance order. */
  modelColumns: string[];
  columns: Float64Array[];
  /** 1-based file line of each row. */
  lines: Int32Array;
  /** Response values (the response expression evaluated). */
  y: Float64Array;
  /** wᵢ = 1/σᵢ² (sigma) or the weight expression; null when unweighted. */
  weights: Float64Array | null;
  sigmaAbsolute: boolean;
  /** The single predictor's values, or null. */
  x: Float64Array | null;
  predictor: string | null;
  rowsDropped: number;
  /** Rows dropped because the group label is missing (grouped fits only). */
  rowsWithoutGroup: number;
}

export type FitDataResult = { ok: true; data: FitData[] } | { ok: false; errors: RunError[] };

/** Where in the spec a column is read, for locating data errors; falls back to `fallback`. */
function columnRange(exprs: (Expr | undefined)[], name: string, fallback: Range): Range {
  const find = (e: Expr | undefined): Range | undefined => {
    if (!e) return undefined;
    switch (e.kind) {
      case 'column':
        return e.name === name ? e.range : undefined;
      case 'negate':
      case 'not':
        return find(e.arg);
      case 'binary':
      case 'compare':
      case 'logic':
        return find(e.left) ?? find(e.right);
      case 'call':
      case 'chain':
        for (const a of e.args) {
          const r = find(a);
          if (r) return r;
        }
        return undefined;
      default:
        return undefined;
    }
  };
  for (const e of exprs) {
    const r = find(e);
    if (r) return r;
  }
  return fallback;
}

export function dataErrorToRunError(e: DataError, range?: Range, fit?: string): RunError {
  return {
    code: e.code,
    message: e.message,
    file: e.file,
    ...(e.row !== undefined ? { row: e.row } : {}),
    ...(e.column !== undefined ? { column: e.column } : {}),
    ...(e.value !== undefined ? { value: e.value } : {}),
    ...(range ? { range } : {}),
    ...(fit ? { fit } : {}),
  };
}

export function prepareFitData(fit: FitPlan, source: DataSource, table: DataTable, compile: ColumnCompiler): FitDataResult {
  const block = fit.blocks[0];
  const exprs = [block.model, block.response, block.sigma, block.weight, source.filter];
  const modelColumns = columnsOf(block.model);
  const used = [...modelColumns];
  for (const e of exprs.slice(1)) columnsOf(e, used);
  const locate = (column: string | undefined) => (column ? columnRange(exprs, column, block.range) : source.range);
  const fail = (errors: RunError[]): FitDataResult => ({ ok: false, errors });

  let filter;
  try {
    filter = source.filter ? compile(source.filter, used) : undefined;
  } catch (e) {
    return fail([{ code: 'compile_error', message: errorText.internal(fit.name, (e as Error).message), range: source.range, fit: fit.name }]);
  }
  const sel = selectRows(table, { numeric: used, label: fit.groupBy, filter, file: source.path });
  if (!sel.ok) return fail(sel.errors.map((e) => dataErrorToRunError(e, e.column === fit.groupBy ? fit.range : locate(e.column), fit.name)));
  const s = sel.selection;
  const n = s.n;
  const cols = s.columns;

  const evalExpr = (e: Expr): Float64Array => {
    const out = new Float64Array(n);
    compile(e, used)(cols, n, out);
    return out;
  };
  const errors: RunError[] = [];
  const y = evalExpr(block.response);
  const firstBad = (values: Float64Array, ok: (v: number) => boolean) => values.findIndex((v) => !ok(v));
  const badY = firstBad(y, Number.isFinite);
  if (badY >= 0) {
    errors.push({ code: 'non_finite_response', message: errorText.nonFinite(fit.name, 'the response', s.lines[badY]), file: source.path, row: s.lines[badY], range: block.response.range ?? block.range, fit: fit.name });
  }
  let weights: Float64Array | null = null;
  if (block.sigma) {
    const sigma = evalExpr(block.sigma);
    const bad = firstBad(sigma, (v) => v > 0 && Number.isFinite(v));
    if (bad >= 0) errors.push({ code: 'bad_sigma', message: errorText.badSigma(fit.name, s.lines[bad], sigma[bad]), file: source.path, row: s.lines[bad], range: block.sigma.range ?? block.range, fit: fit.name });
    weights = sigma.map((v) => 1 / (v * v));
  } else if (block.weight) {
    weights = evalExpr(block.weight);
    const bad = firstBad(weights, (v) => v > 0 && Number.isFinite(v));
    if (bad >= 0) errors.push({ code: 'bad_weight', message: errorText.badWeight(fit.name, s.lines[bad], weights[bad]), file: source.path, row: s.lines[bad], range: block.weight.range ?? block.range, fit: fit.name });
  }
  if (errors.length) return fail(errors);

  const predictor = block.predictor ?? (modelColumns.length === 1 ? modelColumns[0] : null);
  const modelCols = modelColumns.map((c) => cols[used.indexOf(c)]);
  const base: FitData = {
    fit: fit.name,
    source: source.name,
    file: source.path,
    n,
    modelColumns,
    columns: modelCols,
    lines: s.lines,
    y,
    weights,
    sigmaAbsolute: block.sigma !== undefined,
    x: predictor !== null && modelColumns.includes(predictor) ? cols[used.indexOf(predictor)] : null,
    predictor: predictor !== null && modelColumns.includes(predictor) ? predictor : null,
    rowsDropped: s.dropped,
    rowsWithoutGroup: 0,
  };
  if (!fit.groupBy || !s.labels) return { ok: true, data: [base] };
  return { ok: true, data: splitGroups(base, s.labels, s.droppedLabels ?? []) };
}

/** Distinct labels in a deterministic order: numerically when all are numbers, else by code point. */
export function sortGroupLabels(labels: Iterable<string>): string[] {
  const distinct = [...new Set(labels)];
  const numeric = distinct.every((l) => l.trim() !== '' && Number.isFinite(Number(l)));
  return numeric ? distinct.sort((a, b) => Number(a) - Number(b) || (a < b ? -1 : a > b ? 1 : 0)) : distinct.sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
}

function splitGroups(base: FitData, labels: string[], droppedLabels: string[]): FitData[] {
  // One pass buckets row indices by label (O(rows)), instead of one scan of all rows per group.
  const rowsOf = new Map<string, number[]>();
  labels.forEach((l, i) => {
    const bucket = rowsOf.get(l);
    if (bucket) bucket.push(i);
    else rowsOf.set(l, [i]);
  });
  const droppedOf = new Map<string, number>();
  for (const l of droppedLabels) droppedOf.set(l, (droppedOf.get(l) ?? 0) + 1);
  const withoutGroup = droppedOf.get('') ?? 0;
  return sortGroupLabels(rowsOf.keys()).map((group) => {
    const idx = rowsOf.get(group)!;
    const pick = (a: Float64Array) => Float64Array.from(idx, (i) => a[i]);
    return {
      ...base,
      group,
      n: idx.length,
      columns: base.columns.map(pick),
      lines: Int32Array.from(idx, (i) => base.lines[i]),
      y: pick(base.y),
      weights: base.weights ? pick(base.weights) : null,
      x: base.x ? pick(base.x) : null,
      rowsDropped: droppedOf.get(group) ?? 0,
      rowsWithoutGroup: withoutGroup,
    };
  });
}
