/**
 * Expression graph for code generation: a hash-consed DAG whose smart
 * constructors simplify as they build. Identical subexpressions get one node
 * (so the value and all derivatives share work), and every node records
 * whether it depends on the data row (`row`) or on the parameters (`param`),
 * which drives loop-invariant hoisting and the linearity test.
 *
 * Leaves carry only numbers: a parameter is a slot index into θ, a column a
 * slot index into the column array. Names never enter the graph.
 *
 * Simplifications (applied at construction, each exact in IEEE arithmetic
 * for finite operands, except where noted):
 *   folding of operations on constants when the result is finite;
 *   x+0 → x, 0+x → x, x−0 → x, 0−x → −x, x−x → 0 (†), x+(−y) → x−y;
 *   1·x → x, 0·x → 0 (†), (−1)·x → −x, (−a)·b → −(a·b), a·(−b) → −(a·b),
 *   c₁·(c₂·x) → (c₁c₂)·x; x/1 → x, 0/x → 0 (†), x/(−1) → −x, (−a)/b → −(a/b),
 *   a/(−b) → −(a/b), (−c)/b → −(c/b) for a constant c > 0 (so −1/b shares 1/b); −(−x) → x;
 *   x^1 → x, x^0 → 1, 1^x → 1; when(c, a, a) → a; when(constant, a, b) → a or b;
 *   mulz (the strong-zero product of derivative rules, see `mulz`) becomes a
 *   plain product when either factor is a constant.
 * (†) these assume the other operand is finite, as usual for symbolic
 * differentiation; a non-finite value still shows in the model value itself.
 */
import type { CompareOp } from '../../parser/plan';
import { BINARY_RULES, UNARY_RULES, type BinaryFn, type UnaryFn } from './functions';

export type { BinaryFn, UnaryFn } from './functions';

export type Node =
  | { op: 'const'; value: number }
  | { op: 'param'; index: number }
  | { op: 'col'; index: number }
  | { op: 'add' | 'sub' | 'mul' | 'mulz' | 'div' | 'pow' | 'and' | 'or'; a: number; b: number }
  | { op: 'neg' | 'not'; a: number }
  | { op: 'fn1'; fn: UnaryFn; a: number }
  | { op: 'fn2'; fn: BinaryFn; a: number; b: number }
  | { op: 'cmp'; cmp: CompareOp; a: number; b: number }
  | { op: 'when'; c: number; a: number; b: number };

/** Double-precision implementations shared by constant folding and generated code (from functions.ts). */
export const UNARY_IMPL: Readonly<Record<UnaryFn, (x: number) => number>> = Object.freeze(
  Object.fromEntries(Object.entries(UNARY_RULES).map(([f, r]) => [f, r.value])) as Record<UnaryFn, (x: number) => number>,
);
export const BINARY_IMPL: Readonly<Record<BinaryFn, (x: number, y: number) => number>> = Object.freeze(
  Object.fromEntries(Object.entries(BINARY_RULES).map(([f, r]) => [f, r.value])) as Record<BinaryFn, (x: number, y: number) => number>,
);

export function compareValues(op: CompareOp, x: number, y: number): boolean {
  switch (op) {
    case '<': return x < y;
    case '<=': return x <= y;
    case '>': return x > y;
    case '>=': return x >= y;
    case '==': return x === y;
    case '!=': return x !== y;
  }
}

export class Graph {
  readonly nodes: Node[] = [];
  /** Node depends on the data row (reads a column). */
  readonly row: boolean[] = [];
  /** Node depends on at least one parameter. */
  readonly param: boolean[] = [];
  private readonly index = new Map<string, number>();

  private intern(key: string, node: Node, row: boolean, param: boolean): number {
    const found = this.index.get(key);
    if (found !== undefined) return found;
    const id = this.nodes.length;
    this.nodes.push(node);
    this.row.push(row);
    this.param.push(param);
    this.index.set(key, id);
    return id;
  }

  /** The constant value of node `id`, or undefined when it is not a constant. */
  constOf(id: number): number | undefined {
    const n = this.nodes[id];
    return n.op === 'const' ? n.value : undefined;
  }

  isConst(id: number, v: number): boolean {
    return this.constOf(id) === v;
  }

  constant(value: number): number {
    if (!Number.isFinite(value)) throw new RangeError('graph constants must be finite');
    const key = Object.is(value, -0) ? 'k:-0' : `k:${value}`;
    return this.intern(key, { op: 'const', value }, false, false);
  }

  paramRef(index: number): number {
    return this.intern(`p:${index}`, { op: 'param', index }, false, true);
  }

  column(index: number): number {
    return this.intern(`c:${index}`, { op: 'col', index }, true, false);
  }

  private node2(op: 'add' | 'sub' | 'mul' | 'mulz' | 'div' | 'pow' | 'and' | 'or', a: number, b: number): number {
    return this.intern(`${op}:${a},${b}`, { op, a, b }, this.row[a] || this.row[b], this.param[a] || this.param[b]);
  }

  /** Fold when every operand is constant and the result is finite. */
  private fold(ids: number[], f: (...xs: number[]) => number): number | undefined {
    const xs: number[] = [];
    for (const id of ids) {
      const v = this.constOf(id);
      if (v === undefined) return undefined;
      xs.push(v);
    }
    const r = f(...xs);
    return Number.isFinite(r) ? this.constant(r) : undefined;
  }

  add(a: number, b: number): number {
    const f = this.fold([a, b], (x, y) => x + y);
    if (f !== undefined) return f;
    if (this.isConst(b, 0)) return a;
    if (this.isConst(a, 0)) return b;
    const nb = this.nodes[b];
    if (nb.op === 'neg') return this.sub(a, nb.a);
    const na = this.nodes[a];
    if (na.op === 'neg') return this.sub(b, na.a);
    // IEEE addition is exactly commutative: order operands by id for sharing.
    return a <= b ? this.node2('add', a, b) : this.node2('add', b, a);
  }

  sub(a: number, b: number): number {
    const f = this.fold([a, b], (x, y) => x - y);
    if (f !== undefined) return f;
    if (this.isConst(b, 0)) return a;
    if (this.isConst(a, 0)) return this.neg(b);
    if (a === b) return this.constant(0);
    const nb = this.nodes[b];
    if (nb.op === 'neg') return this.add(a, nb.a);
    return this.node2('sub', a, b);
  }

  mul(a: number, b: number): number {
    const f = this.fold([a, b], (x, y) => x * y);
    if (f !== undefined) return f;
    // Canonical order: a constant factor goes first.
    if (this.constOf(b) !== undefined && this.constOf(a) === undefined) [a, b] = [b, a];
    const ca = this.constOf(a);
    if (ca === 0) return this.constant(0);
    if (ca === 1) return b;
    if (ca === -1) return this.neg(b);
    const na = this.nodes[a];
    const nb = this.nodes[b];
    // Signs move outwards (exact): (−a)·b → −(a·b), a·(−b) → −(a·b).
    if (na.op === 'neg' && nb.op === 'neg') return this.mul(na.a, nb.a);
    if (na.op === 'neg') return this.neg(this.mul(na.a, b));
    if (nb.op === 'neg' && ca === undefined) return this.neg(this.mul(a, nb.a));
    if (ca !== undefined && nb.op === 'mul') {
      const inner = this.constOf(nb.a);
      if (inner !== undefined && Number.isFinite(ca * inner)) return this.mul(this.constant(ca * inner), nb.b);
    }
    if (ca !== undefined && nb.op === 'neg') return this.mul(this.constant(-ca), nb.a);
    // IEEE multiplication is exactly commutative: order non-constant operands by id for sharing.
    return ca === undefined && a > b ? this.node2('mul', b, a) : this.node2('mul', a, b);
  }

  /**
   * The chain-rule product a·b with a strong zero in its first factor:
   * a = 0 gives 0 even when b is infinite or NaN (`derive.ts` puts the inner
   * derivative, or the factor whose zero decides the limit, first). It
   * differs from `mul` only when a = 0 and b is not finite, so it is built as
   * a plain product whenever a is a constant (a nonzero constant cannot
   * trigger the rule) or b is one (a finite b gives a·b = ±0 anyway).
   */
  mulz(a: number, b: number): number {
    const ca = this.constOf(a);
    const cb = this.constOf(b);
    if (ca === 0) return this.constant(0);
    if (ca !== undefined || cb !== undefined) return this.mul(a, b);
    const na = this.nodes[a];
    const nb = this.nodes[b];
    // Signs move outwards as in `mul` (a zero test on −a is the test on a).
    if (na.op === 'neg') return this.neg(this.mulz(na.a, b));
    if (nb.op === 'neg') return this.neg(this.mulz(a, nb.a));
    return this.node2('mulz', a, b);
  }

  div(a: number, b: number): number {
    const f = this.fold([a, b], (x, y) => x / y);
    if (f !== undefined) return f;
    if (this.isConst(b, 1)) return a;
    if (this.isConst(b, -1)) return this.neg(a);
    if (this.isConst(a, 0) && this.constOf(b) === undefined) return this.constant(0);
    const na = this.nodes[a];
    const nb = this.nodes[b];
    if (na.op === 'neg') return this.neg(this.div(na.a, b));
    const ca = this.constOf(a);
    if (ca !== undefined && ca < 0) return this.neg(this.div(this.constant(-ca), b));
    if (nb.op === 'neg') return this.neg(this.div(a, nb.a));
    return this.node2('div', a, b);
  }

  neg(a: number): number {
    const v = this.constOf(a);
    if (v !== undefined) return this.constant(-v);
    const n = this.nodes[a];
    if (n.op === 'neg') return n.a;
    return this.intern(`neg:${a}`, { op: 'neg', a }, this.row[a], this.param[a]);
  }

  /** The existing constant node of value v, if one was built (no node is created). */
  findConstant(value: number): number | undefined {
    return this.index.get(Object.is(value, -0) ? 'k:-0' : `k:${value}`);
  }

  /** The existing node a^b, if one was built (no node is created). */
  findPow(a: number, b: number): number | undefined {
    return this.index.get(`pow:${a},${b}`);
  }

  pow(a: number, b: number): number {
    const f = this.fold([a, b], Math.pow);
    if (f !== undefined) return f;
    if (this.isConst(b, 1)) return a;
    if (this.isConst(b, 0)) return this.constant(1);
    if (this.isConst(a, 1)) return this.constant(1);
    return this.node2('pow', a, b);
  }

  fn1(fn: UnaryFn, a: number): number {
    const f = this.fold([a], UNARY_IMPL[fn]);
    if (f !== undefined) return f;
    return this.intern(`${fn}:${a}`, { op: 'fn1', fn, a }, this.row[a], this.param[a]);
  }

  fn2(fn: BinaryFn, a: number, b: number): number {
    const f = this.fold([a, b], BINARY_IMPL[fn]);
    if (f !== undefined) return f;
    return this.intern(`${fn}:${a},${b}`, { op: 'fn2', fn, a, b }, this.row[a] || this.row[b], this.param[a] || this.param[b]);
  }

  compare(cmp: CompareOp, a: number, b: number): number {
    const f = this.fold([a, b], (x, y) => (compareValues(cmp, x, y) ? 1 : 0));
    if (f !== undefined) return f;
    return this.intern(`cmp${cmp}:${a},${b}`, { op: 'cmp', cmp, a, b }, this.row[a] || this.row[b], this.param[a] || this.param[b]);
  }

  and(a: number, b: number): number {
    const f = this.fold([a, b], (x, y) => (x && y ? 1 : 0));
    return f ?? this.node2('and', a, b);
  }

  or(a: number, b: number): number {
    const f = this.fold([a, b], (x, y) => (x || y ? 1 : 0));
    return f ?? this.node2('or', a, b);
  }

  not(a: number): number {
    const v = this.constOf(a);
    if (v !== undefined) return this.constant(v ? 0 : 1);
    return this.intern(`not:${a}`, { op: 'not', a }, this.row[a], this.param[a]);
  }

  when(c: number, a: number, b: number): number {
    if (a === b) return a;
    const v = this.constOf(c);
    if (v !== undefined) return v ? a : b;
    return this.intern(`when:${c},${a},${b}`, { op: 'when', c, a, b }, this.row[c] || this.row[a] || this.row[b], this.param[c] || this.param[a] || this.param[b]);
  }

  /** Child node ids of `id`, in evaluation order. */
  children(id: number): number[] {
    const n = this.nodes[id];
    switch (n.op) {
      case 'const': case 'param': case 'col': return [];
      case 'neg': case 'not': case 'fn1': return [n.a];
      case 'when': return [n.c, n.a, n.b];
      default: return [n.a, n.b];
    }
  }

  /** Every node reachable from `roots`, in ascending id order (a topological order: children are built first). */
  reachable(roots: readonly number[]): number[] {
    const seen = new Uint8Array(this.nodes.length);
    const stack = [...roots];
    while (stack.length > 0) {
      const id = stack.pop()!;
      if (seen[id]) continue;
      seen[id] = 1;
      for (const c of this.children(id)) if (!seen[c]) stack.push(c);
    }
    const out: number[] = [];
    for (let i = 0; i < seen.length; i++) if (seen[i]) out.push(i);
    return out;
  }
}
