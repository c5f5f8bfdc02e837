/**
 * Checks one `derive NAME = EXPRESSION [UNIT]` statement and builds its
 * DerivedPlan.
 *
 * The expression has the grammar of a model but reads numbers that exist
 * after fitting: `FIT.PARAM` (an estimate) and `FIT.STAT` (a statistic, see
 * registry/statistics.ts), constants, `pi`/`e`, and derived quantities declared
 * above. Columns and bare parameters are not allowed. Like every name in a
 * spec, a fit or derived quantity must be declared above the line that uses it.
 * The name of a derived quantity must differ from every constant, data, fit
 * and derived name in the file (it is used by itself in `expect` and in later
 * derive expressions, where those names also appear).
 */
import type { DeriveAst, NameAst } from './ast';
import type { DerivedPlan, Expr, Range } from './plan';
import { STATISTICS, isStatisticName as isStatistic } from './registry/statistics';
import { BUILTIN_CONSTANTS, isBuiltinConstant, type Env } from './check-env';
import { newUse, resolveExpr, type DeriveHooks, type ExprScope, type ExprUse } from './check-expr';
import { lookupFit } from './check-queries';
import { MSG } from './messages';
import { fitHasGroups } from './plan-expr';
import { checkGroupLabel } from './check-groups';


function addFit(fits: string[], name: string): void {
  if (!fits.includes(name)) fits.push(name);
}

/** Name resolution inside the expression of derived quantity `self`; `fits` collects the fits read. */
function hooks(env: Env, self: string, fits: string[]): DeriveHooks {
  const isColumn = (name: string): boolean => [...env.data.values()].some((d) => d.headers?.has(name) ?? false);
  return {
    name(name: string, quoted: boolean, range: Range, use: ExprUse): Expr {
      const zero: Expr = { kind: 'number', value: 0, range };
      if (quoted) {
        env.r.report('column_in_derive', MSG.columnInDerive(name), range);
        use.broken = true;
        return zero;
      }
      const c = env.consts.get(name);
      if (c) return { kind: 'number', value: c.value, range };
      if (isBuiltinConstant(name)) return { kind: 'number', value: BUILTIN_CONSTANTS[name], range };
      const d = env.derived.get(name);
      if (d) {
        for (const f of d.fits) addFit(fits, f);
        return { kind: 'derived', name, range };
      }
      use.broken = true;
      if (name === self) {
        env.r.report('undefined_name', MSG.selfReference(name), range);
        return zero;
      }
      const later = env.declared.derive.get(name) ?? env.declared.const.get(name);
      if (later !== undefined && later > range.start.line) {
        env.r.report('declared_later', MSG.declaredLater(env.declared.derive.has(name) ? 'derived quantity' : 'constant', name, later), range);
      } else if (env.fits.has(name) || env.declared.fit.has(name)) {
        env.r.report('unknown_target', MSG.fitNeedsMember(name), range);
      } else if (isColumn(name)) {
        env.r.report('column_in_derive', MSG.columnInDerive(name), range);
      } else {
        const candidates = [...env.consts.keys(), ...env.derived.keys(), ...Object.keys(BUILTIN_CONSTANTS)];
        env.r.report('undefined_name', MSG.notDeriveName(name), range, env.suggester.suggest(name, candidates));
      }
      return zero;
    },

    dotted(head: NameAst, members: NameAst[], range: Range, use: ExprUse): Expr {
      members = [...members];
      const zero: Expr = { kind: 'number', value: 0, range };
      if (env.derived.has(head.name) || (!env.fits.has(head.name) && env.declared.derive.has(head.name) && !env.declared.fit.has(head.name))) {
        env.r.report('unknown_target', MSG.derivedNotFit(head.name), head.range);
        use.broken = true;
        return zero;
      }
      const fit = lookupFit(env, head);
      // FIT."GROUP".NAME: the number of one group of a per-group fit (group labels are known only with the data: engine/run/derived.ts)
      let group: string | undefined;
      const groupRange = members[0]?.range ?? range;
      if (members[0]?.quoted) {
        group = members[0].name;
        members = members.slice(1);
        if (members.length === 0) {
          env.r.report('unknown_target', MSG.groupNeedsMember(head.name, group), range);
          use.broken = true;
          return zero;
        }
        if (fit && !fitHasGroups(fit.plan)) {
          env.r.report('unknown_target', MSG.groupOfUngroupedFit(fit.plan.name, group), range);
          use.broken = true;
          return zero;
        }
        // a label that is no value of the per column, when the data's labels are known (check-groups.ts)
        if (!checkGroupLabel(env, fit, group, groupRange)) {
          use.broken = true;
          return zero;
        }
      }
      const misplaced = members.find((m) => m.quoted);
      if (misplaced) {
        env.r.report('unknown_target', MSG.groupMisplaced, misplaced.range);
        use.broken = true;
        return zero;
      }
      const at = group !== undefined ? { group } : {};
      const [member, extra, beyond] = members;
      // FIT.PARAM.se: the parameter's standard error, a fixed number (engine/run/derived.ts); nothing else after a member
      const isSe = extra?.name === 'se' && !beyond && (!fit || fit.params.includes(member.name));
      if (extra && !isSe) {
        env.r.report('unknown_target', extra.name === 'se' && !beyond ? MSG.seNotParameter(member.name) : MSG.derivePathTooLong, (beyond ?? extra).range);
        use.broken = true;
        return zero;
      }
      if (!fit) {
        use.broken = true;
        return zero;
      }
      addFit(fits, fit.plan.name);
      if (isSe) return { kind: 'result', fit: fit.plan.name, of: 'stderr', name: member.name, range, ...at };
      if (fit.params.includes(member.name)) return { kind: 'result', fit: fit.plan.name, of: 'estimate', name: member.name, range, ...at };
      if (isStatistic(member.name)) return { kind: 'result', fit: fit.plan.name, of: 'statistic', name: member.name, range, ...at };
      env.r.report('unknown_target', MSG.unknownTarget(member.name, fit.plan.name), member.range, env.suggester.suggest(member.name, [...fit.params, ...STATISTICS]));
      use.broken = true;
      return zero;
    },
  };
}

/** Reports a derive name that is reserved or already names something; true when the name is usable. */
function checkName(env: Env, name: NameAst): boolean {
  const { r } = env;
  if (isBuiltinConstant(name.name)) {
    r.report('reserved_name', MSG.reservedName(name.name), name.range);
    return false;
  }
  const prev = env.derived.get(name.name);
  if (prev) {
    r.report('duplicate_name', MSG.duplicate('derived quantity', name.name, prev.line), name.range);
    return false;
  }
  const kinds = [['const', 'constant'], ['data', 'data table'], ['fit', 'fit']] as const;
  for (const [kind, what] of kinds) {
    const line = env.declared[kind].get(name.name);
    if (line !== undefined) {
      r.report('duplicate_name', MSG.deriveClash(name.name, what, line), name.range);
      return false;
    }
  }
  return true;
}

export function checkDerive(env: Env, s: DeriveAst): DerivedPlan | undefined {
  if (!s.name) return undefined;
  const name = s.name.name;
  const usable = checkName(env, s.name);
  const fits: string[] = [];
  const use = newUse();
  const scope: ExprScope = { params: new Set(), allowParams: false, place: 'derive', dataName: '', columns: undefined, derive: hooks(env, name, fits) };
  const expr = resolveExpr(env, s.expr, 'number', scope, use);
  // Registered even when broken (already reported), so later uses do not report it again.
  if (usable) env.derived.set(name, { line: s.name.range.start.line, fits });
  if (!usable || use.broken || s.expr.kind === 'error') return undefined;
  const plan: DerivedPlan = { name, expr, text: s.text, fits, range: s.range };
  if (s.unit) plan.unit = s.unit.text;
  return plan;
}
