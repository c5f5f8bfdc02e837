/**
 * Small pure helpers over plan expressions used by the runner: the columns an
 * expression reads, parameter substitution (fixed parameters become numbers),
 * holding parameters as pseudo-columns (for partial linearity tests), and a
 * compact text form for labels such as the response name.
 */
import type { Expr } from './plan';

/** Column names read by `expr`, in order of first appearance. */
export function columnsOf(expr: Expr | undefined, into: string[] = []): string[] {
  if (!expr) return into;
  switch (expr.kind) {
    case 'column':
      if (!into.includes(expr.name)) into.push(expr.name);
      break;
    case 'negate':
    case 'not':
      columnsOf(expr.arg, into);
      break;
    case 'binary':
    case 'compare':
    case 'logic':
      columnsOf(expr.left, into);
      columnsOf(expr.right, into);
      break;
    case 'call':
      for (const a of expr.args) columnsOf(a, into);
      break;
    case 'chain':
      for (const a of expr.args) columnsOf(a, into);
      break;
    default:
      break;
  }
  return into;
}

/** Maps every node bottom-up; `leaf` may replace leaf nodes (number, column, param, result, derived). */
export function mapLeaves(expr: Expr, leaf: (e: Expr) => Expr): Expr {
  switch (expr.kind) {
    case 'negate':
    case 'not':
      return { ...expr, arg: mapLeaves(expr.arg, leaf) };
    case 'binary':
    case 'compare':
    case 'logic':
      return { ...expr, left: mapLeaves(expr.left, leaf), right: mapLeaves(expr.right, leaf) } as Expr;
    case 'call':
      return { ...expr, args: expr.args.map((a) => mapLeaves(a, leaf)) };
    case 'chain':
      return { ...expr, args: expr.args.map((a) => mapLeaves(a, leaf)) };
    default:
      return leaf(expr);
  }
}

/** Replaces the named parameters by number nodes. */
export function substituteParams(expr: Expr, values: ReadonlyMap<string, number>): Expr {
  return mapLeaves(expr, (e) => (e.kind === 'param' && values.has(e.name) ? { kind: 'number', value: values.get(e.name)!, range: e.range } : e));
}

/** Prefix of pseudo-columns standing for held parameters (cannot clash with a CSV header, which holds no NUL). */
export const HELD_PREFIX = '\u0000held:';

/** Turns the named parameters into pseudo-columns, so a linearity test treats them as constants of unknown value. */
export function holdParams(expr: Expr, names: ReadonlySet<string>): Expr {
  return mapLeaves(expr, (e) => (e.kind === 'param' && names.has(e.name) ? { kind: 'column', name: HELD_PREFIX + e.name, range: e.range } : e));
}

/** Names of parameters read by `expr`. */
export function paramsOf(expr: Expr, into: Set<string> = new Set()): Set<string> {
  mapLeaves(expr, (e) => {
    if (e.kind === 'param') into.add(e.name);
    return e;
  });
  return into;
}

const PRECEDENCE: Record<string, number> = { or: 1, and: 2, compare: 3, '+': 4, '-': 4, '*': 5, '/': 5, negate: 6, '^': 7 };

/** Compact spec-like text of an expression, e.g. `ln(rate)` or `a + b * x`. */
export function exprText(expr: Expr): string {
  const wrap = (e: Expr, min: number): string => {
    const s = exprText(e);
    return precedence(e) < min ? `(${s})` : s;
  };
  switch (expr.kind) {
    case 'number':
      return String(expr.value);
    case 'column':
      return /^[A-Za-z_][A-Za-z0-9_]*$/.test(expr.name) ? expr.name : `"${expr.name}"`;
    case 'param':
      return expr.name;
    case 'text':
      return `"${expr.value}"`;
    case 'result':
      return `${expr.fit}${expr.group !== undefined ? `.${JSON.stringify(expr.group)}` : ''}.${expr.name}${expr.of === 'stderr' ? '.se' : ''}`;
    case 'derived':
      return expr.name;
    case 'negate':
      return `-${wrap(expr.arg, PRECEDENCE.negate)}`;
    case 'not':
      return `not ${wrap(expr.arg, PRECEDENCE.compare)}`;
    case 'call':
      return `${expr.fn}(${expr.args.map(exprText).join(', ')})`;
    case 'binary': {
      const p = PRECEDENCE[expr.op];
      const right = expr.op === '^' ? p : p + 1; // - and / are left-associative; ^ right-associative
      const left = expr.op === '^' ? p + 1 : p;
      return `${wrap(expr.left, left)} ${expr.op} ${wrap(expr.right, right)}`;
    }
    case 'compare':
      return `${wrap(expr.left, 4)} ${expr.op} ${wrap(expr.right, 4)}`;
    case 'logic':
      return `${wrap(expr.left, PRECEDENCE[expr.op])} ${expr.op} ${wrap(expr.right, PRECEDENCE[expr.op] + 1)}`;
    case 'chain': {
      const p = PRECEDENCE[expr.ops[0]];
      return expr.ops.reduce((acc, op, i) => `${acc} ${op} ${wrap(expr.args[i + 1], p + 1)}`, wrap(expr.args[0], p));
    }
  }
}

function precedence(e: Expr): number {
  switch (e.kind) {
    case 'binary':
      return PRECEDENCE[e.op];
    case 'negate':
      return PRECEDENCE.negate;
    case 'compare':
    case 'not':
      return PRECEDENCE.compare;
    case 'logic':
      return PRECEDENCE[e.op];
    case 'chain':
      return PRECEDENCE[e.ops[0]];
    default:
      return 10;
  }
}

/**
 * Whether a fit gives one result per group: `per COLUMN` (one per value of the column) or several tables
 * (`fit NAME on A, B, …`, one per table, its label the table's name). The checker and the engine share it.
 */
export function fitHasGroups(fit: { groupBy?: string; blocks: readonly unknown[] }): boolean {
  return fit.groupBy !== undefined || fit.blocks.length > 1;
}

/**
 * What a fit's groups are, as a key two fits compare equal on when they have the same groups: the grouping
 * column of one table (`column`), the list of tables (`tables`), or none. Used by `compare` (parser/check-queries.ts,
 * engine/run/compare-groups.ts).
 */
export function groupingOf(fit: { groupBy?: string; blocks: readonly { data: string }[] }): { kind: 'none' } | { kind: 'column'; data: string; column: string } | { kind: 'tables'; tables: string[] } {
  if (fit.groupBy !== undefined) return { kind: 'column', data: fit.blocks[0]?.data ?? '', column: fit.groupBy };
  if (fit.blocks.length > 1) return { kind: 'tables', tables: fit.blocks.map((b) => b.data) };
  return { kind: 'none' };
}

/** The same groups (see `groupingOf`). */
export function sameGrouping(a: ReturnType<typeof groupingOf>, b: ReturnType<typeof groupingOf>): boolean {
  return JSON.stringify(a) === JSON.stringify(b);
}
