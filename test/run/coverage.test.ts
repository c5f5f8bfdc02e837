/**
 * Monte-Carlo coverage of the Student-t parameter intervals produced by
 * runFit (common practice: a 95 % interval should cover the true value in
 * about 95 % of repeated samples). 300 samples: the binomial standard error
 * of the coverage is about 1.3 %, so [0.91, 0.99] is a ±3 SE acceptance band.
 */
import { describe, expect, it } from 'vitest';
import { analyze } from '../../parser/index';
import { runFit } from '../../engine/run/fit';
import type { FitData } from '../../engine/run/fit-data';
import { normals } from './helpers';

const { plan } = analyze(`data d = "x.csv"
fit line on d {
  model y = a + b * x
  param a
  param b
}
fit decay on d {
  model y = amp * exp(-k * x)
  param amp
  param k
}`);

function data(xs: Float64Array, y: Float64Array): FitData {
  return {
    fit: 'f', source: 'd', file: 'x.csv', n: xs.length, modelColumns: ['x'], columns: [xs],
    lines: Int32Array.from(xs, (_, i) => i + 2), y, weights: null, sigmaAbsolute: false,
    x: xs, predictor: 'x', rowsDropped: 0, rowsWithoutGroup: 0,
  };
}

describe('run/fit interval coverage (Monte Carlo)', () => {
  it('95 % intervals cover the true slope and rate about 95 % of the time', () => {
    const xs = Float64Array.from({ length: 20 }, (_, i) => i * 0.5);
    let line = 0;
    let decay = 0;
    const N = 300;
    for (let s = 1; s <= N; s++) {
      const e = normals(1000 + s, 20);
      const b = runFit(plan.fits[0], data(xs, xs.map((x, i) => 2 + 3 * x + 0.4 * e[i]))).parameters[1];
      if (b.lower! <= 3 && 3 <= b.upper!) line++;
      const k = runFit(plan.fits[1], data(xs, xs.map((x, i) => 5 * Math.exp(-0.3 * x) + 0.05 * e[i]))).parameters[1];
      if (k.lower! <= 0.3 && 0.3 <= k.upper!) decay++;
    }
    expect(line / N).toBeGreaterThan(0.91);
    expect(line / N).toBeLessThan(0.99);
    expect(decay / N).toBeGreaterThan(0.91);
    expect(decay / N).toBeLessThan(0.99);
  });
});
