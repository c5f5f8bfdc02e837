/**
 * Lowering of a resolved plan `Expr` into the expression graph. This is the
 * whitelist gate of code generation: only the node kinds, operators and
 * function names of `parser/plan.ts` are accepted; parameter and column names
 * are looked up (with `Map`, never object properties) and replaced by slot
 * numbers; numbers must be finite. Anything else throws a `CompileError`,
 * which the runner turns into a located diagnostic.
 *
 * Recursion follows the nesting of the expression (a `chain` is folded in a
 * loop, so a long sum costs no depth). The checker bounds nesting at
 * `MAX_NESTING`; expressions built later (derived quantities expanded into
 * each other) can nest deeper, so lowering stops with a `CompileError` at
 * `MAX_LOWER_DEPTH` instead of exhausting the call stack.
 */
import type { Expr, Range } from '../../parser/plan';
import { FUNCTIONS, isFunctionName } from '../../parser/registry/functions';
import { MAX_NESTING } from '../../parser/limits';
import { Graph, type UnaryFn, type BinaryFn } from './graph';
import { FUNCTION_RULES } from './functions';

export class CompileError extends Error {
  constructor(message: string, readonly range?: Range) {
    super(message);
    this.name = 'CompileError';
  }
}

const BINARY_OPS: ReadonlySet<string> = new Set(['+', '-', '*', '/', '^']);
const COMPARE_OPS: ReadonlySet<string> = new Set(['<', '<=', '>', '>=', '==', '!=']);

/**
 * Deepest expression lowered. Four times the spec's own limit
 * (parser/limits.ts `MAX_NESTING`), so every checked expression lowers, and
 * far below the stack: lowering costs two frames per level.
 */
export const MAX_LOWER_DEPTH = 4 * MAX_NESTING;

export function slotMap(names: readonly string[], what: string): Map<string, number> {
  const m = new Map<string, number>();
  names.forEach((name, i) => {
    if (typeof name !== 'string') throw new CompileError(`${what} names must be strings`);
    if (m.has(name)) throw new CompileError(`duplicate ${what} name`);
    m.set(name, i);
  });
  return m;
}

export interface LowerScope {
  params: Map<string, number> | null;
  columns: Map<string, number>;
  /** Give unknown column names new slots instead of failing (linearity test only). */
  autoColumns?: boolean;
}

/** Lower `e` into `g`; returns the root node id. */
export function lower(g: Graph, e: Expr, scope: LowerScope, depth = 0): number {
  const rec = (x: Expr): number => lower(g, x, scope, depth + 1);
  if (e === null || typeof e !== 'object') throw new CompileError('malformed expression');
  if (depth > MAX_LOWER_DEPTH) throw new CompileError(`expression nested too deeply (limit ${MAX_LOWER_DEPTH} levels)`, e.range);
  switch (e.kind) {
    case 'number':
      if (typeof e.value !== 'number' || !Number.isFinite(e.value)) throw new CompileError('number is not finite', e.range);
      return g.constant(e.value);
    case 'param': {
      const k = scope.params?.get(e.name);
      if (k === undefined) throw new CompileError(scope.params ? 'unknown parameter' : 'parameters are not allowed here', e.range);
      return g.paramRef(k);
    }
    case 'column': {
      let k = scope.columns.get(e.name);
      if (k === undefined && scope.autoColumns && typeof e.name === 'string') {
        k = scope.columns.size;
        scope.columns.set(e.name, k);
      }
      if (k === undefined) throw new CompileError('unknown column', e.range);
      return g.column(k);
    }
    case 'negate':
      return g.neg(rec(e.arg));
    case 'binary': {
      if (!BINARY_OPS.has(e.op)) throw new CompileError('unknown operator', e.range);
      const a = rec(e.left);
      const b = rec(e.right);
      switch (e.op) {
        case '+': return g.add(a, b);
        case '-': return g.sub(a, b);
        case '*': return g.mul(a, b);
        case '/': return g.div(a, b);
        case '^': return g.pow(a, b);
      }
      break;
    }
    case 'compare':
      if (!COMPARE_OPS.has(e.op)) throw new CompileError('unknown comparison', e.range);
      return g.compare(e.op, rec(e.left), rec(e.right));
    case 'logic':
      if (e.op === 'and') return g.and(rec(e.left), rec(e.right));
      if (e.op === 'or') return g.or(rec(e.left), rec(e.right));
      throw new CompileError('unknown logical operator', e.range);
    case 'not':
      return g.not(rec(e.arg));
    case 'chain': {
      // Folded left to right: the same graph as the nested binary operations it stands for.
      if (!Array.isArray(e.args) || !Array.isArray(e.ops) || e.args.length !== e.ops.length + 1 || e.args.length < 2) {
        throw new CompileError('malformed operator chain', e.range);
      }
      let acc = rec(e.args[0]);
      for (let i = 0; i < e.ops.length; i++) {
        const b = rec(e.args[i + 1]);
        switch (e.ops[i]) {
          case '+': acc = g.add(acc, b); break;
          case '-': acc = g.sub(acc, b); break;
          case '*': acc = g.mul(acc, b); break;
          case '/': acc = g.div(acc, b); break;
          case 'and': acc = g.and(acc, b); break;
          case 'or': acc = g.or(acc, b); break;
          default: throw new CompileError('unknown operator', e.range);
        }
      }
      return acc;
    }
    case 'call': {
      const fn: string = e.fn;
      if (!isFunctionName(fn)) throw new CompileError('unknown function', e.range);
      const arity = FUNCTIONS[fn];
      if (!Array.isArray(e.args) || e.args.length !== arity) throw new CompileError(`${fn} takes ${arity} argument(s)`, e.range);
      const args = e.args.map(rec);
      switch (FUNCTION_RULES[fn].kind) {
        case 'power': return g.pow(args[0], args[1]);
        case 'when': return g.when(args[0], args[1], args[2]);
        case 'unary': return g.fn1(fn as UnaryFn, args[0]);
        case 'binary': return g.fn2(fn as BinaryFn, args[0], args[1]);
      }
      throw new CompileError('unknown function', e.range);
    }
  }
  throw new CompileError('unknown expression kind');
}
