/**
 * A robust loss without `scale`: the scale comes from the residuals' robust
 * spread (engine/solve/loss.ts: k·1.4826·MAD, k from parser/registry/losses.ts),
 * so the fit does not depend on the response's units; the scale and each
 * point's weight are reported (result `robust`, summary line).
 */
import { describe, expect, it } from 'vitest';
import { analyze } from '../../parser/index';
import { runPlanSync } from '../../engine/runner';
import { robustSpread } from '../../engine/solve/loss';
import { runText } from '../../engine/front/views/text';
import { markdownReport } from '../../engine/front/views/markdown';
import type { FitResult } from '../../engine/result';
import { gaussian, rng } from '../fixtures/random';

/** Invented: a pressure transducer calibrated at 24 pressures, three readings hit by a sticking valve (rows 7, 15, 22). */
const KPA = Array.from({ length: 24 }, (_, i) => i * 10);
const VOLTS = [0.4028, 0.5978, 0.8035, 1.0146, 1.2041, 1.6095, 1.5933, 1.7917, 1.9928, 2.1889, 2.3826, 2.5844, 2.7819, 2.802, 3.185, 3.3586, 3.5677, 3.7685, 3.9697, 4.1661, 4.6849, 4.5617, 4.7505, 4.9461];

function fit(ys: readonly number[], lossLine: string): FitResult {
  const csv = 'kpa,volts\n' + KPA.map((k, i) => `${k},${ys[i]}`).join('\n') + '\n';
  const spec = `data d = "p.csv"\nfit cal on d {\n  model volts = offset + gain * kpa\n  param offset\n  param gain\n  ${lossLine}\n}\n`;
  const r = runPlanSync(analyze(spec).plan, { baseDir: '/', specText: spec, readFile: () => Buffer.from(csv) });
  expect(r.errors).toEqual([]);
  return r.fits[0];
}
const estimates = (f: FitResult) => f.parameters.map((p) => p.estimate);

describe('the robust spread', () => {
  it('is 1.4826·MAD about the median (Hampel 1974), and the mean absolute deviation·1.2533 when MAD is 0', () => {
    // |x − 3| = 2, 1, 0, 1, 97: MAD 1 (worked by hand)
    expect(robustSpread([1, 2, 3, 4, 100])).toBeCloseTo(1.4826, 12);
    // more than half equal the median: MAD 0; mean |x − 0| = 5/5 = 1
    expect(robustSpread([0, 0, 0, 0, 5])).toBeCloseTo(1.2533, 12);
    expect(robustSpread([2, 2, 2])).toBe(0);
  });

  it('estimates σ of normal residuals (normal consistency): within 3 % for 20,000 draws', () => {
    // the standard error of the MAD estimator is about 1.1·σ/√n ≈ 0.008·σ here, so 3 % is about 4 standard errors
    const z = gaussian(rng(77));
    expect(robustSpread(Array.from({ length: 20_000 }, () => 2.5 * z()))).toBeGreaterThan(2.5 * 0.97);
    expect(robustSpread(Array.from({ length: 20_000 }, () => 2.5 * z()))).toBeLessThan(2.5 * 1.03);
  });
});

describe('loss huber without a scale', () => {
  const f = fit(VOLTS, 'loss huber');

  it('reaches the minimum a general-purpose robust least-squares routine finds at the same scale', () => {
    // scipy 1.17.1 / numpy 2.4.6: least_squares(t0 + t1·x − y, [0.4, 0.02], loss='huber', f_scale=0.006880873670356434,
    // xtol=ftol=gtol=1e-15) gives offset 0.4095651830911621, gain 0.019756679709088683 (computed once on this machine)
    expect(f.robust?.scale).toBeCloseTo(0.006880873670356434, 8);
    const [offset, gain] = estimates(f);
    expect(Math.abs(offset / 0.4095651830911621 - 1)).toBeLessThan(1e-6);
    expect(Math.abs(gain / 0.019756679709088683 - 1)).toBeLessThan(1e-6);
  });

  it('uses the scale the residuals at the solution give (within the settling tolerance 1e-3)', () => {
    const r = f.points.residual;
    expect(Math.abs(f.robust!.scale / (1.345 * robustSpread(r)) - 1)).toBeLessThan(1e-3);
    expect(f.robust).toMatchObject({ scaleFrom: 'spread', tuning: 1.345 });
    // the three valve readings get the smallest weights
    const order = f.robust!.weights.map((w, i) => [w, i] as const).sort((a, b) => a[0] - b[0]).slice(0, 3).map(([, i]) => f.points.row[i]);
    expect(order.sort((a, b) => a - b)).toEqual([7, 15, 22]);
    expect(f.robust!.downweighted).toBeGreaterThanOrEqual(3);
  });

  it('does not depend on the units of the response (volts or millivolts)', () => {
    const milli = fit(VOLTS.map((v) => v * 1000), 'loss huber');
    const [o1, g1] = estimates(f);
    const [o2, g2] = estimates(milli);
    expect(Math.abs(o2 / (1000 * o1) - 1)).toBeLessThan(1e-8);
    expect(Math.abs(g2 / (1000 * g1) - 1)).toBeLessThan(1e-8);
    expect(milli.robust!.scale / f.robust!.scale).toBeCloseTo(1000, 5);
    // a fixed scale of 1 (the former default) is no robust fit at all in volts: every weight 1, the squared-loss line
    const fixed = fit(VOLTS, 'loss huber scale 1');
    expect(fixed.robust).toMatchObject({ scaleFrom: 'given', scale: 1, downweighted: 0 });
    const squared = fit(VOLTS, 'loss squared');
    estimates(fixed).forEach((e, j) => expect(Math.abs(e / estimates(squared)[j] - 1)).toBeLessThan(1e-9));
    expect(Math.abs(g1 / estimates(squared)[1] - 1)).toBeGreaterThan(1e-3);
  });

  it('says so in the summary and the report', () => {
    const result = { version: 1 as const, provenance: { tool: 'leastwise', toolVersion: '0', specSha256: '0'.repeat(64), data: [], startedAt: '' }, fits: [f], queries: [], derived: [], expectations: [], errors: [] };
    expect(runText(result)).toMatch(/Robust Huber loss: scale 0\.006881 \(1\.345 × the residuals' robust spread \(1\.4826·MAD\)\); \d+ of 24 points down-weighted/);
    expect(markdownReport(result)).toMatch(/loss scale from the residuals' spread/);
  });
});
