import { describe, expect, it } from 'vitest';
import { analyze } from '../../../parser/index';
import { canonical, key } from '../../../engine/solve/start/canonical';
import { recogniseShape } from '../../../engine/solve/start/recognise';
import { guessStart } from '../../../engine/solve/start';
import { setup } from './helpers';

/** The model expression of a one-fit spec over columns x (and t). */
function model(text: string, params: string[]) {
  const decl = params.map((p) => `  param ${p}`).join('\n');
  const { plan, diagnostics } = analyze(`data d = "d.csv"\nfit f on d {\n  model y = ${text}\n${decl}\n}`);
  expect(diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
  return plan.fits[0].blocks[0].model;
}
const family = (text: string, params: string[]) => recogniseShape({ structure: { expr: model(text, params), columns: ['x'] } })?.shape.family ?? null;

describe('solve/start/canonical', () => {
  it('reads sums and products in any order, numbers folded, numeric powers as exponents', () => {
    const same = (a: string, b: string, params: string[]) => expect(key(canonical(model(a, params)))).toBe(key(canonical(model(b, params))));
    same('a + b * x', 'x * b + a', ['a', 'b']);
    same('a / b^2', 'a * b^-2', ['a', 'b']);
    same('a / (b * b)', 'a / b^2', ['a', 'b']);
    same('((x - c) / w)^2', '(x - c)^2 / w^2', ['c', 'w']);
    same('2 * a * 3', '6 * a', ['a']);
    same('-(a - b)', 'b - a', ['a', 'b']);
  });
});

describe('solve/start/recognise', () => {
  it('recognises each template family in several written forms, with any parameter names', () => {
    expect(family('bottom + (top - bottom) / (1 + (x / ec50)^hill)', ['bottom', 'top', 'ec50', 'hill'])).toBe('4-parameter logistic');
    expect(family('(t1 - b1) / (1 + (m / x)^s) + b1', ['b1', 't1', 'm', 's'])).toBe('4-parameter logistic');
    expect(family('lo + (hi - lo) / (1 + (x / c)^(-h))', ['lo', 'hi', 'c', 'h'])).toBe('4-parameter logistic');
    expect(family('base + h * exp(-(x - c)^2 / (2 * w^2))', ['base', 'h', 'c', 'w'])).toBe('Gaussian peak');
    expect(family('h * exp(-0.5 * ((c - x) / w)^2)', ['h', 'c', 'w'])).toBe('Gaussian peak');
    expect(family('y_inf + a * exp(-x / tau)', ['y_inf', 'a', 'tau'])).toBe('exponential with offset');
    expect(family('c - a * exp(-k * x)', ['c', 'a', 'k'])).toBe('exponential with offset');
    expect(family('blank + amp * (1 - exp(-k * x))', ['blank', 'amp', 'k'])).toBe('rise to a plateau');
    expect(family('b1 * (1 - exp(-b2 * x))', ['b1', 'b2'])).toBe('rise to a plateau');
    expect(family('21.5 + rise * exp(-x / tau)', ['rise', 'tau'])).toBe('exponential');
    expect(family('n0 * exp(r * x)', ['n0', 'r'])).toBe('exponential');
    expect(family('vmax * x / (km + x)', ['vmax', 'km'])).toBe('Michaelis–Menten');
    expect(family('a * x^b', ['a', 'b'])).toBe('power law');
    expect(family('A * exp(-Ea * 1000 / (8.314 * (x + 273.15)))', ['A', 'Ea'])).toBe('Arrhenius');
  });

  it('does not recognise other shapes (the general method takes them)', () => {
    expect(family('a * exp(-b * x) + c * exp(-d * x)', ['a', 'b', 'c', 'd'])).toBeNull();
    expect(family('a + b * x', ['a', 'b'])).toBeNull();
    expect(family('base + h * exp((x - c)^2 / w^2)', ['base', 'h', 'c', 'w'])).toBe('Gaussian peak'); // the shape matches; its start refuses k > 0
    expect(family('a * x / (a + x)', ['a'])).toBeNull(); // one parameter twice: not Michaelis–Menten's two
  });

  it('starts a 4-parameter logistic with zero-dose controls from its data (invented plate, noise-free)', () => {
    const doses = [0, 0, 0.1, 0.3, 1, 3, 10, 30, 100, 300];
    const f = (d: number) => 90 + (5 - 90) / (1 + (d / 4) ** 1.4);
    const { input, ssr } = setup('top + (bottom - top) / (1 + (x / ec50)^hill)', ['top', 'bottom', 'ec50', 'hill'].map((name) => ({ name, lower: name === 'ec50' ? 0 : -Infinity, upper: Infinity })), doses, doses.map(f));
    const g = guessStart(input);
    expect(g.how).toContain('4-parameter logistic');
    const [top, bottom, ec50, hill] = g.theta;
    // the heuristic lands in the basin: plateaus within 10 %, ec50 within a factor 2, slope within 30 %
    expect(Math.abs(bottom - 5)).toBeLessThan(9);
    expect(Math.abs(top - 90) / 90).toBeLessThan(0.1);
    expect(Math.abs(Math.log(ec50 / 4))).toBeLessThan(Math.log(2));
    expect(Math.abs(hill - 1.4) / 1.4).toBeLessThan(0.3);
    expect(ssr(g.theta)).toBeLessThan(0.05 * ssr(Float64Array.of(100, 0, 1, 1)));
  });
});
