/**
 * Checks one `fit NAME on DATA { ... }` block and builds its FitPlan:
 * data reference, parameters (names, start values, bounds, fixed), the model
 * line, sigma/weight, options with their defaults, `per` grouping.
 */
import type { FitAst, FitItemAst, NameAst, ParamAst } from './ast';
import type { Expr, FitBlock, FitPlan, ParameterPlan } from './plan';
import { isBuiltinConstant, type Env, type FitInfo } from './check-env';
import { newUse, resolveExpr, resolveValue, type ExprScope, type ExprUse } from './check-expr';
import { checkOptions } from './check-options';
import { substituteParams } from './plan-expr';
import { MSG } from './messages';
import { EMPTY_RANGE } from './source';

export function checkFit(env: Env, fit: FitAst): FitInfo {
  const { r } = env;
  const name = fit.name?.name ?? '';
  if (fit.name) {
    const prev = env.fits.get(name);
    if (prev) r.report('duplicate_name', MSG.duplicate('fit', name, prev.line), fit.name.range);
  }

  // Data source and its columns.
  const dataName = fit.data?.name ?? '';
  let columns: ReadonlySet<string> | undefined;
  if (fit.data) {
    const d = env.data.get(dataName);
    if (d) {
      d.used = true;
      columns = d.headers;
    } else if (env.declared.data.has(dataName)) {
      // declared above but unreadable (its syntax error is reported there): nothing more to say here
      const line = env.declared.data.get(dataName)!;
      if (line > fit.data.range.start.line) r.report('declared_later', MSG.declaredLater('data', dataName, line), fit.data.range);
    } else {
      r.report('unknown_data', MSG.unknownData(dataName), fit.data.range, env.suggester.suggest(dataName, env.data.keys()));
    }
  }

  // Parameters first: the model may use them before their lines.
  const params: ParameterPlan[] = [];
  const paramAsts = new Map<string, ParamAst & { name: NameAst }>();
  for (const item of fit.items) {
    if (item.kind !== 'param' || !item.name) continue;
    const p = item as ParamAst & { name: NameAst };
    const pname = p.name.name;
    const before = paramAsts.get(pname);
    if (before) {
      r.report('duplicate_name', MSG.duplicate('parameter', pname, before.name.range.start.line), p.name.range);
      continue;
    }
    if (isBuiltinConstant(pname)) r.report('reserved_name', MSG.reservedName(pname), p.name.range);
    const c = env.consts.get(pname);
    if (c) r.report('duplicate_name', MSG.paramIsConst(pname, c.line), p.name.range);
    if (columns?.has(pname)) r.report('param_column_clash', MSG.paramColumnClash(pname, dataName), p.name.range);
    paramAsts.set(pname, p);
    params.push(checkParam(env, p));
  }
  const paramNames = new Set(paramAsts.keys());

  // Model, sigma, weight.
  const scope = (place: string, allowParams: boolean): ExprScope => ({ params: paramNames, allowParams, place, dataName, columns });
  const models = fit.items.filter((i): i is Extract<FitItemAst, { kind: 'model' }> => i.kind === 'model');
  for (const extra of models.slice(1)) r.report('duplicate_option', MSG.duplicateOption('model'), extra.range);
  const responseUse = newUse();
  const modelUse = newUse();
  const otherUse = newUse();
  let response: Expr = { kind: 'number', value: 0 };
  let model: Expr = { kind: 'number', value: 0 };
  const first = models[0];
  if (!first) {
    r.report('missing_model', MSG.missingModel(name || 'this fit'), fit.name?.range ?? fit.range);
  } else {
    response = resolveExpr(env, first.response, 'number', scope('response', false), responseUse);
    model = resolveExpr(env, first.model, 'number', scope('model', true), modelUse);
    if (!responseUse.broken && responseUse.columns.length === 0) r.report('response_no_column', MSG.responseNoColumn, first.response.range);
    if (!modelUse.broken && modelUse.params.size === 0) r.report('no_parameter', MSG.noParameter, first.model.range);
  }
  const single = (kind: 'sigma' | 'weight'): Expr | undefined => {
    const items = fit.items.filter((i): i is Extract<FitItemAst, { kind: 'sigma' | 'weight' }> => i.kind === kind);
    for (const extra of items.slice(1)) r.report('duplicate_option', MSG.duplicateOption(kind), extra.range);
    return items[0] ? resolveExpr(env, items[0].expr, 'number', scope(kind, false), otherUse) : undefined;
  };
  const sigma = single('sigma');
  const weight = single('weight');

  // Unused parameters (skipped when the model could not be read).
  if (first && !modelUse.broken) {
    for (const [pname, p] of paramAsts) {
      if (!modelUse.params.has(pname)) r.report('unused_parameter', MSG.unusedParameter(pname), p.name.range);
    }
  }

  const { options, groupBy } = checkOptions(env, fit, dataName, columns);
  const allColumns = mergeColumns(responseUse, modelUse, otherUse);
  const block: FitBlock = {
    data: dataName,
    response,
    model,
    columns: allColumns,
    range: first?.range ?? fit.range,
  };
  if (sigma) block.sigma = sigma;
  if (weight) block.weight = weight;
  // (an unknown name is no predictor: completion and queries would follow the misspelling)
  if (modelUse.columns.length === 1 && modelUse.unresolved.length === 0) block.predictor = modelUse.columns[0];

  const isLinearIn = env.ctx.isLinearIn;
  if (isLinearIn && options.method === 'linear' && first && !modelUse.broken && params.every((p) => !p.fixed || p.initial !== undefined)) {
    // The compiler's own symbolic test (passed in by the caller), as the engine applies it (fixed parameters are numbers there).
    const fixed = new Map(params.filter((p) => p.fixed).map((p) => [p.name, p.initial!]));
    const free = params.filter((p) => !p.fixed).map((p) => p.name);
    if (!isLinearIn(substituteParams(model, fixed), free)) {
      const method = fit.items.find((i): i is Extract<FitItemAst, { kind: 'method' }> => i.kind === 'method');
      r.report('method_not_linear', MSG.methodNotLinear(name), method?.value?.range ?? method?.range ?? fit.range);
    }
  }

  const tables = checkTables(env, fit, block, columns);
  const blocks = [block, ...tables.blocks];
  if (blocks.length > 1) {
    // each table a block with the same model; a parameter not marked shared takes one value per table
    blocks[0] = { ...block, range: fit.data!.range };
    for (const p of params) if (p.acrossGroups !== 'shared') p.scope = 'perBlock';
  }
  const plan: FitPlan = { name, blocks, parameters: params, options, range: fit.range };
  if (groupBy !== undefined) plan.groupBy = groupBy;
  if (groupBy !== undefined && blocks.length > 1) {
    const per = fit.items.find((i) => i.kind === 'per');
    r.report('tables_with_per', MSG.tablesWithPer(name), per?.range ?? fit.range);
  }
  checkShared(env, plan, paramAsts);
  return {
    plan,
    line: fit.range.start.line,
    params: [...paramNames],
    modelColumns: modelUse.columns,
    responseColumns: responseUse.columns,
    unresolved: { model: modelUse.unresolved, response: responseUse.unresolved },
    // (a table of the on list that is not declared leaves the fit without its groups: later checks would follow the misspelling)
    incomplete: !first || modelUse.broken || responseUse.broken || tables.broken,
  };
}

/**
 * `fit NAME on A, B, C`: the tables after the first, each a block with the first one's model (its columns
 * resolved against the first table). Each further table must be declared above, listed once, have every
 * column the fit reads (headers known) and declare no other unit for a column than the first table does;
 * each problem is reported at that table's name in the list.
 */
function checkTables(env: Env, fit: FitAst, first: FitBlock, firstColumns: ReadonlySet<string> | undefined): { blocks: FitBlock[]; broken: boolean } {
  const { r } = env;
  const out: FitBlock[] = [];
  let broken = false;
  const firstName = fit.data?.name ?? '';
  const seen = new Set([firstName]);
  const firstUnits = env.data.get(firstName)?.plan.units ?? {};
  for (const t of fit.moreData ?? []) {
    if (seen.has(t.name)) {
      r.report('repeated_data', MSG.repeatedTable(t.name), t.range);
      continue;
    }
    seen.add(t.name);
    const d = env.data.get(t.name);
    if (!d) {
      broken = true;
      if (env.declared.data.has(t.name)) {
        const line = env.declared.data.get(t.name)!;
        if (line > t.range.start.line) r.report('declared_later', MSG.declaredLater('data', t.name, line), t.range);
      } else r.report('unknown_data', MSG.unknownData(t.name), t.range, env.suggester.suggest(t.name, env.data.keys()));
      continue;
    }
    d.used = true;
    if (d.headers) {
      // (columns the first table lacks are reported there already)
      const missing = first.columns.filter((c) => !d.headers!.has(c) && (firstColumns?.has(c) ?? true));
      if (missing.length) r.report('table_column_missing', MSG.tableColumnMissing(t.name, missing, firstName), t.range, env.suggester.suggest(missing[0], d.headers));
    }
    const units = d.plan.units ?? {};
    const clash = first.columns.filter((c) => units[c] !== undefined && firstUnits[c] !== undefined && units[c] !== firstUnits[c]);
    for (const c of clash) r.report('table_units_differ', MSG.tableUnitsDiffer(c, t.name, units[c], firstName, firstUnits[c]), t.range);
    out.push({ ...first, data: t.name, range: t.range });
  }
  return { blocks: out, broken };
}

/** `shared` needs groups, and a joint fit runs with the squared loss by Levenberg–Marquardt only (engine/run/joint.ts). */
function checkShared(env: Env, plan: FitPlan, asts: Map<string, ParamAst & { name: NameAst }>): void {
  const shared = [...asts.values()].filter((p) => p.shared);
  if (!shared.length) return;
  if (plan.groupBy === undefined && plan.blocks.length < 2) {
    for (const p of shared) env.r.report('shared_without_groups', MSG.sharedWithoutGroups(p.name.name), p.shared!);
    return;
  }
  const o = plan.options;
  const unsupported = o.loss !== 'squared' ? `loss ${o.loss}` : o.method === 'gradient_descent' || o.method === 'linear' ? `method ${o.method}` : null;
  if (unsupported) env.r.report('joint_not_supported', MSG.jointNotSupported(plan.name, unsupported), shared[0].shared!);
}

function mergeColumns(...uses: ExprUse[]): string[] {
  const out: string[] = [];
  for (const u of uses) for (const c of u.columns) if (!out.includes(c)) out.push(c);
  return out;
}

function checkParam(env: Env, p: ParamAst & { name: NameAst }): ParameterPlan {
  const { r } = env;
  for (const rep of p.repeated) r.report('duplicate_option', MSG.duplicateOption(`a part of parameter '${p.name.name}'`), rep);
  const initial = p.initial ? resolveValue(env, p.initial, { allowInf: false }) : undefined;
  let lower: number | undefined;
  let upper: number | undefined;
  if (p.bounds) {
    const lo = resolveValue(env, p.bounds.low, { allowInf: true });
    const hi = resolveValue(env, p.bounds.high, { allowInf: true });
    if (lo !== undefined && hi !== undefined && lo >= hi) {
      r.report('bounds_order', MSG.boundsOrder(showBound(lo), showBound(hi)), p.bounds.range);
    } else {
      lower = lo;
      upper = hi;
    }
    const ordered = !(lo !== undefined && hi !== undefined && lo >= hi);
    if (ordered && initial !== undefined && ((lo !== undefined && initial < lo) || (hi !== undefined && initial > hi))) {
      r.report('initial_outside_bounds', MSG.initialOutside(initial, showBound(lo), showBound(hi)), p.initial!.range);
    }
  }
  if (p.fixed && !p.initial) {
    r.report('fixed_without_value', MSG.fixedWithoutValue(p.name.name), p.fixed);
  }
  const plan: ParameterPlan = { name: p.name.name, fixed: p.fixed !== undefined, scope: 'shared', range: p.range ?? EMPTY_RANGE };
  if (initial !== undefined) plan.initial = initial;
  // JSON has no Infinity: infinite (or missing) bounds are omitted, meaning unbounded on that side.
  if (lower !== undefined && Number.isFinite(lower)) plan.lower = lower;
  if (upper !== undefined && Number.isFinite(upper)) plan.upper = upper;
  if (p.unit) plan.unit = p.unit.text;
  if (p.shared) plan.acrossGroups = 'shared';
  return plan;
}

function showBound(x: number | undefined): string {
  return x === undefined ? '?' : x === Infinity ? 'inf' : x === -Infinity ? '-inf' : String(x);
}
