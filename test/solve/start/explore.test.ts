import { describe, expect, it } from 'vitest';
import { explore, searchBox, boxValue, BOX_FACTOR, defaultPoints, isLower, sameMinimum, type StartParameter } from '../../../engine/solve/start';
import { reducedProblem } from '../../../engine/solve/start/reduced';
import { modelProblem } from '../../../engine/solve/model-problem';
import { rationalStart } from '../../../engine/solve/start/rational';
import { parameterRoles } from '../../../engine/solve/start/roles';
import { setup } from './helpers';

const open = (name: string, extra: Partial<StartParameter> = {}): StartParameter => ({ name, lower: -Infinity, upper: Infinity, ...extra });
const xs = Array.from({ length: 101 }, (_, i) => i * 0.1);
/** Invented signal: one sinusoid of angular frequency 3.1 plus a small wobble; the SSR in w has many local minima. */
const wave = xs.map((x) => 1.7 * Math.sin(3.1 * x) + 0.6 * Math.cos(3.1 * x) + 0.01 * Math.sin(17 * x));
const WAVE = 'a * sin(w * x) + b * cos(w * x)';

function waveProblem(wStart: number) {
  const params = [open('a', { initial: 1 }), open('w', { initial: wStart, lower: 0 }), open('b', { initial: 0 })];
  const { input, model } = setup(WAVE, params, xs, wave);
  const problem = modelProblem({ model: model as never, columns: input.cols, response: input.y, n: input.n, lower: Float64Array.of(-Infinity, 0, -Infinity), upper: Float64Array.of(Infinity, Infinity, Infinity) });
  return { input, problem };
}

describe('solve/start/explore', () => {
  it('finds the lower minimum when the given start leads to a local one, and says so', () => {
    const { input, problem } = waveProblem(1.0);
    const out = explore({ start: input, theta0: Float64Array.of(1, 1.0, 0), problem, points: 32 });
    const fromStart = 2 * out.fromStart.cost;
    const best = 2 * out.best.cost;
    expect(out.fromStart.stop.converged).toBe(true);
    // from w = 1 the local solver stops in a side minimum far from the signal's frequency
    expect(Math.abs(out.fromStart.theta[1] - 3.1)).toBeGreaterThan(0.5);
    expect(out.best.theta[1]).toBeCloseTo(3.1, 3);
    expect(best).toBeLessThan(0.01 * fromStart);
    expect(out.lowerElsewhere).toBe(true);
    expect(out.minima[0].ssr).toBeCloseTo(best, 10);
    expect(out.minima.some((m) => m.fromStart && sameMinimum(m.ssr, fromStart, 0))).toBe(true);
    expect(out.points).toBe(34);
    expect(out.refined).toBeGreaterThan(0);
    // deterministic
    const again = explore({ start: input, theta0: Float64Array.of(1, 1.0, 0), problem, points: 32 });
    expect(Array.from(again.best.theta)).toEqual(Array.from(out.best.theta));
  });

  it('keeps the fit from the start when nothing lower exists', () => {
    const { input, problem } = waveProblem(3.0);
    const out = explore({ start: input, theta0: Float64Array.of(1, 3.0, 0), problem, points: 16 });
    expect(out.fromStart.theta[1]).toBeCloseTo(3.1, 3);
    expect(out.lowerElsewhere).toBe(false);
    expect(isLower(2 * out.best.cost, 2 * out.fromStart.cost, 0)).toBe(false);
  });

  it('skips the design for a model linear in its parameters', () => {
    const { input, model } = setup('a + b * x', [open('a'), open('b')], xs, xs.map((x) => 2 + x));
    const problem = modelProblem({ model: model as never, columns: input.cols, response: input.y, n: input.n });
    const out = explore({ start: input, theta0: Float64Array.of(0, 0), problem });
    expect(out.skipped).toBe('the model is linear in its parameters');
    expect(out.points).toBe(0);
    expect(out.best).toBe(out.fromStart);
  });

  it('uses 32 points per nonlinear parameter, 32 to 256', () => {
    expect([1, 2, 5, 8, 12].map(defaultPoints)).toEqual([32, 64, 160, 256, 256]);
  });
});

describe('solve/start/reduced', () => {
  it("Kaufman's Jacobian gives the exact gradient of the reduced sum of squares (central differences)", () => {
    const { input } = waveProblem(2.0);
    // a, b linear; w nonlinear
    const red = reducedProblem(input, Float64Array.of(0, 2.0, 0), [0, 2], [1]);
    for (const w of [0.7, 2.3, 3.4]) {
      const r = new Float64Array(input.n);
      const J = new Float64Array(input.n);
      red.residualsAndJacobian!(Float64Array.of(w), r, J);
      let g = 0;
      for (let i = 0; i < input.n; i++) g += J[i] * r[i];
      const half = (v: number) => {
        const rr = new Float64Array(input.n);
        red.residuals(Float64Array.of(v), rr);
        return 0.5 * rr.reduce((s, x) => s + x * x, 0);
      };
      const h = 1e-6;
      const fd = (half(w + h) - half(w - h)) / (2 * h);
      expect(Math.abs(g - fd)).toBeLessThan(1e-6 * Math.max(1, Math.abs(fd)));
      const full = red.fullTheta(Float64Array.of(w));
      expect(full[1]).toBe(w);
    }
  });
});

describe('solve/start/box', () => {
  it('spans the bounds, a location over the data, and two decades around an open guess', () => {
    expect(searchBox(open('k', { lower: 0.01, upper: 100 }), 1, undefined)).toMatchObject({ lower: 0.01, upper: 100, scale: 'log' });
    expect(searchBox(open('m', { lower: -1, upper: 1 }), 0, undefined)).toMatchObject({ lower: -1, upper: 1, scale: 'linear' });
    expect(searchBox(open('c'), 5, { kind: 'location', min: 10, max: 90, transformed: true })).toMatchObject({ lower: 10, upper: 90, scale: 'linear' });
    const g = searchBox(open('q'), -3, undefined);
    expect(g).toMatchObject({ lower: -3 * BOX_FACTOR, upper: -3 / BOX_FACTOR, scale: 'log' });
    const b = searchBox(open('tau', { lower: 2 }), 12, undefined);
    expect(boxValue(b, 0)).toBeCloseTo(2 + 10 / BOX_FACTOR, 12);
    expect(boxValue(b, 0.5)).toBeCloseTo(2 + 10, 10);
    const decay = { kind: 'scale' as const, spread: 60, spacing: 2, smallest: 2, periodic: false, inverse: false, unit: true, transformed: true };
    expect(searchBox(open('tau', { lower: 0 }), 1, decay)).toMatchObject({ lower: 0.2, upper: 600, scale: 'log' });
    // a period: not below twice the spacing (shorter ones are aliases)
    expect(searchBox(open('p'), 30, { ...decay, periodic: true })).toMatchObject({ lower: 4, upper: 600, scale: 'log' });
    // a potency bounded in [0, 1000] on doses from 0.001: searched by decades down to a tenth of the lowest dose
    expect(searchBox(open('ec', { lower: 0, upper: 1000 }), 1, { kind: 'scale', spread: 20, spacing: 0.001, smallest: 0.001, periodic: false, inverse: false, unit: true, transformed: true })).toMatchObject({ lower: 1e-4, upper: 200, scale: 'log' });
  });

  it('reads roles from the model structure: location, scale, rate, periodic', () => {
    const { input } = setup('h * exp(-(x - c)^2 / w^2) + a * exp(-k * x) + s * sin(2 * pi * x / p)', ['h', 'c', 'w', 'a', 'k', 's', 'p'].map((n) => open(n)), xs, xs);
    const roles = parameterRoles(input.structure!.expr, ['x'], input.cols, input.n);
    expect(roles.get('c')).toMatchObject({ kind: 'location', min: 0 });
    expect((roles.get('c') as { max: number }).max).toBeCloseTo(10, 12);
    expect(roles.get('w')).toMatchObject({ kind: 'scale', periodic: false });
    expect(roles.get('k')).toMatchObject({ kind: 'rate', periodic: false });
    expect(roles.get('p')).toMatchObject({ kind: 'scale', periodic: true });
    expect(roles.get('h')).toBeUndefined();
  });
});

describe('solve/start/rational', () => {
  it('recovers an exact rational function by the linearised (Levy) solve', () => {
    const f = (x: number) => (1 + 2 * x + 0.5 * x * x) / (1 + 0.3 * x + 0.1 * x * x);
    const params = ['b1', 'b2', 'b3', 'b4', 'b5'].map((n) => open(n));
    const { input } = setup('(b1 + b2 * x + b3 * x^2) / (1 + b4 * x + b5 * x^2)', params, xs, xs.map(f));
    const r = rationalStart(input, [0, 1, 2, 3, 4])!;
    expect(r.how).toContain('linearised rational least squares');
    [1, 2, 0.5, 0.3, 0.1].forEach((v, j) => expect(r.theta[j]).toBeCloseTo(v, 8));
  });

  it('declines models that are not a ratio of linear parts', () => {
    const { input } = setup('exp(-b1 * x) / (b2 + b3 * x)', ['b1', 'b2', 'b3'].map((n) => open(n)), xs, xs.map((x) => Math.exp(-0.1 * x) / (1 + x)));
    expect(rationalStart(input, [0, 1, 2])).toBeNull();
  });
});
