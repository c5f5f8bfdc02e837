/**
 * Symbolic differentiation on the expression graph: d(node)/dθⱼ as new graph
 * nodes, built with the simplifying constructors of `graph.ts` so that zero
 * and unit factors vanish and subexpressions (including the node's own value)
 * are shared. The rules are the textbook ones; the choices that matter
 * numerically are noted:
 *   a/b     → (a′ − (a/b)·b′)/b          reuses the quotient node;
 *   a^b     → b·a^(b−1)·a′ when b′ = 0   (valid for a ≤ 0 and integer b),
 *             a^b·ln(a)·b′ when a′ = 0, the full form otherwise;
 *   sqrt(a) → a′/(2·sqrt(a)), tan(a) → (1 + tan²a)·a′, tanh(a) → (1 − tanh²a)·a′;
 *   erf(a)  → (2/√π)·e^{−a²}·a′, erfc the negative;
 *   abs(a)  → sign(a)·a′; min/max → the derivative of the selected argument;
 *   when(c, a, b) → when(c, a′, b′); comparisons and logic are piecewise
 *   constant (derivative 0).
 */
import { Graph } from './graph';

const TWO_OVER_SQRT_PI = 1.1283791670955126;

export class Differentiator {
  private readonly memo = new Map<number, number>();

  constructor(private readonly g: Graph, private readonly paramIndex: number) {}

  /** Node id of ∂(node)/∂θ_paramIndex. */
  d(id: number): number {
    const g = this.g;
    if (!g.param[id]) return g.constant(0);
    const hit = this.memo.get(id);
    if (hit !== undefined) return hit;
    this.warm(id);
    const r = this.rule(id);
    this.memo.set(id, r);
    return r;
  }

  /**
   * Differentiates every parameter-dependent node below `id` first, in
   * ascending id order (children have smaller ids than their parents), so
   * the rules' calls to `d` on their operands find the memo filled and the
   * recursion stays one level deep however deep the graph is (a sum of
   * 10,000 terms is a chain of 10,000 `add` nodes).
   */
  private warm(id: number): void {
    const g = this.g;
    const below = g.reachable(g.children(id)).filter((k) => g.param[k] && !this.memo.has(k));
    for (const k of below) this.memo.set(k, this.rule(k));
  }

  private rule(id: number): number {
    const g = this.g;
    const n = g.nodes[id];
    const zero = g.constant(0);
    switch (n.op) {
      case 'const': case 'col': return zero;
      case 'param': return n.index === this.paramIndex ? g.constant(1) : zero;
      case 'add': return g.add(this.d(n.a), this.d(n.b));
      case 'sub': return g.sub(this.d(n.a), this.d(n.b));
      case 'neg': return g.neg(this.d(n.a));
      case 'mul': return g.add(g.mul(this.d(n.a), n.b), g.mul(n.a, this.d(n.b)));
      case 'div': {
        const da = this.d(n.a);
        const db = this.d(n.b);
        if (g.isConst(db, 0)) return g.div(da, n.b);
        return g.div(g.sub(da, g.mul(id, db)), n.b);
      }
      case 'pow': return this.power(id, n.a, n.b);
      case 'fn1': return g.mul(this.unary(id, n.fn, n.a), this.d(n.a));
      case 'fn2': {
        const da = this.d(n.a);
        const db = this.d(n.b);
        switch (n.fn) {
          case 'min': return g.when(g.compare('<=', n.a, n.b), da, db);
          case 'max': return g.when(g.compare('>=', n.a, n.b), da, db);
          case 'hypot': return g.div(g.add(g.mul(n.a, da), g.mul(n.b, db)), id);
          case 'atan2': {
            // atan2(y, x): (x·y′ − y·x′)/(x² + y²)
            const den = g.add(g.mul(n.a, n.a), g.mul(n.b, n.b));
            return g.div(g.sub(g.mul(n.b, da), g.mul(n.a, db)), den);
          }
        }
        break;
      }
      case 'when': return g.when(n.c, this.d(n.a), this.d(n.b));
      case 'cmp': case 'and': case 'or': case 'not': return zero;
    }
    throw new Error('unreachable derivative rule');
  }

  private power(id: number, a: number, b: number): number {
    const g = this.g;
    const da = this.d(a);
    const db = this.d(b);
    const one = g.constant(1);
    // b·a^(b−1)·a′
    const baseTerm = g.isConst(da, 0) ? g.constant(0) : g.mul(g.mul(b, g.pow(a, g.sub(b, one))), da);
    if (g.isConst(db, 0)) return baseTerm;
    // a^b·ln(a)·b′
    const expTerm = g.mul(g.mul(id, g.fn1('ln', a)), db);
    return g.add(baseTerm, expTerm);
  }

  /** f′(a) for f = fn, where `self` is the node f(a). */
  private unary(self: number, fn: string, a: number): number {
    const g = this.g;
    const one = g.constant(1);
    switch (fn) {
      case 'exp': return self;
      case 'ln': return g.div(one, a);
      case 'log10': return g.div(one, g.mul(g.constant(Math.LN10), a));
      case 'sqrt': return g.div(g.constant(0.5), self);
      case 'abs': return g.fn1('sign', a);
      case 'sign': return g.constant(0);
      case 'sin': return g.fn1('cos', a);
      case 'cos': return g.neg(g.fn1('sin', a));
      case 'tan': return g.add(one, g.mul(self, self));
      case 'asin': return g.div(one, g.fn1('sqrt', g.sub(one, g.mul(a, a))));
      case 'acos': return g.neg(g.div(one, g.fn1('sqrt', g.sub(one, g.mul(a, a)))));
      case 'atan': return g.div(one, g.add(one, g.mul(a, a)));
      case 'sinh': return g.fn1('cosh', a);
      case 'cosh': return g.fn1('sinh', a);
      case 'tanh': return g.sub(one, g.mul(self, self));
      case 'erf': return g.mul(g.constant(TWO_OVER_SQRT_PI), g.fn1('exp', g.neg(g.mul(a, a))));
      case 'erfc': return g.mul(g.constant(-TWO_OVER_SQRT_PI), g.fn1('exp', g.neg(g.mul(a, a))));
    }
    throw new Error(`no derivative rule for ${fn}`);
  }
}
