import { describe, expect, it } from 'vitest';
import { shapiroWilk, shapiroWilkCoefficients, shapiroWilkPValue } from '../../engine/stats/shapiro-wilk';
import { normals } from '../fixtures/random';


describe('stats/shapiro-wilk', () => {
  it('coefficients match the Shapiro–Wilk (1965) table within Royston accuracy', () => {
    // from memory: Shapiro & Wilk (1965), Biometrika 52, table of coefficients aᵢ - n = 5: 0.6646, 0.2413; n = 10: 0.5739, 0.3291, 0.2141, 0.1224, 0.0399
    const a5 = shapiroWilkCoefficients(5);
    expect(a5[0]).toBeCloseTo(0.6646, 3);
    expect(a5[1]).toBeCloseTo(0.2413, 3);
    const a10 = Array.from(shapiroWilkCoefficients(10));
    [0.5739, 0.3291, 0.2141, 0.1224, 0.0399].forEach((v, i) => expect(Math.abs(a10[i] - v)).toBeLessThan(6e-4));
    // Σ a² over both halves is 1 by construction (Royston 1992)
    for (const n of [4, 7, 25, 200]) {
      const a = shapiroWilkCoefficients(n);
      expect(2 * a.reduce((s, v) => s + v * v, 0)).toBeCloseTo(1, 12);
    }
  });

  it('reproduces the weights example of Shapiro & Wilk (1965): W = 0.79', () => {
    // from memory: Shapiro & Wilk (1965) worked example, 11 weights in pounds, W = 0.79 (p < 0.01)
    const r = shapiroWilk([148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236])!;
    expect(r.w).toBeCloseTo(0.79, 2);
    expect(r.pValue).toBeLessThan(0.01);
  });

  it('agrees with a general-purpose library', () => {
    // general-purpose library computation: scipy 1.17.1, scipy.stats.shapiro (same AS R94 algorithm)
    const cases: [number[], number, number][] = [
      [[148, 154, 158, 160, 161, 162, 166, 170, 182, 195, 236], 0.7888146948631716, 0.006703814061898823],
      [[1, 2, 4], 0.9642857142857142, 0.6368868450289689],
      [[2.1, 3.4, 1.9, 5.6, 4.4, 3.8, 2.9, 4.1, 3.3, 2.7, 3.9, 4.8, 3.1, 2.2, 3.6], 0.9781405577948592, 0.9552190425305714],
      [[...Array.from({ length: 19 }, (_, i) => i + 1), 100], 0.48237285215861503, 2.2107192782135576e-7],
    ];
    for (const [x, w, p] of cases) {
      const r = shapiroWilk(x)!;
      expect(r.w).toBeCloseTo(w, 8);
      expect(r.pValue / p).toBeCloseTo(1, 6);
    }
  });

  it('is exact for n = 3: P(W ≤ w) from Royston (1995)', () => {
    // smallest possible W for n = 3 is 3/4 with p = 0; W = 1 gives p = 1
    expect(shapiroWilkPValue(0.75, 3)).toBeCloseTo(0, 12);
    expect(shapiroWilkPValue(1, 3)).toBeCloseTo(1, 12);
  });

  it('does not depend on order, location or scale', () => {
    const x = normals(7, 30);
    const r1 = shapiroWilk(x)!;
    const r2 = shapiroWilk(x.map((v) => 5 - 3 * v).reverse())!;
    expect(r2.w).toBeCloseTo(r1.w, 12);
    expect(r2.pValue).toBeCloseTo(r1.pValue, 10);
  });

  it('gives roughly uniform p-values for normal samples (level 5 % → ~5 % rejections)', () => {
    // common practice: calibration of a test under its null hypothesis
    const all = normals(2024, 25 * 1000);
    let rejected = 0;
    for (let k = 0; k < 1000; k++) if (shapiroWilk(all.slice(25 * k, 25 * k + 25))!.pValue < 0.05) rejected++;
    expect(rejected / 1000).toBeGreaterThan(0.03);
    expect(rejected / 1000).toBeLessThan(0.07);
  });

  it('returns null outside 3 ≤ n ≤ 5000, for constant or non-finite data', () => {
    expect(shapiroWilk([1, 2])).toBeNull();
    expect(shapiroWilk([2, 2, 2, 2])).toBeNull();
    expect(shapiroWilk([1, NaN, 3, 4])).toBeNull();
    expect(shapiroWilk(new Array(5001).fill(0).map((_, i) => i))).toBeNull();
  });
});
