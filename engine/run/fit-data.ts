/**
 * The numeric data one fit needs, taken from a loaded table: model columns,
 * response, weights, file lines, split per group for `per COLUMN` fits.
 * Plain typed arrays and strings only, so it can be sent to a worker thread.
 */
import type { DataSource, Expr, FitPlan, Range } from '../../parser/plan';
import { cellLine, selectRows, type DataError, type DataTable } from '../data';
import { dataText, errorText } from '../messages';
import { ROW_LEFT_OUT_REASONS, type RowAccount, type RowLeftOutReason, type RunError } from '../result';
import { columnsOf } from '../../parser/plan-expr';
import { matchTextValues } from './text-match';

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
  /** 1-based file lines of the dropped rows (`rowsDropped` of them), in file order. */
  droppedLines?: Int32Array;
  /** Rows dropped because the group label is missing (grouped fits only). */
  rowsWithoutGroup: number;
  /** Rows left out of the fit by a weight of 0 (absent when none): not in n, dof or any statistic, still drawn. */
  excluded?: ExcludedRows;
  /** How the file's rows came to n, per reason left out (result.ts `RowAccount`; for a group, its own rows). */
  rowAccount?: RowAccount;
  /** Per-group fits: the account of the whole fit, every group together. */
  fitRowAccount?: RowAccount;
}

/**
 * The account of `fitted` rows and the rows left out by reason (zero counts omitted, `ROW_LEFT_OUT_REASONS`
 * order). The one place the reasons are counted; every view states them from the result (engine/front/views/rows.ts).
 */
export function rowAccount(fitted: number, counts: Partial<Record<RowLeftOutReason, number>>): RowAccount {
  const leftOut = ROW_LEFT_OUT_REASONS.filter((r) => (counts[r] ?? 0) > 0).map((reason) => ({ reason, count: counts[reason]! }));
  return { rows: fitted + leftOut.reduce((a, l) => a + l.count, 0), fitted, leftOut };
}

/** Rows a weight of 0 leaves out of a fit: their file lines and values, for tables and charts. */
export interface ExcludedRows {
  lines: Int32Array;
  /** Predictor values (single-predictor fits), else null. */
  x: Float64Array | null;
  /** Response values. */
  y: Float64Array;
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
    ...(e.field !== undefined ? { field: e.field } : {}),
    ...(e.column !== undefined ? { column: e.column } : {}),
    ...(e.value !== undefined ? { value: e.value } : {}),
    ...(range ? { range } : {}),
    ...(fit ? { fit } : {}),
  };
}

export function prepareFitData(fit: FitPlan, source: DataSource, fileTable: DataTable, compile: ColumnCompiler): FitDataResult {
  const block = fit.blocks[0];
  // text values in the where condition become 0/1 pseudo-columns (text-match.ts)
  let table = fileTable;
  let filterExpr = source.filter;
  let origin = new Map<string, string>();
  if (filterExpr) {
    const m = matchTextValues(filterExpr, fileTable, source.path, fit.name);
    if (!m.ok) return { ok: false, errors: m.errors };
    table = m.table;
    filterExpr = m.filter;
    origin = m.origin;
  }
  const exprs = [block.model, block.response, block.sigma, block.weight, filterExpr];
  const modelColumns = columnsOf(block.model);
  const used = [...modelColumns];
  for (const e of exprs.slice(1)) columnsOf(e, used);
  const locate = (column: string | undefined) => (column ? columnRange(exprs, column, block.range) : source.range);
  const fail = (errors: RunError[]): FitDataResult => ({ ok: false, errors });

  let filter;
  try {
    filter = filterExpr ? compile(filterExpr, used) : undefined;
  } catch (e) {
    return fail([{ code: 'compile_error', message: errorText.internal(fit.name, (e as Error).message), range: source.range, fit: fit.name }]);
  }
  const sel = selectRows(table, { numeric: used, label: fit.groupBy, filter, file: source.path });
  if (!sel.ok) return fail(sel.errors.map((e) => dataErrorToRunError(e, e.column === fit.groupBy ? fit.range : locate(e.column), fit.name)));
  const s = sel.selection;
  const empty = noRowsError(fit, source, fileTable, s.firstDropped && origin.has(s.firstDropped.column) ? { ...s, firstDropped: { ...s.firstDropped, column: origin.get(s.firstDropped.column)! } } : s, block);
  if (empty) return fail([empty]);
  const cols = s.columns;

  const evalExpr = (e: Expr): Float64Array => {
    const out = new Float64Array(s.n);
    compile(e, used)(cols, s.n, out);
    return out;
  };
  const errors: RunError[] = [];
  /** The field of a value that is one column as written (`weight w`), for the place of its errors. */
  const fieldOf = (e: Expr | undefined): { field?: number; column?: string } => {
    const k = e?.kind === 'column' ? table.headers.indexOf(e.name) : -1;
    return k >= 0 && e?.kind === 'column' ? { field: k + 1, column: e.name } : {};
  };
  const y = evalExpr(block.response);
  const firstBad = (values: Float64Array, ok: (v: number) => boolean) => values.findIndex((v) => !ok(v));
  const badY = firstBad(y, Number.isFinite);
  if (badY >= 0) {
    errors.push({ code: 'non_finite_response', message: errorText.nonFinite(fit.name, 'the response', s.lines[badY]), file: source.path, row: s.lines[badY], ...fieldOf(block.response), range: block.response.range ?? block.range, fit: fit.name });
  }
  let weights: Float64Array | null = null;
  if (block.sigma) {
    const sigma = evalExpr(block.sigma);
    const bad = firstBad(sigma, (v) => v > 0 && Number.isFinite(v));
    if (bad >= 0) errors.push({ code: 'bad_sigma', message: errorText.badSigma(fit.name, s.lines[bad], sigma[bad]), file: source.path, row: s.lines[bad], ...fieldOf(block.sigma), range: block.sigma.range ?? block.range, fit: fit.name });
    weights = sigma.map((v) => 1 / (v * v));
    const out = bad >= 0 ? -1 : firstBad(weights, (w) => w > 0 && Number.isFinite(w));
    if (out >= 0) errors.push({ code: 'bad_sigma', message: errorText.sigmaOutOfRange(fit.name, s.lines[out], sigma[out]), file: source.path, row: s.lines[out], ...fieldOf(block.sigma), range: block.sigma.range ?? block.range, fit: fit.name });
  } else if (block.weight) {
    weights = evalExpr(block.weight);
    // 0 leaves the row out of the fit (below); negative and non-finite weights are errors
    const bad = firstBad(weights, (v) => v >= 0 && Number.isFinite(v));
    if (bad >= 0) errors.push({ code: 'bad_weight', message: errorText.badWeight(fit.name, s.lines[bad], weights[bad]), file: source.path, row: s.lines[bad], ...fieldOf(block.weight), range: block.weight.range ?? block.range, fit: fit.name });
  }
  if (errors.length) return fail(errors);

  const predictor = block.predictor ?? (modelColumns.length === 1 ? modelColumns[0] : null);
  const hasPredictor = predictor !== null && modelColumns.includes(predictor);
  let base: FitData = {
    fit: fit.name,
    source: source.name,
    file: source.path,
    n: s.n,
    modelColumns,
    columns: modelColumns.map((c) => cols[used.indexOf(c)]),
    lines: s.lines,
    y,
    weights,
    sigmaAbsolute: block.sigma !== undefined,
    x: hasPredictor ? cols[used.indexOf(predictor)] : null,
    predictor: hasPredictor ? predictor : null,
    rowsDropped: s.dropped,
    droppedLines: s.droppedLines,
    rowsWithoutGroup: 0,
  };
  let labels = s.labels;
  let excludedLabels: string[] | null = null;
  if (block.weight && weights && weights.includes(0)) {
    const keep = Uint8Array.from(weights, (w) => (w > 0 ? 1 : 0));
    if (!keep.includes(1)) {
      return fail([{ code: 'no_rows', message: dataText.allRowsExcluded(fit.name, source.path, s.n, 'a weight of 0'), file: source.path, range: block.weight.range ?? block.range, fit: fit.name }]);
    }
    if (labels) excludedLabels = labels.filter((_, i) => keep[i] === 0);
    if (labels) labels = labels.filter((_, i) => keep[i] === 1);
    base = excludeRows(base, keep);
  }
  if (!fit.groupBy || !labels) {
    // a single fit with fewer rows than free parameters is a data error at the fit (groups are failed one by one instead)
    const p = fit.parameters.filter((q) => !q.fixed).length;
    if (base.n < p) {
      const excluded = base.excluded?.lines.length ?? 0;
      return fail([{ code: 'too_few_rows', message: dataText.tooFewRows(fit.name, source.path, base.n, p, { dropped: s.dropped, filtered: s.filteredOut, excluded }), file: source.path, range: fit.range, fit: fit.name }]);
    }
    return { ok: true, data: [{ ...base, rowAccount: rowAccount(base.n, { missing_cell: s.dropped, where: s.filteredOut, weight_zero: base.excluded?.lines.length ?? 0 }) }] };
  }
  const withoutGroup = (s.droppedLabels ?? []).filter((l) => l === '').length;
  const whole = rowAccount(base.n, { missing_cell: s.dropped - withoutGroup, no_group: withoutGroup, where: s.filteredOut, weight_zero: base.excluded?.lines.length ?? 0 });
  return { ok: true, data: splitGroups(base, labels, s.droppedLabels ?? [], excludedLabels ?? [], s.filteredLabels ?? []).map((d) => ({ ...d, fitRowAccount: whole })) };
}

/**
 * A located data error when a fit is left with no rows: a header without data
 * (at the header line), every row missing a used cell (at the first such
 * cell), or a where condition that keeps no row (at the condition).
 */
function noRowsError(fit: FitPlan, source: DataSource, table: DataTable, s: { n: number; dropped: number; filteredOut: number; firstDropped: { index: number; column: string } | null }, block: FitPlan['blocks'][number]): RunError | null {
  if (s.n > 0) return null;
  const file = source.path;
  if (table.rowCount === 0) {
    return { code: 'no_rows', message: dataText.noDataRows(fit.name, file), file, row: table.headerLine, range: source.range, fit: fit.name };
  }
  if (s.filteredOut > 0 || !s.firstDropped) {
    return { code: 'no_rows', message: dataText.allRowsFiltered(fit.name, file, s.filteredOut), file, range: source.filter?.range ?? source.range, fit: fit.name };
  }
  const { index, column } = s.firstDropped;
  const k = table.headers.indexOf(column);
  const used = [...new Set([...columnsOf(block.model), ...columnsOf(block.response), ...(block.sigma ? columnsOf(block.sigma) : []), ...(block.weight ? columnsOf(block.weight) : []), ...(fit.groupBy ? [fit.groupBy] : [])])];
  return {
    code: 'no_rows',
    message: dataText.allRowsMissing(fit.name, file, table.rowCount, used),
    file,
    row: cellLine(table, index, k),
    field: k + 1,
    column,
    range: fit.range,
    fit: fit.name,
  };
}

/** `data` without the rows where keep is 0, which are kept apart as excluded. */
function excludeRows(data: FitData, keep: Uint8Array): FitData {
  const pick = (a: Float64Array, want: number) => a.filter((_, i) => keep[i] === want);
  const lines = (want: number) => data.lines.filter((_, i) => keep[i] === want);
  const kept = keep.reduce((a, k) => a + k, 0);
  return {
    ...data,
    n: kept,
    columns: data.columns.map((c) => pick(c, 1)),
    lines: lines(1),
    y: pick(data.y, 1),
    weights: data.weights ? pick(data.weights, 1) : null,
    x: data.x ? pick(data.x, 1) : null,
    excluded: { lines: lines(0), x: data.x ? pick(data.x, 0) : null, y: pick(data.y, 0) },
  };
}

/** Distinct labels in a deterministic order: numerically when all are numbers, else by code point. */
export function sortGroupLabels(labels: Iterable<string>): string[] {
  const distinct = [...new Set(labels)];
  const numeric = distinct.every((l) => l.trim() !== '' && Number.isFinite(Number(l)));
  return numeric ? distinct.sort((a, b) => Number(a) - Number(b) || (a < b ? -1 : a > b ? 1 : 0)) : distinct.sort((a, b) => (a < b ? -1 : a > b ? 1 : 0));
}

function splitGroups(base: FitData, labels: string[], droppedLabels: string[], excludedLabels: string[], filteredLabels: string[]): FitData[] {
  // One pass buckets row indices by label (O(rows)), instead of one scan of all rows per group.
  const bucketsOf = (list: string[]) => {
    const map = new Map<string, number[]>();
    list.forEach((l, i) => {
      const bucket = map.get(l);
      if (bucket) bucket.push(i);
      else map.set(l, [i]);
    });
    return map;
  };
  const rowsOf = bucketsOf(labels);
  const excludedOf = bucketsOf(excludedLabels);
  const droppedOf = new Map<string, number>();
  for (const l of droppedLabels) droppedOf.set(l, (droppedOf.get(l) ?? 0) + 1);
  const filteredOf = new Map<string, number>();
  for (const l of filteredLabels) filteredOf.set(l, (filteredOf.get(l) ?? 0) + 1);
  // the dropped rows' file lines by group (droppedLabels and base.droppedLines are both in file order)
  const droppedLinesOf = new Map<string, number[]>();
  droppedLabels.forEach((l, k) => {
    const line = base.droppedLines?.[k];
    if (line === undefined) return;
    const list = droppedLinesOf.get(l);
    if (list) list.push(line);
    else droppedLinesOf.set(l, [line]);
  });
  const withoutGroup = droppedOf.get('') ?? 0;
  const { excluded: all, ...rest } = base;
  // a group whose rows all have weight 0 is still a group (its fit fails for lack of rows)
  return sortGroupLabels([...rowsOf.keys(), ...excludedOf.keys()]).map((group) => {
    const idx = rowsOf.get(group) ?? [];
    const pick = (a: Float64Array) => Float64Array.from(idx, (i) => a[i]);
    const ex = excludedOf.get(group);
    const excluded: ExcludedRows | undefined = ex && all
      ? { lines: Int32Array.from(ex, (i) => all.lines[i]), x: all.x ? Float64Array.from(ex, (i) => all.x![i]) : null, y: Float64Array.from(ex, (i) => all.y[i]) }
      : undefined;
    return {
      ...rest,
      group,
      n: idx.length,
      columns: base.columns.map(pick),
      lines: Int32Array.from(idx, (i) => base.lines[i]),
      y: pick(base.y),
      weights: base.weights ? pick(base.weights) : null,
      x: base.x ? pick(base.x) : null,
      rowsDropped: droppedOf.get(group) ?? 0,
      droppedLines: Int32Array.from(droppedLinesOf.get(group) ?? []),
      rowsWithoutGroup: withoutGroup,
      ...(excluded ? { excluded } : {}),
      rowAccount: rowAccount(idx.length, { missing_cell: droppedOf.get(group) ?? 0, where: filteredOf.get(group) ?? 0, weight_zero: ex?.length ?? 0 }),
    };
  });
}
