/**
 * Expression precedence. The grammar reads an expression flat, as
 * `operand (operator operand)*` with prefix `-`, `+`, `not` on operands; this
 * module builds the tree by precedence climbing (Pratt, "Top down operator
 * precedence", POPL 1973).
 */
import type { ExprAst } from './ast';
import type { BinaryOp, CompareOp, Range } from './plan';
import { cover } from './cst-util';

export type PrefixOp = '-' | '+' | 'not';
export type Item = { prefix: PrefixOp; range: Range } | { atom: ExprAst } | { op: string; range: Range };

/**
 * Binding powers [left, right] of binary operators, loosest first:
 * or < and < comparison < + - < * / < ^. Left-associative operators use
 * right = left + 1; `^` is right-associative (right = left). Prefix operands
 * are read at `NOT_OPERAND` (not x < 1 = not (x < 1)) and `SIGN_OPERAND`
 * (-x^2 = -(x^2), -x*y = (-x)*y).
 */
const BINDING: Readonly<Record<string, readonly [number, number]>> = {
  or: [1, 2], and: [2, 3],
  '<': [4, 5], '<=': [4, 5], '>': [4, 5], '>=': [4, 5], '==': [4, 5], '!=': [4, 5],
  '+': [5, 6], '-': [5, 6], '*': [6, 7], '/': [6, 7], '^': [8, 8],
};
const NOT_OPERAND = 3;
const SIGN_OPERAND = 7;
const COMPARE_OPS = new Set(['<', '<=', '>', '>=', '==', '!=']);

export function climb(items: Item[], fallback: ExprAst): ExprAst {
  let pos = 0;
  const operand = (): ExprAst => {
    const it = items[pos];
    if (!it || 'op' in it) return { kind: 'error', range: it ? it.range : fallback.range };
    pos++;
    if ('atom' in it) return it.atom;
    if (it.prefix === 'not') {
      const arg = parse(NOT_OPERAND);
      return { kind: 'not', arg, range: cover(it.range, arg.range) };
    }
    const arg = parse(SIGN_OPERAND);
    return { kind: 'unary', op: it.prefix, arg, range: cover(it.range, arg.range) };
  };
  const parse = (minBp: number): ExprAst => {
    let left = operand();
    for (;;) {
      const it = items[pos];
      if (!it || !('op' in it)) return left;
      const bp = Object.prototype.hasOwnProperty.call(BINDING, it.op) ? BINDING[it.op] : BINDING['+'];
      if (bp[0] < minBp) return left;
      pos++;
      const right = parse(bp[1]);
      const range = cover(left.range, right.range);
      const op = it.op;
      if (op === 'and' || op === 'or') left = { kind: 'logic', op, left, right, range };
      else if (COMPARE_OPS.has(op)) left = { kind: 'compare', op: op as CompareOp, left, right, range };
      else left = { kind: 'binary', op: op as BinaryOp, left, right, range };
    }
  };
  return parse(0);
}
