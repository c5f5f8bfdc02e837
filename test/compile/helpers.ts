/**
 * Test helpers for the compiler: Expr builders and an independent
 * tree-walking interpreter (the oracle for generated code).
 */
import type { Expr, BinaryOp, CompareOp, FunctionName } from '../../parser/plan';
import { erf, erfc } from '../../engine/compile/special';

export const num = (value: number): Expr => ({ kind: 'number', value });
export const par = (name: string): Expr => ({ kind: 'param', name });
export const col = (name: string): Expr => ({ kind: 'column', name });
export const bin = (op: BinaryOp, left: Expr, right: Expr): Expr => ({ kind: 'binary', op, left, right });
export const call = (fn: FunctionName, ...args: Expr[]): Expr => ({ kind: 'call', fn, args });
export const neg = (arg: Expr): Expr => ({ kind: 'negate', arg });
export const cmp = (op: CompareOp, left: Expr, right: Expr): Expr => ({ kind: 'compare', op, left, right });

/** The oracle's own implementations (Math and special.ts), one per registry function but `when`: a function missing here does not compile. */
const FN: Record<Exclude<FunctionName, 'when'>, (...a: number[]) => number> = {
  exp: Math.exp, ln: Math.log, log10: Math.log10, sqrt: Math.sqrt, abs: Math.abs,
  sin: Math.sin, cos: Math.cos, tan: Math.tan, asin: Math.asin, acos: Math.acos, atan: Math.atan, atan2: Math.atan2,
  sinh: Math.sinh, cosh: Math.cosh, tanh: Math.tanh, erf, erfc, min: Math.min, max: Math.max, pow: Math.pow, hypot: Math.hypot,
};

/** Direct evaluation of `e` with parameter and column values looked up by name. */
export function interpret(e: Expr, params: Map<string, number>, cols: Map<string, number>): number {
  const ev = (x: Expr) => interpret(x, params, cols);
  switch (e.kind) {
    case 'number': return e.value;
    case 'param': return params.get(e.name)!;
    case 'column': return cols.get(e.name)!;
    case 'negate': return -ev(e.arg);
    case 'binary': {
      const a = ev(e.left);
      const b = ev(e.right);
      switch (e.op) {
        case '+': return a + b;
        case '-': return a - b;
        case '*': return a * b;
        case '/': return a / b;
        case '^': return Math.pow(a, b);
      }
      break;
    }
    case 'compare': {
      const a = ev(e.left);
      const b = ev(e.right);
      const r = { '<': a < b, '<=': a <= b, '>': a > b, '>=': a >= b, '==': a === b, '!=': a !== b }[e.op];
      return r ? 1 : 0;
    }
    case 'logic': {
      const a = ev(e.left);
      const b = ev(e.right);
      return (e.op === 'and' ? a && b : a || b) ? 1 : 0;
    }
    case 'not': return ev(e.arg) ? 0 : 1;
    case 'chain': {
      let acc = ev(e.args[0]);
      e.ops.forEach((op, i) => {
        const b = ev(e.args[i + 1]);
        acc = op === '+' ? acc + b : op === '-' ? acc - b : op === '*' ? acc * b : op === '/' ? acc / b : (op === 'and' ? acc && b : acc || b) ? 1 : 0;
      });
      return acc;
    }
    case 'call': {
      if (e.fn === 'when') return ev(e.args[0]) ? ev(e.args[1]) : ev(e.args[2]);
      return FN[e.fn](...e.args.map(ev));
    }
  }
  throw new Error('unknown node');
}
