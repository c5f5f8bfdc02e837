import { describe, it, expect } from 'vitest';
import { robustFit, rho, rhoPrime, robustCost } from '../../engine/solve/loss';
import { levenbergMarquardt } from '../../engine/solve/lm';
import { LOSSES as ALL_LOSSES, type LossKind } from '../../parser/registry/losses';
import { fitProblem, noise } from './problems';

/** Every robust loss of the registry (parser/registry/losses.ts). */
const LOSSES: LossKind[] = ALL_LOSSES.filter((l) => l !== 'squared');
const xs = Array.from({ length: 40 }, (_, i) => i * 0.25);
// Truth y = 2 + 0.5x with small noise, and every 8th point a gross outlier (+15).
const y = xs.map((x, i) => 2 + 0.5 * x + 0.05 * noise(i) + (i % 8 === 3 ? 15 : 0));

describe('engine/solve/loss robust losses', () => {
  it('ρ′ is the derivative of ρ, ρ(z) ≈ z near 0 and the weight is at most 1 (Triggs et al. 2000 §4.3)', () => {
    for (const loss of LOSSES) {
      for (const z of [1e-4, 0.3, 0.99, 1.5, 10, 1e4]) {
        const h = 1e-5 * Math.max(z, 1e-2);
        expect(rhoPrime(loss, z)).toBeCloseTo((rho(loss, z + h) - rho(loss, z - h)) / (2 * h), 6);
        expect(rhoPrime(loss, z)).toBeLessThanOrEqual(1);
      }
      expect(rho(loss, 1e-8)).toBeCloseTo(1e-8, 14);
    }
    expect(rho('squared', 7)).toBe(7);
    expect(robustCost('huber', 2, Float64Array.from([1, 4]))).toBeCloseTo(0.5 * (1 + 4 * (2 * 2 - 1)), 14);
  });

  it('Huber, pseudo-Huber and Cauchy recover the line through gross outliers better than squared loss', () => {
    const p = fitProblem('a + b*x', ['a', 'b'], xs, y);
    const squared = levenbergMarquardt(p, Float64Array.from([0, 0]));
    const err = (t: Float64Array) => Math.hypot(t[0] - 2, t[1] - 0.5);
    for (const loss of LOSSES) {
      const r = robustFit(p, Float64Array.from([0, 0]), loss, 0.2);
      expect(r.stop.converged).toBe(true);
      expect(err(r.theta)).toBeLessThan(err(squared.theta) / 5);
      expect(r.robustWeights).toBeDefined();
      // Outliers end up with small weights.
      expect(r.robustWeights![3]).toBeLessThan(0.1);
      expect(r.robustWeights![4]).toBeGreaterThan(0.5);
    }
  });

  it('the robust cost never increases over the reweightings (MM property)', () => {
    const p = fitProblem('a*exp(-b*x) + c', ['a', 'b', 'c'], xs, xs.map((x, i) => 3 * Math.exp(-0.5 * x) + 1 + 0.02 * noise(i) + (i % 7 === 2 ? 4 : 0)));
    const costs: number[] = [];
    const out = robustFit(p, Float64Array.from([1, 1, 0]), 'cauchy', 0.1, { onIteration: (_, c) => costs.push(c) });
    expect(out.stop.converged).toBe(true);
    expect(costs.length).toBeGreaterThan(1);
    for (let k = 1; k < costs.length; k++) expect(costs[k]).toBeLessThanOrEqual(costs[k - 1] * (1 + 1e-12));
    expect(out.cost).toBeCloseTo(robustCost('cauchy', 0.1, out.residuals), 14);
  });

  it('squared loss is plain Levenberg–Marquardt; a bad scale is rejected', () => {
    const p = fitProblem('a + b*x', ['a', 'b'], xs, y);
    const a = robustFit(p, Float64Array.from([0, 0]), 'squared', 1);
    const b = levenbergMarquardt(p, Float64Array.from([0, 0]));
    expect(Array.from(a.theta)).toEqual(Array.from(b.theta));
    expect(() => robustFit(p, Float64Array.from([0, 0]), 'huber', 0)).toThrow(RangeError);
    expect(() => robustFit(p, Float64Array.from([0, 0]), 'huber', NaN)).toThrow(RangeError);
  });
});
