import { describe, expect, it } from 'vitest';
import { boundHolds, checkExpectations, statisticValue } from '../../engine/run/expectations';
import { STATISTICS } from '../../parser/registry/statistics';
import { failedFit } from '../../engine/run/fit-result';
import type { Expectation, FitPlan, Range } from '../../parser/plan';
import type { FitResult } from '../../engine/result';

const range: Range = { start: { line: 1, column: 1, offset: 0 }, end: { line: 1, column: 2, offset: 1 } };
const fitPlan: FitPlan = {
  name: 'f',
  blocks: [{ data: 'd', response: { kind: 'column', name: 'y' }, model: { kind: 'param', name: 'c' }, columns: ['y'], range }],
  parameters: [{ name: 'c', initial: 1, fixed: false, scope: 'shared', range }],
  options: { method: 'auto', loss: 'squared', lossScale: 1, level: 0.95 },
  range,
};

function result(over: (r: FitResult) => void): FitResult {
  const r = failedFit(fitPlan, null, { code: 'exact', message: 'direct solve', converged: true }, []);
  over(r);
  return r;
}

describe('run/expectations', () => {
  it('bounds: within is inclusive, above/below strict, non-finite fails', () => {
    expect(boundHolds(1, { kind: 'within', low: 1, high: 2 })).toBe(true);
    expect(boundHolds(2.0001, { kind: 'within', low: 1, high: 2 })).toBe(false);
    expect(boundHolds(1, { kind: 'above', value: 1 })).toBe(false);
    expect(boundHolds(0.5, { kind: 'below', value: 1 })).toBe(true);
    expect(boundHolds(NaN, { kind: 'below', value: 1 })).toBe(false);
  });

  it('reads every named statistic', () => {
    const r = result((x) => {
      Object.assign(x.goodness, { r2: 0.1, adjR2: 0.2, rmse: 0.3, ssr: 0.4, chi2: 0.5, chi2Reduced: 0.6, aic: 0.7, aicc: 0.8, bic: 0.9, n: 10, dof: 9 });
      x.iterations = 7;
    });
    const names = ['r2', 'adj_r2', 'rmse', 'ssr', 'chi2', 'chi2_reduced', 'aic', 'aicc', 'bic', 'n', 'dof', 'iterations'] as const;
    expect([...names].sort()).toEqual([...STATISTICS].sort());
    expect(names.map((n) => statisticValue(r, n))).toEqual([0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9, 10, 9, 7]);
  });

  it('checks parameters and standard errors, with messages', () => {
    const r = result((x) => {
      x.parameters[0].estimate = 3.25;
      x.parameters[0].stderr = 0.5;
    });
    const exps: Expectation[] = [
      { target: { kind: 'parameter', fit: 'f', name: 'c', of: 'estimate' }, bound: { kind: 'within', low: 3, high: 4 }, text: '', range },
      { target: { kind: 'parameter', fit: 'f', name: 'c', of: 'stderr' }, bound: { kind: 'below', value: 0.1 }, text: '', range },
      { target: { kind: 'parameter', fit: 'f', name: 'zz', of: 'estimate' }, bound: { kind: 'above', value: 0 }, text: '', range },
      { target: { kind: 'statistic', fit: 'nofit', name: 'r2' }, bound: { kind: 'above', value: 0 }, text: '', range },
    ];
    const out = checkExpectations(exps, new Map([['f', [r]]]));
    expect(out.map((o) => o.passed)).toEqual([true, false, false, false]);
    expect(out[0].message).toBe('f.c = 3.25 is within 3 .. 4');
    expect(out[1].message).toBe('f.c.se = 0.5 is not below 0.1');
    expect(out[2].message).toContain('no parameter zz');
    expect(out[3].message).toContain('has no result');
  });
});
