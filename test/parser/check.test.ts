import { describe, expect, it } from 'vitest';
import { analyze, check, parse } from '../../parser/index';
import { show, specs } from './helpers';
import type { FitPlan } from '../../parser/plan';
import { DEFAULT_OPTIONS } from '../../parser/check-options';

function fitOf(text: string, ctx?: Parameters<typeof analyze>[1]): FitPlan {
  const { plan, diagnostics } = analyze(text, ctx);
  expect(diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
  return plan.fits[0];
}

describe('parser/check plan', () => {
  it('folds constants, pi and e into numbers, and a negated literal into one number', () => {
    const f = fitOf('const g0 = 9.81\ndata d = "a.csv"\nfit f on d {\n  model y = g0 * a * x + pi - e * -2\n  param a\n}');
    expect(show(f.blocks[0].model)).toBe(`((((9.81 * par:a) * col:x) + ${Math.PI}) - (${Math.E} * -2))`);
  });

  it('resolves parameters before constants and columns', () => {
    const f = fitOf('data d = "a.csv"\nfit f on d {\n  model y = k * t\n  param k\n}');
    expect(show(f.blocks[0].model)).toBe('(par:k * col:t)');
    expect(show(f.blocks[0].response)).toBe('col:y');
  });

  it('lists every column read and the single predictor', () => {
    const f = fitOf('data d = "a.csv"\nfit f on d {\n  model ln(y / y0) = k * t\n  param k\n  sigma s\n  weight w\n}');
    expect(f.blocks[0].columns).toEqual(['y', 'y0', 't', 's', 'w']);
    expect(f.blocks[0].predictor).toBe('t');
    const two = fitOf('data d = "a.csv"\nfit f on d {\n  model y = a * x + b * z\n  param a\n  param b\n}');
    expect(two.blocks[0].predictor).toBeUndefined();
  });

  it('applies the documented option defaults', () => {
    const f = fitOf('data d = "a.csv"\nfit f on d {\n  model y = a * x\n  param a\n}');
    expect(f.options).toEqual({ method: 'auto', loss: 'squared', level: 0.95 });
    expect(f.options).toEqual(DEFAULT_OPTIONS);
    expect(f.groupBy).toBeUndefined();
  });

  it('reads options, per and parameter settings', () => {
    const f = fitOf(`data d = "a.csv"
fit f on d {
  model y = a * x + b
  param a = 2 in [0, inf] [mg/L]
  param b = -1 in [-inf, 5] fixed
  method gradient_descent
  loss pseudo_huber scale 0.3
  level 0.99
  iterations 1000
  tolerance 1e-6
  rate 0.05
  per "batch no"
}`);
    expect(f.options).toEqual({ method: 'gradient_descent', loss: 'pseudo_huber', lossScale: 0.3, level: 0.99, maxIterations: 1000, tolerance: 1e-6, learningRate: 0.05 });
    expect(f.groupBy).toBe('batch no');
    const [a, b] = f.parameters;
    expect(a).toMatchObject({ name: 'a', initial: 2, lower: 0, fixed: false, unit: 'mg/L', scope: 'shared' });
    expect('upper' in a).toBe(false); // infinite bound omitted: JSON has no Infinity
    expect(b).toMatchObject({ name: 'b', initial: -1, upper: 5, fixed: true });
    expect('lower' in b).toBe(false);
    expect(JSON.parse(JSON.stringify(f))).toEqual(f);
  });

  it('uses constants and pi as parameter values and bounds', () => {
    const f = fitOf('const top = 50\ndata d = "a.csv"\nfit f on d {\n  model y = a * sin(x + p)\n  param a = top in [0, top]\n  param p in [-pi, pi]\n}');
    expect(f.parameters[0]).toMatchObject({ initial: 50, lower: 0, upper: 50 });
    expect(f.parameters[1]).toMatchObject({ lower: -Math.PI, upper: Math.PI });
  });

  it('builds data sources with filter, delimiter and decimal', () => {
    const { plan } = analyze('data d = "x;y.csv" where t >= 0 and not (flag == 1) delimiter "tab" decimal ","');
    expect(plan.data[0]).toMatchObject({ name: 'd', path: 'x;y.csv', delimiter: '\t', decimal: ',' });
    expect(show(plan.data[0].filter!)).toBe('((col:t >= 0) and (not (col:flag == 1)))');
  });

  it('builds queries and expectations', () => {
    const { plan, diagnostics } = analyze(`data d = "a.csv"
fit f on d {
  model y = a * exp(k * x)
  param a
  param k
}
fit g on d {
  model y = a + b * x
  param a
  param b
}
predict f at x = 1, 2.5
invert g at y = 10
compare f, g
expect f.k within -0.5 .. -0.1
expect f.a.se below 0.2
expect g.r2 above 0.9`);
    expect(diagnostics).toEqual([]);
    expect(plan.queries.map((q) => ({ ...q, range: undefined }))).toEqual([
      { kind: 'predict', fit: 'f', variable: 'x', values: [1, 2.5], range: undefined },
      { kind: 'invert', fit: 'g', response: 'y', values: [10], range: undefined },
      { kind: 'compare', fits: ['f', 'g'], range: undefined },
    ]);
    expect(plan.expectations.map((x) => [x.target, x.bound, x.text])).toEqual([
      [{ kind: 'parameter', fit: 'f', name: 'k', of: 'estimate' }, { kind: 'within', low: -0.5, high: -0.1 }, 'f.k within -0.5 .. -0.1'],
      [{ kind: 'parameter', fit: 'f', name: 'a', of: 'stderr' }, { kind: 'below', value: 0.2 }, 'f.a.se below 0.2'],
      [{ kind: 'statistic', fit: 'g', name: 'r2' }, { kind: 'above', value: 0.9 }, 'g.r2 above 0.9'],
    ]);
  });

  it('a parameter name wins over a statistic of the same name', () => {
    const { plan } = analyze('data d = "a.csv"\nfit f on d {\n  model y = x^n\n  param n\n}\nexpect f.n within 1 .. 3');
    expect(plan.expectations[0].target).toEqual({ kind: 'parameter', fit: 'f', name: 'n', of: 'estimate' });
  });

  it('calls the headers callback with the data name and path; a throwing callback means unknown headers', () => {
    const calls: string[][] = [];
    analyze('data d = "sub/a.csv"', { headers: (n, p) => { calls.push([n, p]); return undefined; } });
    expect(calls).toEqual([['d', 'sub/a.csv']]);
    const r = analyze('data d = "a.csv"\nfit f on d {\n  model y = a * x\n  param a\n}', { headers: () => { throw new Error('unreadable'); } });
    expect(r.diagnostics).toEqual([]);
  });

  it('analyze(text) equals check(parse(text).ast) plus the syntax diagnostics', () => {
    for (const s of specs()) {
      const parsed = parse(s.text);
      const checked = check(parsed.ast);
      const both = analyze(s.text);
      expect(both.plan).toEqual(checked.plan);
      expect(both.diagnostics).toEqual([...parsed.diagnostics, ...checked.diagnostics]);
    }
  });

  it('still returns a plan when there are errors', () => {
    const { plan, diagnostics } = analyze('data d = "a.csv"\nfit f on d {\n  model y = a * x +\n  param a\n}');
    expect(diagnostics.some((d) => d.severity === 'error')).toBe(true);
    expect(plan.fits.map((f) => f.name)).toEqual(['f']);
  });
});
