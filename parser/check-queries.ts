/**
 * Statements that use a fit after it is declared: predict, invert, compare
 * and expect. Each names its fit; the fit must be declared above. An
 * expectation may instead name a derived quantity declared above (`expect
 * lod below 0.1`, `expect lod.se below 0.01`).
 */
import { isMember, MEMBERS, MEMBER_SPECS } from './registry/statistics';
import type { CompareAst, ExpectAst, NameAst, PredictAst, ValueAst } from './ast';
import type { Bound, Expectation, ExpectTarget, Query } from './plan';
import { STATISTICS, isStatisticName as isStatistic } from './registry/statistics';
import type { Env, FitInfo } from './check-env';
import { resolveValue } from './check-expr';
import { MSG } from './messages';
import { exprText } from './plan-expr';

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
    // The same rules as the engine's queries (engine/run/queries.ts), which keep them as a guard.
    if (q.kind === 'predict') {
      if (cols.length === 1 && cols[0] !== col.name) {
        env.r.report('predictor_mismatch', MSG.predictorOther(fitName, cols[0], col.name), col.range, [cols[0]]);
      } else if (cols.length !== 1) {
        env.r.report('predictor_mismatch', MSG.needsOnePredictor('predict', fitName, cols), col.range);
      }
    } else {
      if (cols.length !== 1) env.r.report('predictor_mismatch', MSG.needsOnePredictor('invert', fitName, cols), q.fit!.range);
      const resp = fit.responseColumns;
      if (resp.length !== 1 || resp[0] !== col.name) {
        env.r.report('response_mismatch', MSG.responseMismatch(fitName, col.name, resp), col.range, resp.includes(col.name) ? undefined : resp.slice(0, 3));
      }
    }
  }
  if (!q.fit || !col) return undefined;
  return q.kind === 'predict'
    ? { kind: 'predict', fit: q.fit.name, variable: col.name, values: vals, range: q.range }
    : { kind: 'invert', fit: q.fit.name, response: col.name, values: vals, range: q.range };
}

/**
 * `compare`: two or more different fits, none per group, all on the same data
 * and the same response (as the engine requires, engine/run/queries.ts; it
 * also refuses fits that end up with different rows, which only the data tell).
 */
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
    if (fit?.plan.groupBy !== undefined) env.r.report('compare_per_group', MSG.comparePerGroup(f.name), f.range);
    if (fit && !fit.incomplete) found.push(fit);
    names.push(f.name);
  }
  if (names.length < 2 && c.fits.length > 0) env.r.report('compare_too_few', MSG.compareTooFew, c.range);
  else if (found.length >= 2) {
    const same = (a: FitInfo, b: FitInfo) => a.plan.blocks[0].data === b.plan.blocks[0].data && exprText(a.plan.blocks[0].response) === exprText(b.plan.blocks[0].response);
    if (found.some((f) => !same(f, found[0]))) env.r.report('compare_mismatch', MSG.compareMismatch(names), c.range);
  }
  // `compare a within b`: a must be b with parameters fixed or tied, so it has fewer free parameters
  if (c.within && found.length === 2 && names.length === 2) {
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

export function checkExpect(env: Env, x: ExpectAst): Expectation | undefined {
  const derived = namesDerived(env, x);
  const fit = derived ? undefined : lookupFit(env, x.fit);
  const fitName = x.fit?.name ?? '';
  let target: ExpectTarget | undefined = derived && x.fit ? derivedTarget(env, x.fit, x.path) : undefined;
  const [first, second, third] = derived ? [] : x.path;
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
        target = { kind: 'parameter', fit: fitName, name: first.name, of: MEMBER_SPECS[second.name].of };
      }
    } else if (isParam) {
      target = { kind: 'parameter', fit: fitName, name: first.name, of: 'estimate' };
    } else if (isStatistic(first.name)) {
      target = { kind: 'statistic', fit: fitName, name: first.name };
    } else if (fit) {
      env.r.report('unknown_target', MSG.unknownTarget(first.name, fitName), first.range, env.suggester.suggest(first.name, [...params, ...STATISTICS]));
    }
  } else if (fit && x.fit && !derived) {
    env.r.report('unknown_target', MSG.fitNeedsMember(fitName), x.fit.range);
  }

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
  if (!target || !bound || (!fit && target.kind !== 'derived')) return undefined;
  return { target, bound, text: x.text, range: x.range };
}
