import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { compileModel } from '../../engine/compile/index';
import { infix } from '../strd/infix';

/**
 * engine/compile derive.ts: values and exact derivatives of power forms at a
 * zero base (removable singularities and the genuine ones), in the double
 * and the double-double kernels.
 * References: (1) limits from calculus (from memory): u^b ≡ 0 for b > 0 at
 * u = 0, so its derivative in b is 0 (u·ln u → 0 as u → 0⁺); u^0 ≡ 1; (2)
 * mpmath 1.3.0 at 50 digits (high-precision finite differences, mpmath.diff),
 * fixture test/compile/fixtures/power-limits.json from power-limits.py.
 */

interface Evaluated { value: number; jac: number[]; valueDD: number; jacDD: number[] }

function evaluate(formula: string, params: string[], theta: number[], x: number): Evaluated {
  const m = compileModel(infix(formula, params), params, ['x']);
  const p = params.length;
  const t = Float64Array.from(theta);
  const cols = [Float64Array.of(x)];
  const out = new Float64Array(1);
  const jac = new Float64Array(p);
  m.valueAndJacobian(t, cols, 1, out, jac);
  const [vh, vl, jh, jl] = [new Float64Array(1), new Float64Array(1), new Float64Array(p), new Float64Array(p)];
  m.valueAndJacobianExtended(t, cols, 1, vh, vl, jh, jl);
  return { value: out[0], jac: Array.from(jac), valueDD: vh[0] + vl[0], jacDD: Array.from(jh, (h, j) => h + jl[j]) };
}

/** Parameters as base and exponent (`t^p`), no data column involved. */
function power(t: number, p: number): Evaluated {
  return evaluate('t^p + 0*x', ['t', 'p'], [t, p], 1);
}

describe('engine/compile derivative limits at a zero base', () => {
  it('t^p at t = 0 by the sign of p (table in derive.ts)', () => {
    // value, ∂/∂t, ∂/∂p
    const table: [number, number, number, number][] = [
      [2.5, 0, 0, 0], // p > 1: value 0, slope 0, ∂/∂p 0 (limit)
      [2, 0, 0, 0], // integer p > 1
      [1, 0, 1, 0], // p = 1: slope 1
      [0.5, 0, Infinity, 0], // 0 < p < 1: infinite slope (genuine), ∂/∂p limit 0
      [0, 1, 0, -Infinity], // p = 0: value 1, slope 0 (t^0 ≡ 1), no derivative in p
    ];
    // (double-double products of an infinity give NaN: there only "not finite" is asserted)
    const dd = (v: number, want: number) => (Number.isFinite(want) ? expect(v === 0 ? 0 : v).toBe(want) : expect(Number.isFinite(v)).toBe(false));
    for (const [p, value, dt, dp] of table) {
      const r = power(0, p);
      expect(r.value).toBe(value);
      expect(r.jac[0] === 0 ? 0 : r.jac[0]).toBe(dt);
      expect(r.jac[1] === 0 ? 0 : r.jac[1]).toBe(dp);
      expect(r.valueDD).toBe(value);
      dd(r.jacDD[0], dt);
      dd(r.jacDD[1], dp);
    }
    // p < 0: a pole, left non-finite (the solvers reject such a step)
    const pole = power(0, -1.5);
    expect(pole.value).toBe(Infinity);
    expect(Number.isFinite(pole.jac[0])).toBe(false);
  });

  it('dose 0 in a 4-parameter logistic: finite Jacobian with the limits, for h below and above 1', () => {
    for (const h of [0.3, 0.5, 1, 1.55, 4]) {
      const r = evaluate('bot + (top - bot)/(1 + (x/ec)^h)', ['bot', 'top', 'ec', 'h'], [2, 95, 0.0102, h], 0);
      expect(r.value).toBe(95);
      expect(r.jac.map((v) => (v === 0 ? 0 : v))).toEqual([0, 1, 0, 0]);
      expect(r.jacDD.map((v) => (v === 0 ? 0 : v))).toEqual([0, 1, 0, 0]);
    }
  });

  it('t = 0 in a·t^k, exp(−(t/τ)^β) and sqrt(x·c): zero derivatives, not NaN', () => {
    expect(evaluate('a*x^k', ['a', 'k'], [2, 0.7], 0).jac.map(Math.abs)).toEqual([0, 0]);
    expect(evaluate('exp(-(x/tau)^beta)', ['tau', 'beta'], [2, 0.6], 0)).toMatchObject({ value: 1 });
    expect(evaluate('exp(-(x/tau)^beta)', ['tau', 'beta'], [2, 0.6], 0).jac.map(Math.abs)).toEqual([0, 0]);
    expect(evaluate('sqrt(x*c)', ['c'], [2], 0).jac.map(Math.abs)).toEqual([0]);
  });

  it('a singularity that is not removable stays non-finite: cos(sqrt(c)) at c = 0 (inner slope infinite, outer 0)', () => {
    // d/dc cos(√c) → −1/2 as c → 0⁺, but the chain rule meets −sin(0)·∞; no rule may claim 0 here
    const r = evaluate('cos(sqrt(c)) + 0*x', ['c'], [0], 1);
    expect(Number.isFinite(r.jac[0])).toBe(false);
  });

  it('agrees with mpmath at and near the zero base (fixture power-limits.json)', () => {
    const fixture = JSON.parse(readFileSync(new URL('./fixtures/power-limits.json', import.meta.url), 'utf8')) as {
      source: string;
      cases: { id: string; formula: string; params: string[]; theta: string[]; x: string; value: string; jacobian: string[] }[];
    };
    expect(fixture.source).toMatch(/^mpmath /);
    expect(fixture.cases.length).toBeGreaterThan(90);
    let compared = 0;
    for (const c of fixture.cases) {
      const r = evaluate(c.formula, c.params, c.theta.map(Number), Number(c.x));
      const check = (got: number, refText: string, what: string) => {
        const ref = Number(refText);
        const label = `${c.id} θ=${c.theta.join(',')} x=${c.x} ${what}: got ${got}, mpmath ${refText}`;
        expect(Number.isFinite(got), label).toBe(true);
        // below the double range the reference rounds to 0 (or a subnormal): compare absolutely
        if (Math.abs(ref) < 1e-290) expect(Math.abs(got), label).toBeLessThanOrEqual(1e-290);
        // relative 1e-13, or absolute 1e-14·max(1, |f|) where a derivative is formed by cancellation
        // (∂/∂bot of the logistic is 1 − 1/(1 + u), for u ≈ 1e-9 a difference of nearly equal numbers)
        else expect(Math.abs(got - ref), label).toBeLessThanOrEqual(Math.max(1e-13 * Math.abs(ref), 1e-14 * Math.max(1, Math.abs(r.value))));
        compared++;
      };
      check(r.value, c.value, 'value');
      check(r.valueDD, c.value, 'value (double-double)');
      c.jacobian.forEach((d, j) => {
        check(r.jac[j], d, `∂/∂${c.params[j]}`);
        check(r.jacDD[j], d, `∂/∂${c.params[j]} (double-double)`);
      });
    }
    expect(compared).toBeGreaterThan(500);
  });
});
