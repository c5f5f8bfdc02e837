/**
 * Every function of the registry (parser/registry/functions.ts), one by one,
 * through the compiler's function table (engine/compile/functions.ts): the
 * double kernel against the tree-walking oracle (test/compile/helpers.ts,
 * Math and special.ts), the derivative against central finite differences,
 * and the double-double kernel against the double one. A function added to
 * the registry is tested here without being listed.
 */
import { describe, expect, it } from 'vitest';
import type { Expr } from '../../parser/plan';
import { FUNCTION_NAMES, FUNCTION_SPECS, type FunctionName } from '../../parser/registry/functions';
import { compileModel } from '../../engine/compile/index';
import { BINARY_RULES, FUNCTION_RULES, UNARY_RULES } from '../../engine/compile/functions';
import { MATH_HELPERS } from '../../engine/compile/codegen';
import { DD_HELPERS } from '../../engine/compile/codegen-dd';
import { bin, call, cmp, col, interpret, num, par } from './helpers';

const PARAMS = ['a', 'b'];
/** Arguments inside every function's domain (|u| < 1 for asin/acos, u > 0 for ln/sqrt): 0.3 + 0.2·a·x and 0.7 + 0.1·b. */
const u = bin('+', num(0.3), bin('*', num(0.2), bin('*', par('a'), col('x'))));
const v = bin('+', num(0.7), bin('*', num(0.1), par('b')));

function callOf(f: FunctionName): Expr {
  switch (FUNCTION_SPECS[f].arity) {
    case 1: return call(f, u);
    case 2: return call(f, u, v);
    default: return call(f, cmp('>', par('a'), num(0)), u, v);
  }
}

describe('engine/compile/functions (every registry function)', () => {
  const theta = [0.9, -0.4];
  const xs = [0.5, 1.5, 2.5];

  for (const f of FUNCTION_NAMES) {
    it(`${f}: value, derivative (central differences) and double-double value`, () => {
      const e = callOf(f);
      const m = compileModel(e, PARAMS, ['x']);
      const n = xs.length;
      const cols = [Float64Array.from(xs)];
      const out = new Float64Array(n);
      const jac = new Float64Array(2 * n);
      m.valueAndJacobian(Float64Array.from(theta), cols, n, out, jac);
      const [h, l, jh, jl] = [new Float64Array(n), new Float64Array(n), new Float64Array(2 * n), new Float64Array(2 * n)];
      m.valueAndJacobianExtended(Float64Array.from(theta), cols, n, h, l, jh, jl);
      const at = (t: number[], x: number) => interpret(e, new Map(PARAMS.map((p, k) => [p, t[k]])), new Map([['x', x]]));
      xs.forEach((x, i) => {
        const want = at(theta, x);
        expect(Number.isFinite(want)).toBe(true);
        expect(Math.abs(out[i] - want)).toBeLessThanOrEqual(1e-14 * (1 + Math.abs(want)));
        expect(Math.abs(h[i] + l[i] - want)).toBeLessThanOrEqual(1e-14 * (1 + Math.abs(want)));
        for (let j = 0; j < 2; j++) {
          const step = 1e-5;
          const tp = theta.slice();
          const tm = theta.slice();
          tp[j] += step;
          tm[j] -= step;
          const fd = (at(tp, x) - at(tm, x)) / (2 * step);
          // central differences: error O(h²·f‴) ≈ 1e-10 here, plus rounding ≈ 1e-16/h
          expect(Math.abs(jac[j * n + i] - fd), `∂${f}/∂${PARAMS[j]} at x = ${x}`).toBeLessThanOrEqual(1e-8 * (1 + Math.abs(fd)));
          expect(Math.abs(jh[j * n + i] + jl[j * n + i] - jac[j * n + i])).toBeLessThanOrEqual(1e-14 * (1 + Math.abs(fd)));
        }
      });
    });
  }

  it('the function table and the registry hold the same names, with matching arities', () => {
    expect(Object.keys(FUNCTION_RULES).sort()).toEqual([...FUNCTION_NAMES].sort());
    const arityOfKind = { unary: 1, binary: 2, power: 2, when: 3 } as const;
    for (const f of FUNCTION_NAMES) expect(arityOfKind[FUNCTION_RULES[f].kind], f).toBe(FUNCTION_SPECS[f].arity);
  });

  it('every unary and binary function is a member of the generated code helpers, and none collides with a double-double helper', () => {
    const names = [...Object.keys(UNARY_RULES), ...Object.keys(BINARY_RULES)];
    for (const f of names) expect(typeof MATH_HELPERS[f], f).toBe('function');
    const ddOwn = ['R', 'add', 'sub', 'mul', 'mulz', 'div', 'sqrt2', 'powi'];
    expect(names.filter((f) => ddOwn.includes(f))).toEqual([]);
    for (const k of ddOwn) expect(k in DD_HELPERS).toBe(true);
  });
});
