/**
 * Name resolution and typing of expressions and single values.
 *
 * An identifier in an expression resolves, in this order, to: a parameter of
 * the fit, a constant declared above, `pi`/`e`, a column. With headers known
 * a name that is none of these is an error ('undefined_name' with
 * suggestions); with headers unknown it is taken as a column. Quoted names
 * are columns, with one exception: in a `where` condition (scope `allowText`)
 * a quoted item that is an operand of `==`/`!=` whose other operand is a
 * column is a text value when no column has its name (`compound == "CPD-A"`),
 * an error (`text_or_column`) when one has, and a text value when the
 * headers are unknown (`textOperand`). Constants fold into number nodes.
 *
 * Conditions (comparisons, and/or/not) may appear only in `where` and as the
 * first argument of `when`; everywhere else expressions are numbers.
 */
import type { ExprAst, NameAst, ValueAst } from './ast';
import type { Expr, Range } from './plan';
import { FUNCTIONS, FUNCTION_HINTS, FUNCTION_NAMES, isFunctionName } from './registry/functions';
import { BUILTIN_CONSTANT_NAMES, BUILTIN_CONSTANTS, isBuiltinConstant, type Env } from './check-env';
import { MSG } from './messages';

export interface ExprScope {
  /** Parameters of the fit (empty outside fits). */
  params: ReadonlySet<string>;
  /** Parameters may appear here (model side only). */
  allowParams: boolean;
  /** Where we are, for 'param_not_allowed' messages ("response", "sigma"...). */
  place: string;
  /** Data source whose columns are read. */
  dataName: string;
  columns: ReadonlySet<string> | undefined;
  /** Text values may be compared with columns here (a data source's `where` condition). Default false. */
  allowText?: boolean;
  /**
   * Present in a `derive` expression (hooks in check-derive.ts): plain names
   * and `FIT.NAME` resolve there. Absent elsewhere, where `FIT.NAME` is an error.
   */
  derive?: DeriveHooks;
}

export interface DeriveHooks {
  name(name: string, quoted: boolean, range: Range, use: ExprUse): Expr;
  dotted(head: NameAst, members: NameAst[], range: Range, use: ExprUse): Expr;
}

/** What an expression read. */
export interface ExprUse {
  columns: string[];
  params: Set<string>;
  /** Contains a piece the parser could not read. */
  broken: boolean;
  /**
   * Names reported as unknown (headers known, the name none of a parameter,
   * constant or column). Still listed in `columns`, so the plan keeps its
   * shape, but later checks must not take them for real columns: a query
   * naming the real column is not told to follow the misspelling.
   */
  unresolved: string[];
}

export const newUse = (): ExprUse => ({ columns: [], params: new Set(), broken: false, unresolved: [] });

const isLogicChain = (e: ExprAst): boolean => e.kind === 'chain' && (e.ops[0] === 'and' || e.ops[0] === 'or');
const isCondition = (e: ExprAst): boolean => e.kind === 'compare' || e.kind === 'logic' || e.kind === 'not' || isLogicChain(e);

export function resolveExpr(env: Env, ast: ExprAst, want: 'number' | 'condition', scope: ExprScope, use: ExprUse): Expr {
  if (ast.kind !== 'error') {
    if (want === 'number' && isCondition(ast)) env.r.report('number_expected', MSG.numberExpected, ast.range);
    if (want === 'condition' && !isCondition(ast)) env.r.report('condition_expected', MSG.conditionExpected, ast.range);
  }
  const num = (e: ExprAst) => resolveExpr(env, e, 'number', scope, use);
  const cond = (e: ExprAst) => resolveExpr(env, e, 'condition', scope, use);
  const range = ast.range;
  switch (ast.kind) {
    case 'error':
      use.broken = true;
      return { kind: 'number', value: 0, range };
    case 'number':
      if (!Number.isFinite(ast.value)) env.r.report('number_range', MSG.numberRange(String(ast.value)), range);
      return { kind: 'number', value: Number.isFinite(ast.value) ? ast.value : 0, range };
    case 'name':
      return scope.derive ? scope.derive.name(ast.name, ast.quoted, range, use) : resolveName(env, ast.name, ast.quoted, range, scope, use);
    case 'dotted':
      if (scope.derive) return scope.derive.dotted(ast.head, ast.members, range, use);
      env.r.report('reference_not_allowed', MSG.referenceNotAllowed([ast.head, ...ast.members].map((m) => m.name).join('.')), range);
      use.broken = true;
      return { kind: 'number', value: 0, range };
    case 'call':
      return resolveCall(env, ast, scope, use);
    case 'unary': {
      const arg = num(ast.arg);
      if (ast.op === '+') return { ...arg, range };
      if (arg.kind === 'number') return { kind: 'number', value: -arg.value, range };
      return { kind: 'negate', arg, range };
    }
    case 'binary':
      return { kind: 'binary', op: ast.op, left: num(ast.left), right: num(ast.right), range };
    case 'compare': {
      if (ast.op === '==' || ast.op === '!=') {
        const text = textOperand(env, ast.left, ast.right, scope, 'left') ?? textOperand(env, ast.right, ast.left, scope, 'right');
        if (text) {
          const textSide = text.side === 'left' ? ast.left : ast.right;
          const columnSide = num(text.side === 'left' ? ast.right : ast.left);
          const value: Expr = { kind: 'text', value: text.value, range: textSide.range };
          return text.side === 'left'
            ? { kind: 'compare', op: ast.op, left: value, right: columnSide, range }
            : { kind: 'compare', op: ast.op, left: columnSide, right: value, range };
        }
      }
      return { kind: 'compare', op: ast.op, left: num(ast.left), right: num(ast.right), range };
    }
    case 'logic':
      return { kind: 'logic', op: ast.op, left: cond(ast.left), right: cond(ast.right), range };
    case 'not':
      return { kind: 'not', arg: cond(ast.arg), range };
    case 'chain': {
      const each = isLogicChain(ast) ? cond : num;
      const args: Expr[] = [];
      for (const a of ast.args) args.push(each(a));
      return { kind: 'chain', ops: [...ast.ops], args, range };
    }
  }
}

/** A plain or quoted name that resolves to a column here (not a parameter or constant). */
function isColumnOperand(env: Env, e: ExprAst, scope: ExprScope): boolean {
  if (e.kind !== 'name') return false;
  if (!e.quoted && (scope.params.has(e.name) || env.consts.has(e.name) || isBuiltinConstant(e.name))) return false;
  return scope.columns ? scope.columns.has(e.name) : true;
}

/**
 * Whether `candidate` is a text value compared with the column `other` (module
 * comment): its text and side, or undefined (then both are resolved as
 * usual). An ambiguous or misplaced one is reported here and read as text, so
 * the same problem is not reported again as an unknown column.
 */
function textOperand(env: Env, candidate: ExprAst, other: ExprAst, scope: ExprScope, side: 'left' | 'right'): { value: string; side: 'left' | 'right' } | undefined {
  if (candidate.kind !== 'name' || !candidate.quoted) return undefined;
  const names = scope.columns;
  const isColumn = names ? names.has(candidate.name) : false;
  const otherIsColumn = isColumnOperand(env, other, scope) && !(other.kind === 'name' && other.quoted && names === undefined);
  if (!otherIsColumn) {
    if (names && !isColumn && !scope.derive) {
      // "CPD-A" compared with a number or a parameter: not a column, and text has no meaning there
      env.r.report('text_not_allowed', MSG.textNotAllowed(candidate.name), candidate.range);
      return { value: candidate.name, side };
    }
    return undefined;
  }
  if (!scope.allowText) {
    if (names && !isColumn) {
      env.r.report('text_not_allowed', MSG.textNotAllowed(candidate.name), candidate.range);
      return { value: candidate.name, side };
    }
    return undefined;
  }
  if (isColumn) {
    const column = other.kind === 'name' ? other.name : '';
    env.r.report('text_or_column', MSG.textOrColumn(candidate.name, column, scope.dataName), candidate.range);
    return { value: candidate.name, side };
  }
  return { value: candidate.name, side };
}

function addColumn(use: ExprUse, name: string): void {
  if (!use.columns.includes(name)) use.columns.push(name);
}

function resolveName(env: Env, name: string, quoted: boolean, range: Range, scope: ExprScope, use: ExprUse): Expr {
  if (!quoted) {
    if (scope.params.has(name)) {
      if (!scope.allowParams) env.r.report('param_not_allowed', MSG.paramNotAllowed(name, scope.place), range);
      use.params.add(name);
      return { kind: 'param', name, range };
    }
    const c = env.consts.get(name);
    if (c) return { kind: 'number', value: c.value, range };
    if (isBuiltinConstant(name)) return { kind: 'number', value: BUILTIN_CONSTANTS[name], range };
    const later = env.declared.const.get(name);
    if (later !== undefined && later > range.start.line && !(scope.columns?.has(name) ?? false)) {
      env.r.report('declared_later', MSG.declaredLater('constant', name, later), range);
      return { kind: 'number', value: 0, range };
    }
  }
  if (scope.columns && !scope.columns.has(name)) {
    if (quoted) {
      env.r.report('unknown_column', MSG.unknownColumn(name, scope.dataName), range, env.suggester.suggest(name, scope.columns));
    } else {
      const candidates = [scope.allowParams ? scope.params : [], env.consts.keys(), scope.columns, BUILTIN_CONSTANT_NAMES];
      env.r.report('undefined_name', MSG.undefinedName(name), range, env.suggester.suggest(name, candidates));
    }
    if (!use.unresolved.includes(name)) use.unresolved.push(name);
  }
  addColumn(use, name);
  return { kind: 'column', name, range };
}

function resolveCall(env: Env, ast: Extract<ExprAst, { kind: 'call' }>, scope: ExprScope, use: ExprUse): Expr {
  const { fn, args, range } = ast;
  if (!isFunctionName(fn)) {
    // common spellings of other notations (registry `hints`) whose edit distance is too large for `suggest`
    const hint = FUNCTION_HINTS.get(fn) ?? env.suggester.suggest(fn, FUNCTION_NAMES);
    env.r.report('unknown_function', MSG.unknownFunction(fn), ast.fnRange, hint);
    for (const a of args) resolveExpr(env, a, 'number', scope, use);
    return { kind: 'number', value: 0, range };
  }
  const arity = FUNCTIONS[fn];
  if (args.length !== arity && !args.some((a) => a.kind === 'error')) {
    env.r.report('arity', MSG.arity(fn, arity, args.length), range);
  }
  const resolved = args.map((a, i) => resolveExpr(env, a, fn === 'when' && i === 0 ? 'condition' : 'number', scope, use));
  return { kind: 'call', fn, args: resolved, range };
}

export interface ValueRules {
  /** `inf` allowed (parameter bounds only). */
  allowInf: boolean;
}

/**
 * A single number written in a statement: literal, `inf`, or a constant
 * name (declared above, or `pi`/`e`), with optional sign. `undefined` when
 * it could not be read (already reported).
 */
export function resolveValue(env: Env, v: ValueAst, rules: ValueRules): number | undefined {
  switch (v.kind) {
    case 'error':
      return undefined;
    case 'number':
      if (!Number.isFinite(v.value)) {
        env.r.report('number_range', MSG.numberRange(String(Math.abs(v.value))), v.range);
        return undefined;
      }
      return v.value;
    case 'inf':
      if (!rules.allowInf) {
        env.r.report('inf_not_allowed', MSG.infNotAllowed, v.range);
        return undefined;
      }
      return v.negative ? -Infinity : Infinity;
    case 'name': {
      const sign = v.negative ? -1 : 1;
      const c = env.consts.get(v.name);
      if (c) return sign * c.value;
      if (isBuiltinConstant(v.name)) return sign * BUILTIN_CONSTANTS[v.name];
      const later = env.declared.const.get(v.name);
      if (later !== undefined && later > v.range.start.line) {
        env.r.report('declared_later', MSG.declaredLater('constant', v.name, later), v.range);
      } else {
        const candidates = [...env.consts.keys(), ...Object.keys(BUILTIN_CONSTANTS), ...(rules.allowInf ? ['inf'] : [])];
        env.r.report('undefined_name', MSG.notAConstant(v.name), v.range, env.suggester.suggest(v.name, candidates));
      }
      return undefined;
    }
  }
}

/** Text of a value as written (for messages and expectation text). */
export function valueText(v: ValueAst): string {
  switch (v.kind) {
    case 'number': return String(v.value);
    case 'inf': return v.negative ? '-inf' : 'inf';
    case 'name': return (v.negative ? '-' : '') + v.name;
    case 'error': return '?';
  }
}
