import { describe, expect, it } from 'vitest';
import { checkMark, type StartParameter } from '../../../engine/solve/start';
import { parameterRoles } from '../../../engine/solve/start/roles';
import { setup } from './helpers';

const p = (name: string, extra: Partial<StartParameter> = {}): StartParameter => ({ name, lower: -Infinity, upper: Infinity, ...extra });
/** Log-spaced doses 0.001 … 19.7 (3-fold), with a zero-dose control: an invented plate layout. */
const doses = [0, ...Array.from({ length: 10 }, (_, k) => 0.001 * 3 ** k)];
const LOGISTIC = 'bot + (top - bot) / (1 + (x / ec)^h)';
const logisticParams = [p('bot'), p('top'), p('ec', { lower: 0 }), p('h', { lower: 0.1, upper: 10 })];
const flatY = doses.map((x) => (x === 0 ? 100 : 2));

describe('solve/start/check', () => {
  it('marks a parameter that ended on a bound (|θ − b| ≤ 1e-8·max(1, |b|))', () => {
    const { input } = setup(LOGISTIC, logisticParams, doses, flatY);
    expect(checkMark(input, Float64Array.of(2, 100, 1e-12, 1))).toBe('ec ended on its lower bound');
    expect(checkMark(input, Float64Array.of(2, 100, 0.5, 10))).toBe('h ended on its upper bound');
    // 2e-8 from the bound 0.1 (tolerance 1e-8·max(1, 0.1) = 1e-8): not on it
    expect(checkMark(input, Float64Array.of(2, 100, 0.5, 0.1 + 2e-8))).toBeNull();
  });

  it('marks a scale of the predictor outside the range the data resolve (the search box, box.ts)', () => {
    const { input } = setup(LOGISTIC, logisticParams, doses, flatY);
    // box of ec: smallest non-zero dose / 10 = 1e-4 to 10 × spread ≈ 197
    expect(checkMark(input, Float64Array.of(2, 100, 2e-6, 4))).toMatch(/^ec ended outside the range the data resolve \(0\.0001 to 197\)$/);
    expect(checkMark(input, Float64Array.of(2, 100, 5e3, 4))).toMatch(/^ec ended outside/);
    expect(checkMark(input, Float64Array.of(2, 100, 2e-4, 4))).toBeNull();
    expect(checkMark(input, Float64Array.of(2, 100, 3, 1.2))).toBeNull();
  });

  it('marks a location outside the data', () => {
    const xs = Array.from({ length: 41 }, (_, i) => i * 0.5);
    const { input } = setup('b + a * exp(-(x - c)^2 / (2 * w^2))', [p('b'), p('a'), p('c'), p('w', { lower: 0 })], xs, xs.map((x) => 1 + 5 * Math.exp(-((x - 8) ** 2) / 2)));
    expect(checkMark(input, Float64Array.of(1, 5, 8, 1))).toBeNull();
    expect(checkMark(input, Float64Array.of(1, 5, 35, 1))).toMatch(/^c ended outside the range the data resolve \(0 to 20\)$/);
  });

  it('leaves linear parameters and scales of an inverted predictor alone (Ea in exp(-Ea/(R·T)))', () => {
    const ts = Array.from({ length: 9 }, (_, i) => 280 + 10 * i);
    const model = 'A * exp(-Ea / (8.314 * x))';
    const { input } = setup(model, [p('A', { lower: 0 }), p('Ea', { lower: 0 })], ts, ts.map((t) => 1e9 * Math.exp(-60000 / (8.314 * t))));
    const roles = parameterRoles(input.structure!.expr, ['x'], input.cols, input.n);
    expect(roles.get('Ea')).toMatchObject({ kind: 'scale', inverse: true });
    // Ea = 60,000 lies far beyond 10 × the spread of T (800 K), yet the data resolve it well
    expect(checkMark(input, Float64Array.of(1e9, 60000))).toBeNull();
    // a linear amplitude is solved exactly by the search and has no box: never marked for its size
    const line = setup('a * x + b * exp(-x / tau)', [p('a'), p('b'), p('tau', { lower: 0 })], ts, ts.map((t) => 3 * t));
    expect(checkMark(line.input, Float64Array.of(1e12, 1, 50))).toBeNull();
  });

  it('reads a role only where it shapes the curve: inside a function or a power with a parameter, at matched powers', () => {
    const xs = Array.from({ length: 20 }, (_, i) => 10 + 5 * i);
    // Chwirut-like: exp(-b1·x)/(b2 + b3·x); b3·x is a term of a plain sum, compared with b2, not with 1
    const ratio = setup('exp(-b1 * x) / (b2 + b3 * x)', [p('b1'), p('b2'), p('b3')], xs, xs.map((x) => Math.exp(-0.19 * x) / (0.006 + 0.01 * x)));
    expect(checkMark(ratio.input, Float64Array.of(0.19, 0.006, 1e-3))).toBeNull();
    // ... while b1 inside exp is a rate of x: far beyond what 5-unit spacing resolves (box to 10/5 = 2)
    expect(checkMark(ratio.input, Float64Array.of(40, 0.006, 0.01))).toMatch(/^b1 ended outside the range the data resolve/);
    // a coefficient of x³ in a denominator (rational, Hahn1-like) has units of 1/x³, not a rate of x
    const rational = setup('(a0 + a1 * x) / (1 + b1 * x + b3 * x^3)', [p('a0'), p('a1'), p('b1'), p('b3')], xs, xs.map((x) => (1 + x) / (1 + 0.01 * x + 1e-9 * x ** 3)));
    expect(checkMark(rational.input, Float64Array.of(1, 1, 0.01, 1e-9))).toBeNull();
  });

  it('needs the structure for the role test (the bound test works without it)', () => {
    const { input } = setup(LOGISTIC, logisticParams, doses, flatY, false);
    expect(checkMark(input, Float64Array.of(2, 100, 2e-6, 4))).toBeNull();
    expect(checkMark(input, Float64Array.of(2, 100, 0, 4))).toBe('ec ended on its lower bound');
  });
});
