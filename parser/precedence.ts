/**
 * Expression precedence. The grammar reads an expression flat, as
 * `operand (operator operand)*` with prefix `-`, `+`, `not` on operands; this
 * module builds the tree with an explicit operator stack (Dijkstra's
 * shunting-yard algorithm, 1961, with the binding powers of Pratt's "Top down
 * operator precedence", POPL 1973), so no input makes it recurse.
 *
 * Operators of one left-associative level in a row (`a - b + c`, `a * b / c`,
 * `p and q and r`) become one flat `chain` node (three or more operands), so a
 * long sum is one level deep for every later walk. Every other operator adds a
 * level; an expression deeper than `MAX_NESTING` is reported at the operator
 * that goes one level too deep and read as an `error` node.
 */
import type { ExprAst } from './ast';
import type { BinaryOp, ChainOp, CompareOp, LogicOp, Range } from './plan';
import { cover } from './cst-util';
import { MAX_NESTING } from './limits';

export type PrefixOp = '-' | '+' | 'not';
export type Item = { prefix: PrefixOp; range: Range } | { atom: ExprAst; depth: number } | { op: string; range: Range };

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
const CHAIN_OPS = new Set(['+', '-', '*', '/', 'and', 'or']);

const bindingOf = (op: string): readonly [number, number] =>
  Object.prototype.hasOwnProperty.call(BINDING, op) ? BINDING[op] : BINDING['+'];

/** A built subtree and its nesting depth (leaves 0). */
interface Built {
  node: ExprAst;
  depth: number;
}

type Pending = { kind: 'prefix'; op: PrefixOp; range: Range; rbp: number } | { kind: 'binary'; op: string; range: Range; rbp: number };

export interface ClimbResult {
  expr: ExprAst;
  depth: number;
}

/**
 * Builds the tree of one flat expression. `fallback` is the error node for a
 * missing operand at the end; `tooDeep(range)` is called once, with the
 * operator that exceeds `MAX_NESTING`, and the whole expression then reads as
 * an error node.
 */
export function climb(items: readonly Item[], fallback: ExprAst, tooDeep: (range: Range) => void): ClimbResult {
  const out: Built[] = [];
  const ops: Pending[] = [];
  /** Chains and two-operand nodes built here (those may grow into a chain; a parenthesised one may not). */
  const fresh = new WeakSet<ExprAst>();
  let exceeded: Range | undefined;

  const reduce = (p: Pending): void => {
    if (p.kind === 'prefix') {
      const arg = out.pop() ?? { node: fallback, depth: 0 };
      const range = cover(p.range, arg.node.range);
      const node: ExprAst = p.op === 'not' ? { kind: 'not', arg: arg.node, range } : { kind: 'unary', op: p.op, arg: arg.node, range };
      push(node, arg.depth + 1, p.range);
      return;
    }
    const right = out.pop() ?? { node: fallback, depth: 0 };
    const left = out.pop() ?? { node: fallback, depth: 0 };
    const range = cover(left.node.range, right.node.range);
    const op = p.op;
    const l = left.node;
    if (CHAIN_OPS.has(op) && fresh.has(l)) {
      const level = bindingOf(op)[0];
      if (l.kind === 'chain' && bindingOf(l.ops[0])[0] === level) {
        l.ops.push(op as ChainOp);
        l.args.push(right.node);
        l.range = range;
        push(l, Math.max(left.depth, right.depth + 1), p.range);
        return;
      }
      if ((l.kind === 'binary' || l.kind === 'logic') && bindingOf(l.op)[0] === level) {
        const chain: ExprAst = { kind: 'chain', ops: [l.op as ChainOp, op as ChainOp], args: [l.left, l.right, right.node], range };
        push(chain, Math.max(left.depth, right.depth + 1), p.range);
        return;
      }
    }
    const depth = Math.max(left.depth, right.depth) + 1;
    let node: ExprAst;
    if (op === 'and' || op === 'or') node = { kind: 'logic', op: op as LogicOp, left: l, right: right.node, range };
    else if (COMPARE_OPS.has(op)) node = { kind: 'compare', op: op as CompareOp, left: l, right: right.node, range };
    else node = { kind: 'binary', op: op as BinaryOp, left: l, right: right.node, range };
    push(node, depth, p.range);
  };

  const push = (node: ExprAst, depth: number, at: Range): void => {
    if (depth > MAX_NESTING && !exceeded) exceeded = at;
    fresh.add(node);
    out.push({ node, depth });
  };

  let expectOperand = true;
  for (const it of items) {
    if (exceeded) break;
    if ('prefix' in it) {
      if (!expectOperand) break; // an operand where an operator belongs: the rest was already reported by the parser
      ops.push({ kind: 'prefix', op: it.prefix, range: it.range, rbp: it.prefix === 'not' ? NOT_OPERAND : SIGN_OPERAND });
    } else if ('atom' in it) {
      if (!expectOperand) break;
      out.push({ node: it.atom, depth: it.depth });
      expectOperand = false;
    } else {
      if (expectOperand) {
        out.push({ node: { kind: 'error', range: it.range }, depth: 0 });
        expectOperand = false;
      }
      const [lbp, rbp] = bindingOf(it.op);
      while (ops.length > 0 && lbp < ops[ops.length - 1].rbp && !exceeded) reduce(ops.pop()!);
      ops.push({ kind: 'binary', op: it.op, range: it.range, rbp });
      expectOperand = true;
    }
  }
  if (expectOperand && !exceeded) out.push({ node: fallback, depth: 0 });
  while (ops.length > 0 && !exceeded) reduce(ops.pop()!);
  if (exceeded) {
    tooDeep(exceeded);
    const ranges = items.map((it) => ('atom' in it ? it.atom.range : it.range));
    return { expr: { kind: 'error', range: coverAll(ranges, fallback.range) }, depth: 0 };
  }
  const top = out[out.length - 1] ?? { node: fallback, depth: 0 };
  return { expr: out.length === 1 ? top.node : out[0].node, depth: out.length === 1 ? top.depth : out[0].depth };
}

/** The range from the first to the last of `ranges` (in text order), or `fallback` when there are none. */
function coverAll(ranges: readonly Range[], fallback: Range): Range {
  return ranges.length ? cover(ranges[0], ranges[ranges.length - 1]) : fallback;
}
