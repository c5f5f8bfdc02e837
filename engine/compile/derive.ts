/**
 * Symbolic differentiation on the expression graph: d(node)/dθⱼ as new graph
 * nodes, built with the simplifying constructors of `graph.ts` so that zero
 * and unit factors vanish and subexpressions (including the node's own value)
 * are shared. The rules are the textbook ones; the choices that matter
 * numerically are noted:
 *   a/b     → (a′ − (a/b)·b′)/b          reuses the quotient node;
 *   a^b     → a′·(b·a^(b−1)) + b′·(a^b·ln a)   (each product below is `mulz`);
 *   sqrt(a) → a′/(2·sqrt(a)), tan(a) → (1 + tan²a)·a′, tanh(a) → (1 − tanh²a)·a′;
 *   erf(a)  → (2/√π)·e^{−a²}·a′, erfc the negative;
 *   abs(a)  → sign(a)·a′; min/max → the derivative of the selected argument;
 *   when(c, a, b) → when(c, a′, b′); comparisons and logic are piecewise
 *   constant (derivative 0).
 *
 * Removable singularities (limits, not IEEE accidents). Every chain-rule
 * product is built as `mulz(x, y)` = (x = 0 ? 0 : x·y) with the factor whose
 * zero decides the limit first (graph.ts `mulz`; it differs from x·y only
 * when x = 0 and y is ±∞ or NaN):
 *  - f(a)′ = a′·f′(a), a·b → a′·b + b′·a, (a/b)′ uses b′·(a/b): a term whose
 *    inner derivative is exactly 0 contributes 0. That is the limit whenever
 *    the inner expression does not move with θ near the point, e.g. a = x·θ
 *    or x/θ at a data value x = 0 (a ≡ 0 for every θ), where f′(a) may be
 *    infinite: sqrt(x·θ), (x/ec)^h with 0 < h < 1.
 *  - a^b through the exponent, b′·(a^b·ln a): at a = 0 with b > 0 the value
 *    0^b is 0 for every b nearby, so the derivative is 0 (the limit
 *    u·ln u → 0 as u → 0⁺), where IEEE gives 0·(−∞) = NaN. This is the
 *    derivative of (dose/ec)^h in h at dose 0, of a·t^k in k at t = 0, of
 *    exp(−(t/τ)^β) in β at t = 0. (a^b underflowing to 0 for a tiny a > 0
 *    also gives 0, which is a^b·ln a to within the underflow.)
 *  - a^b through the base, a′·(b·a^(b−1)): b = 0 gives 0 (a^0 ≡ 1 for every
 *    a, IEEE pow(a, 0) = 1, even at a = 0 where 0·0^(−1) = 0·∞).
 * Values and derivatives of a^b at a = 0, by the sign of b (θ a parameter;
 * x a data column, so ∂/∂x-type terms arise when the base holds a
 * parameter, e.g. (x − x₀)^b):
 *   value:     b > 0: 0;  b = 0: 1 (IEEE 0^0 = 1);  b < 0: +∞ (a pole, left non-finite);
 *   ∂/∂base:   b > 1: 0;  b = 1: 1;  0 < b < 1: +∞·a′ (infinite slope, a genuine
 *              singularity: left non-finite unless a′ = 0, see above);
 *              b = 0: 0;  b < 0: non-finite (value infinite);
 *   ∂/∂b:      b > 0: 0 (limit above);  b = 0: 0^b jumps from +∞ to 1 to 0, so
 *              there is no derivative: −∞ (1·ln 0) is kept;  b < 0: value infinite.
 *   Integer and non-integer b alike (a < 0 with non-integer b is NaN already in
 *   the value; ln a < 0 is NaN, so ∂/∂b is NaN for a < 0, where a^b is defined
 *   only at integer b and has no derivative in b).
 * The solvers treat a non-finite residual or Jacobian at a trial point as a
 * failed step (engine/solve), so the genuine singularities left above only
 * shrink the trust region.
 */
import { Graph } from './graph';
import { BINARY_RULES, UNARY_RULES } from './functions';

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
      case 'mul': return g.add(g.mulz(this.d(n.a), n.b), g.mulz(this.d(n.b), n.a));
      case 'div': {
        const da = this.d(n.a);
        const db = this.d(n.b);
        if (g.isConst(db, 0)) return g.div(da, n.b);
        return g.div(g.sub(da, g.mulz(db, id)), n.b);
      }
      case 'pow': return this.power(id, n.a, n.b);
      // f(a)′ = a′·f′(a), the inner derivative first (mulz); f′ from the function table (functions.ts)
      case 'fn1': return g.mulz(this.d(n.a), UNARY_RULES[n.fn].derivative(g, id, n.a));
      case 'fn2': {
        const da = this.d(n.a);
        const db = this.d(n.b);
        return BINARY_RULES[n.fn].derivative(g, id, n.a, n.b, da, db);
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
    // a′·(b·a^(b−1)): zero when a′ = 0 (a does not move) or b = 0 (a^0 ≡ 1)
    const baseTerm = g.isConst(da, 0) ? g.constant(0) : g.mulz(da, g.mulz(b, g.pow(a, g.sub(b, one))));
    if (g.isConst(db, 0)) return baseTerm;
    // b′·(a^b·ln a): zero when a^b = 0 (a = 0, b > 0: the limit of u·ln u)
    const expTerm = g.mulz(db, g.mulz(id, g.fn1('ln', a)));
    return g.add(baseTerm, expTerm);
  }
}
