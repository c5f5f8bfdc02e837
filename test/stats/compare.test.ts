import { describe, expect, it } from 'vitest';
import { akaikeRows, extraSumOfSquaresF } from '../../engine/stats/compare';
import { correlationMatrix, parameterIntervals } from '../../engine/stats/intervals';
import { fCdf } from '../../engine/stats/distributions';

const base = { n: 20, aic: 0, bic: 0 };

describe('stats/compare', () => {
  it('ΔAICc and Akaike weights by hand', () => {
    const rows = akaikeRows([
      { ...base, fit: 'a', p: 2, ssr: 10, aicc: 12 },
      { ...base, fit: 'b', p: 3, ssr: 8, aicc: 10 },
      { ...base, fit: 'c', p: 4, ssr: 7.9, aicc: 14 },
    ]);
    expect(rows.map((r) => r.deltaAicc)).toEqual([2, 0, 4]);
    const rel = [Math.exp(-1), 1, Math.exp(-2)];
    const total = rel[0] + rel[1] + rel[2];
    rows.forEach((r, i) => expect(r.akaikeWeight).toBeCloseTo(rel[i] / total, 14));
  });

  it('extra-sum-of-squares F by hand', () => {
    const r = extraSumOfSquaresF({ ...base, fit: 'rich', p: 4, ssr: 6, aicc: 0 }, { ...base, fit: 'simple', p: 2, ssr: 10, aicc: 0 })!;
    // F = ((10 − 6)/2) / (6/16) = 5.333…
    expect(r.f).toBeCloseTo(16 / 3, 12);
    expect([r.df1, r.df2, r.simpler, r.richer]).toEqual([2, 16, 'simple', 'rich']);
    // from memory / any F table: F_{0.95}(2, 16) = 3.63 and F_{0.99}(2, 16) = 6.23, so 0.01 < p < 0.05
    expect(r.pValue).toBeGreaterThan(0.01);
    expect(r.pValue).toBeLessThan(0.05);
    expect(r.pValue).toBeCloseTo(1 - fCdf(16 / 3, 2, 16), 14);
    expect(extraSumOfSquaresF({ ...base, fit: 'x', p: 2, ssr: 1, aicc: 0 }, { ...base, fit: 'y', p: 2, ssr: 2, aicc: 0 })).toBeNull();
  });

  it('keeps the digits of a tiny p (upper tail, not 1 − cdf)', () => {
    // n = 24: F = ((10 − 0.1)/3) / (0.1/20) = 660 with (3, 20) dof; scipy 1.17.1 f.sf(660, 3, 20) = 3.683280560496163e-20
    const r = extraSumOfSquaresF({ ...base, n: 24, fit: 'simple', p: 1, ssr: 10, aicc: 0 }, { ...base, n: 24, fit: 'rich', p: 4, ssr: 0.1, aicc: 0 })!;
    expect(r.f).toBeCloseTo(660, 9);
    expect(Math.abs(r.pValue - 3.683280560496163e-20) / 3.683280560496163e-20).toBeLessThan(1e-9);
  });
});

describe('stats/intervals', () => {
  it('t intervals and correlations from a covariance', () => {
    const cov = [4, 1.8, 1.8, 1];
    const ci = parameterIntervals([10, 3], cov, 0.95, 10);
    expect(ci[0].stderr).toBe(2);
    // from memory / any t table: t_{0.975,10} = 2.228
    expect(ci[0].lower).toBeCloseTo(10 - 2.228 * 2, 2);
    expect(ci[1].upper).toBeCloseTo(3 + 2.228, 2);
    const rho = correlationMatrix(cov, 2);
    expect(rho[0][1]).toBeCloseTo(0.9, 14);
    expect(rho[1][1]).toBe(1);
    expect(correlationMatrix([0, 0, 0, 1], 2)[0][1]).toBeNaN();
  });
});
