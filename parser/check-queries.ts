/**
 * Statements that use a fit after it is declared: predict, invert, compare
 * and expect. Each names its fit; the fit must be declared above. An
 * expectation may instead name a derived quantity declared above (`expect
 * lod below 0.1`, `expect lod.se below 0.01`).
 */
import { isMember, MEMBERS, MEMBER_SPECS } from './registry/statistics';
import type { BackcalcAst, CompareAst, ExpectAst, NameAst, PredictAst, QueryOptionAst, ValueAst } from './ast';
import type { Bound, Expectation, ExpectTarget, NewObservation, Query, Range } from './plan';
import { STATISTICS, isStatisticName as isStatistic } from './registry/statistics';
import type { Env, FitInfo } from './check-env';
import { resolveValue } from './check-expr';
import { MSG } from './messages';
import { columnsOf, exprText, fitHasGroups, groupingOf, sameGrouping } from './plan-expr';
import { QUERY_MEMBERS, isQueryMember, QUERY_MEMBER_SPECS } from './registry/statistics';
import { checkGroupLabel } from './check-groups';

/** The fit a statement names, or undefined (reported). */
export function lookupFit(env: Env, name: NameAst | undefined): FitInfo | undefined {
  if (!name) return undefined;
  const f = env.fits.get(name.name);
  if (f) return f;
  const later = env.declared.fit.get(name.name);
  if (later !== undefined) env.r.report('declared_later', MSG.declaredLater('fit', name.name, later), name.range);
  else env.r.report('unknown_fit', MSG.unknownFit(name.name), name.range, env.suggester.suggest(name.name, env.fits.keys()));
  return undefined;
}

function values(env: Env, vs: ValueAst[]): number[] {
  const out: number[] = [];
  for (const v of vs) {
    const x = resolveValue(env, v, { allowInf: false });
    if (x !== undefined) out.push(x);
  }
  return out;
}

export function checkQuery(env: Env, q: PredictAst): Query | undefined {
  const fit = lookupFit(env, q.fit);
  const vals = values(env, q.values);
  const col = q.column;
  if (fit && col && !fit.incomplete) {
    const cols = fit.modelColumns;
    const fitName = fit.plan.name;
    const data = fit.plan.blocks[0]?.data ?? '';
    const headers = env.data.get(data)?.headers;
    // A fit whose own model (or response) names an unknown column is wrong there, and reported there: the
    // query is then checked against the data only, never told to follow the misspelling.
    const modelOk = fit.unresolved.model.length === 0;
    const responseOk = fit.unresolved.response.length === 0;
    const side = q.kind === 'predict' ? modelOk : responseOk;
    if (!side && headers && !headers.has(col.name)) {
      env.r.report('unknown_column', MSG.unknownColumn(col.name, data), col.range, env.suggester.suggest(col.name, headers));
    }
    // The same rules as the engine's queries (engine/run/queries.ts), which keep them as a guard.
    if (q.kind === 'predict') {
      if (modelOk && cols.length === 1 && cols[0] !== col.name) {
        env.r.report('predictor_mismatch', MSG.predictorOther(fitName, cols[0], col.name), col.range, [cols[0]]);
      } else if (modelOk && cols.length !== 1) {
        env.r.report('predictor_mismatch', MSG.needsOnePredictor('predict', fitName, cols), col.range);
      }
    } else {
      if (modelOk && cols.length !== 1) env.r.report('predictor_mismatch', MSG.needsOnePredictor('invert', fitName, cols), q.fit!.range);
      const resp = fit.responseColumns;
      if (responseOk && (resp.length !== 1 || resp[0] !== col.name)) {
        env.r.report('response_mismatch', MSG.responseMismatch(fitName, col.name, resp), col.range, resp.includes(col.name) ? undefined : resp.slice(0, 3));
      }
    }
  }
  const opts = queryOptions(env, q.kind, q.options, q.values.length, fit, q.range, () => exampleQuery(q));
  if (!q.fit || !col || !opts) return undefined;
  const observation = opts.observation ? { observation: opts.observation } : {};
  return q.kind === 'predict'
    ? { kind: 'predict', fit: q.fit.name, variable: col.name, values: vals, ...observation, range: q.range }
    : { kind: 'invert', fit: q.fit.name, response: col.name, values: vals, ...(opts.readings !== undefined ? { readings: opts.readings } : {}), ...observation, range: q.range };
}

/** The query as written with a placeholder spread, for the message that asks for one. */
function exampleQuery(q: PredictAst): string {
  const shown = q.values.map((v) => (v.kind === 'number' ? String(v.value) : v.kind === 'name' ? v.name : '…')).join(', ');
  return `${q.kind} ${q.fit?.name ?? 'FIT'} at ${q.column?.name ?? 'COLUMN'} = ${shown}`;
}

/**
 * The options after a query's values (or after `at` in an expectation):
 * `readings M` (invert only, a whole number ≥ 1) and the new observation's
 * `sigma`/`weight` (the fit's own kind, 1 or `count` values, each > 0). A fit
 * whose sigma or weight expression reads a column other than the predictor
 * needs it stated: its value at a new point cannot be read off the curve, and
 * an average over the fitted rows would be a silent guess (engine/run/curve.ts
 * refuses it too). Undefined when an option is in error (reported).
 */
export function queryOptions(
  env: Env, kind: 'predict' | 'invert', options: readonly QueryOptionAst[], count: number, fit: FitInfo | undefined, range: Range, example: () => string,
): { readings?: number; observation?: NewObservation } | undefined {
  let ok = true;
  let readings: number | undefined;
  let observation: NewObservation | undefined;
  const block = fit?.plan.blocks[0];
  const has: 'sigma' | 'weight' | undefined = block?.sigma ? 'sigma' : block?.weight ? 'weight' : undefined;
  for (const o of options) {
    if (o.kind === 'readings') {
      const v = o.values[0] ? resolveValue(env, o.values[0], { allowInf: false }) : undefined;
      if (kind === 'predict') { env.r.report('query_option', MSG.readingsOnPredict, o.range); ok = false; }
      else if (readings !== undefined) { env.r.report('query_option', MSG.optionRepeated('readings'), o.range); ok = false; }
      else if (v === undefined) ok = false;
      else if (!Number.isInteger(v) || v < 1) { env.r.report('query_option', MSG.readingsCount(v), o.range); ok = false; }
      else readings = v;
      continue;
    }
    const vs = values(env, o.values);
    if (vs.length !== o.values.length) { ok = false; continue; }
    if (observation) { env.r.report('query_option', MSG.optionRepeated(o.kind === observation.kind ? o.kind : 'the new observation\'s spread'), o.range); ok = false; continue; }
    if (fit && !fit.incomplete && has !== o.kind) {
      env.r.report('query_option', has ? MSG.spreadOtherKind(fit.plan.name, has, o.kind) : MSG.spreadUnweighted(fit.plan.name, o.kind), o.range);
      ok = false;
      continue;
    }
    if (vs.length !== 1 && vs.length !== count) { env.r.report('query_option', MSG.spreadCount(o.kind, vs.length, count), o.range); ok = false; continue; }
    const bad = vs.findIndex((v) => !(v > 0));
    if (bad >= 0) { env.r.report('not_positive', MSG.notPositive(o.kind, vs[bad]), o.values[bad].range); ok = false; continue; }
    observation = { kind: o.kind, values: vs };
  }
  if (fit && !fit.incomplete && block && has && !observation && fit.modelColumns.length === 1) {
    const expr = has === 'sigma' ? block.sigma! : block.weight!;
    const predictor = fit.modelColumns[0];
    const others = columnsOf(expr).filter((c) => c !== predictor);
    if (others.length > 0) {
      env.r.report('new_sigma_needed', MSG.newSigmaNeeded(fit.plan.name, has, others, predictor, `${example()} ${has} ${has === 'sigma' ? 'S' : 'W'}`), range);
      ok = false;
    }
  }
  if (!ok) return undefined;
  return { ...(readings !== undefined ? { readings } : {}), ...(observation ? { observation } : {}) };
}

/**
 * `backcalc FIT`: the fit must have one predictor column and a response of
 * one column (the standards are read back through the curve, as `invert`
 * does). A sigma or weight of other columns is fine: each standard's own row
 * gives its value.
 */
export function checkBackcalc(env: Env, b: BackcalcAst): Query | undefined {
  const fit = lookupFit(env, b.fit);
  if (!b.fit) return undefined;
  if (fit && !fit.incomplete) {
    if (fit.modelColumns.length !== 1) env.r.report('query_option', MSG.backcalcNeeds(fit.plan.name, 'exactly one predictor column'), b.fit.range);
    else if (fit.responseColumns.length !== 1) env.r.report('query_option', MSG.backcalcNeeds(fit.plan.name, 'a response of exactly one column'), b.fit.range);
  }
  return { kind: 'backcalc', fit: b.fit.name, range: b.range };
}

/**
 * `compare`: two or more different fits, all on the same data and the same
 * response (as the engine requires, engine/run/queries.ts; it also refuses
 * fits that end up with different rows, which only the data tell); fits with
 * groups (`per COLUMN`, several tables) only with fits of the same groups.
 */
/** A fit's groups in words, for messages. */
function groupingText(g: ReturnType<typeof groupingOf>): string {
  return g.kind === 'column' ? `per ${g.column} of ${g.data}` : g.kind === 'tables' ? `over the tables ${g.tables.join(', ')}` : 'without groups';
}

export function checkCompare(env: Env, c: CompareAst): Query {
  const names: string[] = [];
  const seen = new Set<string>();
  const found: FitInfo[] = [];
  for (const f of c.fits) {
    if (seen.has(f.name)) {
      env.r.report('repeated_fit', MSG.compareRepeated(f.name), f.range);
      continue;
    }
    seen.add(f.name);
    const fit = lookupFit(env, f);
    if (fit && !fit.incomplete) {
      // fits with groups compare with fits of the same groups only (engine/run/compare-groups.ts)
      const first = found[0];
      if (first) {
        const [a, b] = [groupingOf(first.plan), groupingOf(fit.plan)];
        if ((a.kind === 'none') !== (b.kind === 'none')) env.r.report('compare_per_group', MSG.comparePerGroup(a.kind === 'none' ? f.name : first.plan.name, a.kind === 'none' ? first.plan.name : f.name), f.range);
        else if (!sameGrouping(a, b)) env.r.report('compare_groups_differ', MSG.compareGroupsDiffer(first.plan.name, f.name, groupingText(a), groupingText(b)), f.range);
      }
      found.push(fit);
    }
    names.push(f.name);
  }
  if (names.length < 2 && c.fits.length > 0) env.r.report('compare_too_few', MSG.compareTooFew, c.range);
  else if (found.length >= 2) {
    const same = (a: FitInfo, b: FitInfo) => a.plan.blocks[0].data === b.plan.blocks[0].data && exprText(a.plan.blocks[0].response) === exprText(b.plan.blocks[0].response);
    if (found.some((f) => !same(f, found[0]))) env.r.report('compare_mismatch', MSG.compareMismatch(names), c.range);
  }
  // `compare a within b`: a must be b with parameters fixed or tied, so it has fewer free parameters
  if (c.within && found.length === 2 && names.length === 2 && found.every((f) => groupingOf(f.plan).kind === 'none')) {
    const free = (f: FitInfo) => f.plan.parameters.filter((p) => !p.fixed).length;
    const [p1, p2] = [free(found[0]), free(found[1])];
    if (p1 >= p2) env.r.report('compare_within_order', MSG.compareWithinOrder(names[0], names[1], p1, p2), c.within);
  }
  return { kind: 'compare', fits: names, ...(c.within && names.length === 2 ? { within: true } : {}), range: c.range };
}


/** True when the first name of `expect` is (meant as) a derived quantity rather than a fit. */
function namesDerived(env: Env, x: ExpectAst): boolean {
  const head = x.fit;
  if (!head) return false;
  if (env.derived.has(head.name)) return true;
  if (env.fits.has(head.name)) return false;
  return x.path.length === 0 || (env.declared.derive.has(head.name) && !env.declared.fit.has(head.name));
}

function derivedTarget(env: Env, head: NameAst, path: NameAst[]): ExpectTarget | undefined {
  const [first, second] = path;
  if (env.derived.has(head.name)) {
    if (!first) return { kind: 'derived', name: head.name, of: 'estimate' };
    if (isMember(first.name) && !second) return { kind: 'derived', name: head.name, of: MEMBER_SPECS[first.name].of };
    const bad = isMember(first.name) ? second : first;
    env.r.report('unknown_target', MSG.unknownDerivedPath(bad.name), bad.range, env.suggester.suggest(bad.name, MEMBERS));
    return undefined;
  }
  const later = env.declared.derive.get(head.name);
  if (later !== undefined) {
    env.r.report('declared_later', MSG.declaredLater('derived quantity', head.name, later), head.range);
  } else if (env.declared.fit.has(head.name)) {
    env.r.report('unknown_target', MSG.fitNeedsMember(head.name), head.range);
  } else {
    env.r.report('undefined_name', MSG.unknownDerived(head.name), head.range, env.suggester.suggest(head.name, [...env.derived.keys(), ...env.fits.keys()]));
  }
  return undefined;
}

/**
 * `expect FIT.PATH at COLUMN = VALUE [options] BOUND`: a number of a query at
 * one point (QUERY_MEMBER_SPECS), checked as that query would be.
 */
function queryTarget(env: Env, x: ExpectAst, at: NonNullable<ExpectAst['at']>): ExpectTarget | undefined {
  const fit = lookupFit(env, x.fit);
  const path = x.path.map((p) => p.name).join('.');
  if (!isQueryMember(path)) {
    const r = x.path.length ? { start: x.path[0].range.start, end: x.path[x.path.length - 1].range.end } : x.fit?.range;
    if (r) env.r.report('unknown_query_member', MSG.unknownQueryMember(path, QUERY_MEMBERS), r, env.suggester.suggest(path, QUERY_MEMBERS));
    return undefined;
  }
  const query = QUERY_MEMBER_SPECS[path].query;
  const col = at.column;
  const value = resolveValue(env, at.value, { allowInf: false });
  if (fit && col && !fit.incomplete) {
    const cols = query === 'predict' ? fit.modelColumns : fit.responseColumns;
    if (cols.length !== 1) env.r.report(query === 'predict' ? 'predictor_mismatch' : 'response_mismatch', query === 'predict' ? MSG.needsOnePredictor('predict', fit.plan.name, cols) : MSG.responseMismatch(fit.plan.name, col.name, cols), col.range);
    else if (cols[0] !== col.name) env.r.report(query === 'predict' ? 'predictor_mismatch' : 'response_mismatch', query === 'predict' ? MSG.predictorOther(fit.plan.name, cols[0], col.name) : MSG.responseMismatch(fit.plan.name, col.name, cols), col.range, [cols[0]]);
  }
  const opts = queryOptions(env, query, at.options, 1, fit, at.range, () => `expect ${x.fit?.name ?? 'FIT'}.${path} at ${col?.name ?? 'COLUMN'} = ${value ?? '…'}`);
  if (!fit || !col || value === undefined || !opts) return undefined;
  return {
    kind: 'query', fit: fit.plan.name, query, member: path, column: col.name, value,
    ...(opts.readings !== undefined ? { readings: opts.readings } : {}),
    ...(opts.observation ? { observation: opts.observation } : {}),
  };
}

export function checkExpect(env: Env, x: ExpectAst): Expectation | undefined {
  if (x.at) {
    const target = queryTarget(env, x, x.at);
    const bound = checkBound(env, x);
    return target && bound ? { target, bound, text: x.text, range: x.range } : undefined;
  }
  const derived = namesDerived(env, x);
  const fit = derived ? undefined : lookupFit(env, x.fit);
  const fitName = x.fit?.name ?? '';
  let target: ExpectTarget | undefined = derived && x.fit ? derivedTarget(env, x.fit, x.path) : undefined;
  // FIT."GROUP".NAME: that one group of a per-group fit (its labels are known only with the data: engine/run/expectations.ts)
  let path = x.path;
  let group: string | undefined;
  if (!derived && path[0]?.quoted) {
    group = path[0].name;
    path = path.slice(1);
    if (path.length === 0) {
      env.r.report('unknown_target', MSG.groupNeedsMember(fitName, group), x.path[0].range);
      return undefined;
    }
    if (fit && !fitHasGroups(fit.plan)) {
      env.r.report('unknown_target', MSG.groupOfUngroupedFit(fit.plan.name, group), x.path[0].range);
      return undefined;
    }
    // a label that is no value of the per column, when the data's labels are known (check-groups.ts)
    if (!checkGroupLabel(env, fit, group, x.path[0].range)) return undefined;
  }
  const misplaced = path.find((p) => p.quoted);
  if (misplaced) {
    env.r.report('unknown_target', MSG.groupMisplaced, misplaced.range);
    return undefined;
  }
  const at = group !== undefined ? { group } : {};
  const [first, second, third] = derived ? [] : path;
  if (first) {
    const params = fit?.params ?? [];
    const isParam = params.includes(first.name);
    if (third) {
      env.r.report('unknown_target', MSG.pathTooLong, third.range);
    } else if (second) {
      if (fit && !isParam) {
        env.r.report('unknown_target', MSG.stderrOfNonParam(first.name, fitName), first.range, env.suggester.suggest(first.name, params));
      } else if (!isMember(second.name)) {
        env.r.report('unknown_target', MSG.unknownStderrPath(second.name), second.range, env.suggester.suggest(second.name, MEMBERS));
      } else {
        target = { kind: 'parameter', fit: fitName, name: first.name, of: MEMBER_SPECS[second.name].of, ...at };
      }
    } else if (isParam) {
      target = { kind: 'parameter', fit: fitName, name: first.name, of: 'estimate', ...at };
    } else if (isStatistic(first.name)) {
      target = { kind: 'statistic', fit: fitName, name: first.name, ...at };
    } else if (fit) {
      env.r.report('unknown_target', MSG.unknownTarget(first.name, fitName), first.range, env.suggester.suggest(first.name, [...params, ...STATISTICS]));
    }
  } else if (fit && x.fit && !derived) {
    env.r.report('unknown_target', MSG.fitNeedsMember(fitName), x.fit.range);
  }

  const bound = checkBound(env, x);
  if (!target || !bound || (!fit && target.kind !== 'derived')) return undefined;
  return { target, bound, text: x.text, range: x.range };
}

function checkBound(env: Env, x: ExpectAst): Bound | undefined {
  let bound: Bound | undefined;
  const b = x.bound;
  if (b?.kind === 'within') {
    const low = resolveValue(env, b.low, { allowInf: false });
    const high = resolveValue(env, b.high, { allowInf: false });
    if (low !== undefined && high !== undefined) {
      if (low > high) env.r.report('bounds_order', MSG.boundsOrder(String(low), String(high)), b.range);
      else bound = { kind: 'within', low, high };
    }
  } else if (b) {
    const value = resolveValue(env, b.value, { allowInf: false });
    if (value !== undefined) bound = { kind: b.kind, value };
  }
  return bound;
}
