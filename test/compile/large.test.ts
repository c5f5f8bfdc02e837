import { describe, expect, it } from 'vitest';
import { compileModel, compileColumnExpr, CompileError } from '../../engine/compile/index';
import { MAX_LOCAL_TEMPS } from '../../engine/compile/codegen';
import { MAX_LOWER_DEPTH } from '../../engine/compile/lower';
import type { ChainOp, Expr } from '../../parser/plan';
import { bin, col, interpret, neg, num, par } from './helpers';

const chain = (ops: ChainOp[], args: Expr[]): Expr => ({ kind: 'chain', ops, args });

/** Σ k·a·x + b·x^2 for k = 1…n, as a flat chain (what the checker writes for a long sum). */
function longSum(n: number): Expr {
  const args: Expr[] = [];
  for (let k = 1; k <= n; k++) args.push(bin('*', bin('*', num(k), par('a')), col('x')));
  args.push(bin('*', par('b'), bin('^', col('x'), num(2))));
  return chain(args.slice(1).map(() => '+'), args);
}

/** The same chain written as the nested binary operations it stands for. */
function nested(e: Extract<Expr, { kind: 'chain' }>): Expr {
  return e.ops.reduce<Expr>((acc, op, i) => ({ kind: op === 'and' || op === 'or' ? 'logic' : 'binary', op, left: acc, right: e.args[i + 1] } as Expr), e.args[0]);
}

describe('engine/compile long and deep expressions', () => {
  it('a chain compiles to exactly the kernel of the nested binary operations it stands for', () => {
    const e = chain(['-', '+'], [par('a'), col('x'), bin('*', par('b'), col('x'))]) as Extract<Expr, { kind: 'chain' }>;
    const a = compileModel(e, ['a', 'b'], ['x']);
    const b = compileModel(nested(e), ['a', 'b'], ['x']);
    expect(a.source).toEqual(b.source);
    const products = chain(['*', '/', '*'], [par('a'), col('x'), par('b'), col('x')]) as Extract<Expr, { kind: 'chain' }>;
    expect(compileModel(products, ['a', 'b'], ['x']).source).toEqual(compileModel(nested(products), ['a', 'b'], ['x']).source);
    const cond = chain(['and', 'or'], [bin('-', col('x'), num(1)), col('y'), col('x')]) as Extract<Expr, { kind: 'chain' }>;
    expect(compileColumnExpr(cond, ['x', 'y']).source).toEqual(compileColumnExpr(nested(cond), ['x', 'y']).source);
  });

  it('a sum of 10,000 terms: value and Jacobian match a direct evaluation, in double and double-double', () => {
    const e = longSum(10_000);
    const m = compileModel(e, ['a', 'b'], ['x']);
    expect(m.linear).toBe(true);
    // over MAX_LOCAL_TEMPS interior nodes: temporaries live in an array, not in the stack frame
    expect(m.source.valueAndJacobian).toContain('new Float64Array(');
    const xs = Float64Array.from([0, 0.5, -1.25, 3]);
    const theta = Float64Array.from([0.002, -1.5]);
    const out = new Float64Array(4);
    const jac = new Float64Array(8);
    m.valueAndJacobian(theta, [xs], 4, out, jac);
    const sumK = (10_000 * 10_001) / 2;
    for (let i = 0; i < 4; i++) {
      const direct = interpret(e, new Map([['a', 0.002], ['b', -1.5]]), new Map([['x', xs[i]]]));
      expect(out[i]).toBe(direct); // same operations in the same order: bit for bit
      expect(jac[i]).toBeCloseTo(sumK * xs[i], 6); // ∂f/∂a = Σk·x (calculus)
      expect(jac[4 + i]).toBe(xs[i] * xs[i]); // ∂f/∂b = x²
    }
    const hi = new Float64Array(4);
    const lo = new Float64Array(4);
    const jh = new Float64Array(8);
    const jl = new Float64Array(8);
    m.valueAndJacobianExtended(theta, [xs], 4, hi, lo, jh, jl);
    for (let i = 0; i < 4; i++) {
      expect(hi[i] + lo[i]).toBeCloseTo(out[i], 6);
      expect(jh[i] + jl[i]).toBeCloseTo(sumK * xs[i], 6);
    }
  });

  it('array temporaries and local constants give the same numbers (just above and below the threshold)', () => {
    // terms k·a·x cost 3 interior nodes each (k·a, ·x, +) in the value kernel
    const below = Math.floor(MAX_LOCAL_TEMPS / 8);
    const small = compileModel(longSum(below), ['a', 'b'], ['x']);
    expect(small.source.value).not.toContain('new Float64Array(');
    const big = compileModel(longSum(Math.ceil(MAX_LOCAL_TEMPS / 2)), ['a', 'b'], ['x']);
    expect(big.source.value).toContain('new Float64Array(');
    const xs = Float64Array.from([1.5, -2]);
    const theta = Float64Array.from([0.25, 3]);
    for (const [m, n] of [[small, below], [big, Math.ceil(MAX_LOCAL_TEMPS / 2)]] as const) {
      const out = new Float64Array(2);
      m.value(theta, [xs], 2, out);
      for (let i = 0; i < 2; i++) expect(out[i]).toBe(interpret(longSum(n), new Map([['a', 0.25], ['b', 3]]), new Map([['x', xs[i]]])));
    }
  });

  it('a product chain of 10,000 factors differentiates without deep recursion', () => {
    const args: Expr[] = [par('a')];
    for (let k = 0; k < 10_000; k++) args.push(bin('+', num(1), bin('*', num(1e-5), col('x'))));
    const m = compileModel(chain(args.slice(1).map(() => '*'), args), ['a'], ['x']);
    const out = new Float64Array(1);
    const jac = new Float64Array(1);
    m.valueAndJacobian(Float64Array.from([2]), [Float64Array.from([1])], 1, out, jac);
    expect(out[0]).toBeCloseTo(2 * Math.pow(1 + 1e-5, 10_000), 10);
    expect(jac[0]).toBeCloseTo(Math.pow(1 + 1e-5, 10_000), 10);
  });

  it(`an expression nested deeper than ${MAX_LOWER_DEPTH} levels is a CompileError with its place, not a stack overflow`, () => {
    let e: Expr = par('a');
    for (let k = 0; k < 20_000; k++) e = k % 2 ? neg(e) : bin('^', col('x'), e);
    const range = { start: { line: 3, column: 5, offset: 40 }, end: { line: 3, column: 9, offset: 44 } };
    e = { ...e, range } as Expr;
    let caught: unknown;
    try {
      compileModel(e, ['a'], ['x']);
    } catch (err) {
      caught = err;
    }
    expect(caught).toBeInstanceOf(CompileError);
    expect((caught as CompileError).message).toContain(`limit ${MAX_LOWER_DEPTH}`);
    // at the limit itself it compiles
    let ok: Expr = par('a');
    for (let k = 0; k < MAX_LOWER_DEPTH / 2; k++) ok = neg(bin('*', ok, num(1.5))); // two levels each
    expect(() => compileModel(ok, ['a'], [])).not.toThrow();
  });

  it('a malformed chain is refused by the whitelist', () => {
    expect(() => compileModel({ kind: 'chain', ops: ['+'], args: [par('a')] } as unknown as Expr, ['a'], [])).toThrow(CompileError);
    expect(() => compileModel({ kind: 'chain', ops: ['%', '+'], args: [par('a'), num(1), num(2)] } as unknown as Expr, ['a'], [])).toThrow(CompileError);
  });
});
