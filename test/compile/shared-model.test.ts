import { describe, expect, it } from 'vitest';
import type { Expr } from '../../parser/plan';
import { compileModel, exprKey, sharedModel } from '../../engine/compile';

const num = (value: number): Expr => ({ kind: 'number', value });
const param = (name: string): Expr => ({ kind: 'param', name });
const col = (name: string): Expr => ({ kind: 'column', name });
/** a·exp(−k·x) + c0 */
const decay = (c0: number): Expr => ({
  kind: 'binary', op: '+',
  left: { kind: 'binary', op: '*', left: param('a'), right: { kind: 'call', fn: 'exp', args: [{ kind: 'binary', op: '*', left: { kind: 'negate', arg: param('k') }, right: col('x') }] } },
  right: num(c0),
});

describe('engine/compile sharedModel', () => {
  it('gives one model for the same expression, parameters and columns, also for a structural copy', () => {
    const e = decay(1);
    const m = sharedModel(e, ['a', 'k'], ['x']);
    expect(sharedModel(e, ['a', 'k'], ['x'])).toBe(m);
    expect(sharedModel(structuredClone(e), ['a', 'k'], ['x'])).toBe(m);
    // with a source range (the checker's) the structure is the same
    expect(sharedModel({ ...e, range: { start: { line: 3, column: 1 }, end: { line: 3, column: 9 } } } as Expr, ['a', 'k'], ['x'])).toBe(m);
    expect(sharedModel(e, ['k', 'a'], ['x'])).not.toBe(m);
    expect(sharedModel(decay(2), ['a', 'k'], ['x'])).not.toBe(m);
    expect(sharedModel(e, ['a', 'k'], ['x', 'w'])).not.toBe(m);
  });

  it('tells apart numbers that plain JSON writes alike (−0 and 0, NaN and ±Infinity)', () => {
    const keys = [0, -0, NaN, Infinity, -Infinity, 1e-300].map((v) => exprKey(decay(v)));
    expect(new Set(keys).size).toBe(keys.length);
    const zero = sharedModel(decay(0), ['a', 'k'], ['x']);
    const minusZero = sharedModel(decay(-0), ['a', 'k'], ['x']);
    expect(minusZero).not.toBe(zero);
  });

  it('computes what a model compiled on its own computes', () => {
    const e = decay(0.5);
    const shared = sharedModel(e, ['a', 'k'], ['x']);
    const own = compileModel(e, ['a', 'k'], ['x']);
    const x = Float64Array.from({ length: 20 }, (_, i) => i / 4);
    const theta = Float64Array.from([2.5, 0.7]);
    const f1 = new Float64Array(20), j1 = new Float64Array(40), f2 = new Float64Array(20), j2 = new Float64Array(40);
    shared.valueAndJacobian(theta, [x], 20, f1, j1);
    own.valueAndJacobian(theta, [x], 20, f2, j2);
    expect(f1).toEqual(f2);
    expect(j1).toEqual(j2);
    expect(shared.source).toEqual(own.source);
  });
});
