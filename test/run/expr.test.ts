import { describe, expect, it } from 'vitest';
import { analyze } from '../../parser/index';
import { isLinearInParameters } from '../../engine/compile';
import { columnsOf, exprText, holdParams, paramsOf, substituteParams } from '../../parser/plan-expr';
import type { Expr } from '../../parser/plan';

function model(text: string): Expr {
  const { plan } = analyze(`data d = "x.csv"\nfit f on d {\n  model y = ${text}\n  param a\n  param b\n  param k\n}`);
  return plan.fits[0].blocks[0].model;
}

describe('run/expr', () => {
  it('lists columns in first-appearance order and parameters', () => {
    const e = model('a * exp(-k * t) + b * "temp (°C)" + t');
    expect(columnsOf(e)).toEqual(['t', 'temp (°C)']);
    expect([...paramsOf(e)].sort()).toEqual(['a', 'b', 'k']);
  });

  it('prints expressions so they read back the same', () => {
    for (const text of ['a * exp(-k * t) + b', '-x ^ 2', '(-x) ^ 2', 'a - (b - x)', 'a / (b * x)', 'x ^ a ^ b', '"temp (°C)" * a']) {
      const e = model(text);
      expect(exprText(model(exprText(e)))).toBe(exprText(e));
    }
    expect(exprText(model('a - (b - x)'))).toBe('a - (b - x)');
    expect(exprText(model('(-x) ^ 2'))).toBe('(-x) ^ 2');
  });

  it('substitutes fixed parameters and holds others for partial linearity tests', () => {
    const e = model('a * exp(-k * t) + b');
    expect(paramsOf(substituteParams(e, new Map([['k', 0.5]])))).toEqual(new Set(['a', 'b']));
    // linear in (a, b) with k held; not linear in (a, k) with b held
    expect(isLinearInParameters(holdParams(e, new Set(['k'])), ['a', 'b'])).toBe(true);
    expect(isLinearInParameters(holdParams(e, new Set(['b'])), ['a', 'k'])).toBe(false);
  });
});
