import { describe, it, expect } from 'vitest';
import { compileModel, compileColumnExpr, isLinearInParameters } from '../../engine/compile/index';
import { infix } from '../strd/infix';
import { num, par, col, bin, call, cmp } from './helpers';

const P = ['a', 'b'];

describe('engine/compile compileModel', () => {
  it('exponential decay: value and hand-derived partial derivatives', () => {
    // f = a·exp(−b·x): ∂f/∂a = exp(−b·x), ∂f/∂b = −a·x·exp(−b·x) (calculus, from memory)
    const m = compileModel(infix('a*exp(-b*x)', P), P, ['x']);
    const x = Float64Array.from([0, 0.5, 1, 2, 7]);
    const theta = Float64Array.from([3, 0.7]);
    const out = new Float64Array(5);
    const jac = new Float64Array(10);
    m.valueAndJacobian(theta, [x], 5, out, jac);
    for (let i = 0; i < 5; i++) {
      const e = Math.exp(-0.7 * x[i]);
      expect(out[i]).toBeCloseTo(3 * e, 14);
      expect(jac[i]).toBeCloseTo(e, 14);
      expect(jac[5 + i]).toBeCloseTo(-3 * x[i] * e, 14);
    }
    expect(m.params).toEqual(P);
    expect(m.columns).toEqual(['x']);
    expect(m.linear).toBe(false);
  });

  it('shares subexpressions between value and derivatives (one exp per row)', () => {
    const m = compileModel(infix('a*exp(-b*x)', P), P, ['x']);
    expect(m.source.valueAndJacobian.match(/M\.exp\(/g)).toHaveLength(1);
  });

  it('simplifies: x*1, x+0, constant folding leave no trace in the source', () => {
    const m = compileModel(bin('+', bin('*', bin('*', par('a'), num(1)), col('x')), bin('*', num(0), par('b'))), P, ['x']);
    const src = m.source.valueAndJacobian;
    expect(src).not.toMatch(/const v\d+ = [^;]*(\* 1\b|\+ 0\b)/);
    expect(src).toMatch(/const v\d+ = t0 \* x0;/);
    expect(src).toMatch(/jac\[o1 \+ i\] = 0;/);
    const folded = compileModel(bin('*', par('a'), bin('+', num(2), num(3))), ['a'], []);
    expect(folded.source.value).toMatch(/5 \* t0|t0 \* 5/);
  });

  it('hoists parameter-only subexpressions out of the row loop', () => {
    const m = compileModel(infix('a*exp(-x/b^2)', P), P, ['x']);
    const src = m.source.value;
    const loopAt = src.indexOf('for (');
    const powAt = src.indexOf('t1 * t1');
    expect(powAt).toBeGreaterThan(-1);
    expect(powAt).toBeLessThan(loopAt);
  });

  it('writes the Jacobian column-major with n rows', () => {
    const m = compileModel(infix('a + b*x', P), P, ['x']);
    const jac = new Float64Array(6).fill(NaN);
    m.valueAndJacobian(Float64Array.from([1, 2]), [Float64Array.from([10, 20, 30])], 3, new Float64Array(3), jac);
    expect(Array.from(jac)).toEqual([1, 1, 1, 10, 20, 30]);
  });

  it('rejects wrongly sized arguments', () => {
    const m = compileModel(infix('a + b*x', P), P, ['x']);
    expect(() => m.value(new Float64Array(1), [new Float64Array(3)], 3, new Float64Array(3))).toThrow(RangeError);
    expect(() => m.value(new Float64Array(2), [new Float64Array(2)], 3, new Float64Array(3))).toThrow(RangeError);
    expect(() => m.valueAndJacobian(new Float64Array(2), [new Float64Array(3)], 3, new Float64Array(3), new Float64Array(5))).toThrow(RangeError);
  });

  it('non-finite values propagate rather than throw (solvers report them)', () => {
    const m = compileModel(infix('a*ln(x)', ['a']), ['a'], ['x']);
    const out = new Float64Array(2);
    m.value(Float64Array.from([1]), [Float64Array.from([-1, 0])], 2, out);
    expect(Number.isNaN(out[0])).toBe(true);
    expect(out[1]).toBe(-Infinity);
  });

  it('piecewise models: when/min/max pick the active branch derivative', () => {
    const m = compileModel(call('when', cmp('<', col('x'), par('b')), par('a'), bin('*', par('a'), col('x'))), P, ['x']);
    const jac = new Float64Array(4);
    m.valueAndJacobian(Float64Array.from([2, 1]), [Float64Array.from([0.5, 3])], 2, new Float64Array(2), jac);
    expect(Array.from(jac)).toEqual([1, 3, 0, 0]);
    const mm = compileModel(call('max', par('a'), bin('*', par('b'), col('x'))), P, ['x']);
    mm.valueAndJacobian(Float64Array.from([2, 1]), [Float64Array.from([0.5, 3])], 2, new Float64Array(2), jac);
    expect(Array.from(jac)).toEqual([1, 0, 0, 3]);
  });
});

describe('engine/compile isLinearInParameters', () => {
  it('recognises models linear in their parameters', () => {
    expect(isLinearInParameters(infix('a + b*x + c*x^2', ['a', 'b', 'c']), ['a', 'b', 'c'])).toBe(true);
    expect(isLinearInParameters(infix('a*sin(x) + b*exp(-x/3)', P), P)).toBe(true);
    expect(isLinearInParameters(infix('(a + b)*x - 2*a', P), P)).toBe(true);
    expect(isLinearInParameters(infix('a*x/3 + b/ln(x)', P), P)).toBe(true);
    expect(isLinearInParameters(num(4), [])).toBe(true);
  });

  it('rejects nonlinear ones, including parameters inside conditions', () => {
    expect(isLinearInParameters(infix('a*exp(-b*x)', P), P)).toBe(false);
    expect(isLinearInParameters(infix('a*b*x', P), P)).toBe(false);
    expect(isLinearInParameters(infix('x/a', P), P)).toBe(false);
    expect(isLinearInParameters(infix('abs(a)*x', P), P)).toBe(false);
    expect(isLinearInParameters(infix('max(a, x)', P), P)).toBe(false);
    expect(isLinearInParameters(call('when', cmp('<', col('x'), par('b')), par('a'), bin('+', par('a'), num(1))), P)).toBe(false);
  });

  it('is false, not an exception, for expressions that cannot compile', () => {
    expect(isLinearInParameters(infix('a*x + q', P), P)).toBe(true); // q is a column
    expect(isLinearInParameters(bin('*', par('a'), num(Infinity)), ['a'])).toBe(false);
  });
});

describe('engine/compile compileColumnExpr', () => {
  it('evaluates response, weight and filter expressions', () => {
    const x = Float64Array.from([1, 4, 9, NaN]);
    const y = Float64Array.from([2, 2, 2, 2]);
    const out = new Float64Array(4);
    compileColumnExpr(infix('ln(y) + sqrt(x)', []), ['x', 'y'])([x, y], 4, out);
    expect(out[0]).toBeCloseTo(Math.log(2) + 1, 15);
    expect(out[2]).toBeCloseTo(Math.log(2) + 3, 15);
    expect(Number.isNaN(out[3])).toBe(true);
  });

  it('comparisons and logic give 1/0; NaN compares false', () => {
    const x = Float64Array.from([1, 4, 9, NaN]);
    const out = new Float64Array(4);
    const f = compileColumnExpr({ kind: 'logic', op: 'and', left: cmp('>=', col('x'), num(2)), right: { kind: 'not', arg: cmp('==', col('x'), num(9)) } }, ['x']);
    f([x], 4, out);
    expect(Array.from(out)).toEqual([0, 1, 0, 0]);
    const g = compileColumnExpr({ kind: 'logic', op: 'or', left: cmp('<', col('x'), num(2)), right: cmp('!=', col('x'), num(4)) }, ['x']);
    g([x], 4, out);
    expect(Array.from(out)).toEqual([1, 0, 1, 1]);
    expect(typeof f.source).toBe('string');
  });
});
