import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import type { Expr, FunctionName } from '../../parser/plan';
import { compileModel } from '../../engine/compile/index';
import { num, par, col, bin, call, neg, cmp, interpret } from './helpers';

const PARAMS = ['a', 'b', 'c'];
const COLUMNS = ['x', 'z'];

/**
 * Random smooth-ish expressions over every operator and function. Arguments
 * are squashed (tanh, 1 + u²) where the domain is restricted, so values stay
 * finite; kinks (abs, min, max, when) are allowed and handled by the
 * finite-difference oracle's self-consistency check.
 */
const exprArb = fc.letrec<{ node: Expr; op: Expr }>((tie) => ({
  node: fc.oneof(
    { depthSize: 'small', withCrossShrink: true },
    fc.constantFrom(...PARAMS).map(par),
    fc.constantFrom(...COLUMNS).map(col),
    fc.double({ min: -3, max: 3, noNaN: true, noDefaultInfinity: true }).map(num),
    tie('op'),
  ),
  op: fc.oneof(
    fc.tuple(fc.constantFrom('+', '-', '*' as const), tie('node'), tie('node')).map(([o, a, b]) => bin(o, a, b)),
    fc.tuple(tie('node'), tie('node')).map(([a, b]) => bin('/', a, bin('+', num(2), call('sin', b)))),
    fc.tuple(tie('node'), tie('node')).map(([a, b]) => bin('/', a, bin('+', num(1), bin('*', b, b)))),
    fc.tuple(tie('node'), fc.integer({ min: -3, max: 4 })).map(([a, k]) => bin('^', bin('+', num(1.5), call('tanh', a)), num(k))),
    fc.tuple(tie('node'), tie('node')).map(([a, b]) => bin('^', bin('+', num(1.5), call('tanh', a)), call('tanh', b))),
    fc.tuple(tie('node'), tie('node')).map(([a, b]) => call('pow', bin('+', num(2), call('cos', a)), call('sin', b))),
    fc.tuple(fc.constantFrom<FunctionName>('sin', 'cos', 'atan', 'tanh', 'erf', 'erfc', 'abs'), tie('node')).map(([f, a]) => call(f, a)),
    tie('node').map((a) => call('exp', call('tanh', a))),
    tie('node').map((a) => call('sqrt', bin('+', num(1), bin('*', a, a)))),
    tie('node').map((a) => call('ln', bin('+', num(1), bin('*', a, a)))),
    tie('node').map((a) => call('log10', bin('+', num(2), call('sin', a)))),
    fc.tuple(fc.constantFrom<FunctionName>('sinh', 'cosh'), tie('node')).map(([f, a]) => call(f, call('tanh', a))),
    fc.tuple(fc.constantFrom<FunctionName>('asin', 'acos'), tie('node')).map(([f, a]) => call(f, bin('*', num(0.9), call('tanh', a)))),
    tie('node').map((a) => call('tan', bin('*', num(0.5), call('tanh', a)))),
    fc.tuple(fc.constantFrom<FunctionName>('atan2', 'min', 'max', 'hypot'), tie('node'), tie('node')).map(([f, a, b]) => call(f, a, b)),
    fc.tuple(tie('node'), tie('node'), tie('node'), tie('node')).map(([a, b, c, d]) => call('when', cmp('<', a, b), c, d)),
    tie('node').map(neg),
  ),
})).node;

const point = fc.record({
  theta: fc.array(fc.double({ min: -2, max: 2, noNaN: true }), { minLength: 3, maxLength: 3 }),
  rows: fc.array(fc.tuple(fc.double({ min: -2, max: 2, noNaN: true }), fc.double({ min: -2, max: 2, noNaN: true })), { minLength: 1, maxLength: 4 }),
});

function evalAt(e: Expr, theta: number[], x: number, z: number): number {
  return interpret(e, new Map(PARAMS.map((p, k) => [p, theta[k]])), new Map([['x', x], ['z', z]]));
}

describe('engine/compile derivatives (oracle: central finite differences)', () => {
  it('Jacobian matches central differences on random expressions', () => {
    let checked = 0;
    fc.assert(
      fc.property(exprArb, point, (e, { theta, rows }) => {
        const m = compileModel(e, PARAMS, COLUMNS);
        const n = rows.length;
        const cols = [Float64Array.from(rows, (r) => r[0]), Float64Array.from(rows, (r) => r[1])];
        const out = new Float64Array(n);
        const jac = new Float64Array(n * 3);
        m.valueAndJacobian(Float64Array.from(theta), cols, n, out, jac);
        for (let i = 0; i < n; i++) {
          const f = evalAt(e, theta, rows[i][0], rows[i][1]);
          if (!Number.isFinite(f) || Math.abs(f) > 1e6) continue;
          for (let j = 0; j < 3; j++) {
            const at = (h: number) => {
              const tp = theta.slice();
              tp[j] += h;
              return evalAt(e, tp, rows[i][0], rows[i][1]);
            };
            const h = 1e-5 * Math.max(1, Math.abs(theta[j]));
            const d1 = (at(h) - at(-h)) / (2 * h);
            const d2 = (at(h / 2) - at(-h / 2)) / h;
            const forward = (at(h) - f) / h;
            const backward = (f - at(-h)) / h;
            // Only where the difference quotients are self-consistent and one-sided ones
            // agree (a smooth neighbourhood, not a kink or jump of abs/min/max/when).
            if (!Number.isFinite(d2) || Math.abs(d1 - d2) > 1e-6 * (1 + Math.abs(d2))) continue;
            if (Math.abs(forward - backward) > 1e-3 * (1 + Math.abs(d2))) continue;
            expect(Math.abs(jac[j * n + i] - d2)).toBeLessThanOrEqual(1e-5 * (1 + Math.abs(d2)) + 1e-9 * Math.abs(f));
            checked++;
          }
        }
      }),
      { numRuns: 400, seed: 20240611 },
    );
    expect(checked).toBeGreaterThan(500);
  });

  it('value kernels agree with a tree-walking interpreter on random expressions', () => {
    fc.assert(
      fc.property(exprArb, point, (e, { theta, rows }) => {
        const m = compileModel(e, PARAMS, COLUMNS);
        const n = rows.length;
        const cols = [Float64Array.from(rows, (r) => r[0]), Float64Array.from(rows, (r) => r[1])];
        const v = new Float64Array(n);
        const vj = new Float64Array(n);
        m.value(Float64Array.from(theta), cols, n, v);
        m.valueAndJacobian(Float64Array.from(theta), cols, n, vj, new Float64Array(n * 3));
        for (let i = 0; i < n; i++) {
          const want = evalAt(e, theta, rows[i][0], rows[i][1]);
          if (!Number.isFinite(want)) continue;
          // Simplification may re-associate constant factors (c₁·(c₂·x) → (c₁c₂)·x): a few ulp.
          expect(Math.abs(v[i] - want)).toBeLessThanOrEqual(1e-12 * (1 + Math.abs(want)));
          expect(vj[i]).toBe(v[i]);
        }
      }),
      { numRuns: 300, seed: 77 },
    );
  });

  it('double-double kernel agrees with the double kernel to double accuracy', () => {
    fc.assert(
      fc.property(exprArb, point, (e, { theta, rows }) => {
        const m = compileModel(e, PARAMS, COLUMNS);
        const n = rows.length;
        const cols = [Float64Array.from(rows, (r) => r[0]), Float64Array.from(rows, (r) => r[1])];
        const out = new Float64Array(n);
        const jac = new Float64Array(3 * n);
        const [h, l, jh, jl] = [new Float64Array(n), new Float64Array(n), new Float64Array(3 * n), new Float64Array(3 * n)];
        m.valueAndJacobian(Float64Array.from(theta), cols, n, out, jac);
        m.valueAndJacobianExtended(Float64Array.from(theta), cols, n, h, l, jh, jl);
        for (let k = 0; k < n; k++) {
          if (!Number.isFinite(out[k])) continue;
          expect(Math.abs(h[k] + l[k] - out[k])).toBeLessThanOrEqual(1e-9 * (1 + Math.abs(out[k])));
        }
        for (let k = 0; k < 3 * n; k++) {
          if (!Number.isFinite(jac[k])) continue;
          expect(Math.abs(jh[k] + jl[k] - jac[k])).toBeLessThanOrEqual(1e-9 * (1 + Math.abs(jac[k])));
        }
      }),
      { numRuns: 200, seed: 5 },
    );
  });
});
