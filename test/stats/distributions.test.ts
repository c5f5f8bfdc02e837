import { describe, expect, it } from 'vitest';
import { chiSquareCdf, chiSquareUpper, fCdf, fUpper, normalCdf, normalQuantile, normalUpper, tCdf, tCritical, tQuantile, tTwoSided, tUpper } from '../../engine/stats/distributions';

describe('stats/distributions (stdlib wrappers) against printed tables', () => {
  it('Student t quantiles', () => {
    // from memory / any t table (e.g. Draper & Smith, Applied Regression Analysis, t table)
    expect(tCritical(0.95, 10)).toBeCloseTo(2.228, 3);
    expect(tCritical(0.95, 1)).toBeCloseTo(12.706, 3);
    expect(tCritical(0.99, 20)).toBeCloseTo(2.845, 3);
    expect(tQuantile(0.95, 5)).toBeCloseTo(2.015, 3);
    expect(tCdf(2.228, 10)).toBeCloseTo(0.975, 3);
  });
  it('rejects impossible arguments with NaN', () => {
    expect(tCritical(0.95, 0)).toBeNaN();
    expect(tCritical(1, 5)).toBeNaN();
  });
  it('F, χ² and normal distributions', () => {
    // from memory / any F table: F_{0.95}(2, 10) = 4.10, F_{0.95}(1, 30) = 4.17
    expect(fCdf(4.103, 2, 10)).toBeCloseTo(0.95, 3);
    expect(fCdf(4.171, 1, 30)).toBeCloseTo(0.95, 3);
    // from memory / any χ² table: χ²_{0.95}(1) = 3.841, χ²_{0.95}(10) = 18.307
    expect(chiSquareCdf(3.841, 1)).toBeCloseTo(0.95, 4);
    expect(chiSquareCdf(18.307, 10)).toBeCloseTo(0.95, 4);
    // from memory: Φ⁻¹(0.975) = 1.959964, Φ(1) = 0.841345
    expect(normalQuantile(0.975)).toBeCloseTo(1.959964, 6);
    expect(normalCdf(1)).toBeCloseTo(0.841345, 6);
  });
});

describe('stats/distributions upper tails against scipy (scipy.stats 1.17.1, sf)', () => {
  // Each reference value: python3 -c "import scipy.stats as s; print(repr(s.<dist>.sf(...)))", scipy 1.17.1.
  // Relative tolerance 1e-10: the library's incomplete beta/gamma agree with scipy's (Cephes) to a few ulps,
  // far inside it; `1 - cdf` gives 0 or noise for every tail below ~1e-16 here.
  const rel = (got: number, want: number) => Math.abs(got - want) / want;
  it('Student t: P(T > t)', () => {
    expect(rel(tUpper(40, 10), 1.1404288715428768e-12)).toBeLessThan(1e-10); // scipy 1.17.1 t.sf(40, 10)
    expect(rel(tUpper(400, 10), 1.1731303532917105e-22)).toBeLessThan(1e-10); // scipy 1.17.1 t.sf(400, 10)
    expect(rel(tUpper(40, 30), 6.863022597203209e-28)).toBeLessThan(1e-10); // scipy 1.17.1 t.sf(40, 30)
    expect(rel(tUpper(2.228, 10), 0.02500588590855566)).toBeLessThan(1e-10); // scipy 1.17.1 t.sf(2.228, 10)
    expect(rel(tTwoSided(-40, 10), 2.2808577430857535e-12)).toBeLessThan(1e-10); // scipy 1.17.1 2*t.sf(40, 10)
    expect(1 - tCdf(400, 10)).toBe(0); // what the upper function is for: the cdf has rounded to 1
  });
  it('F: P(F > f)', () => {
    expect(rel(fUpper(500, 3, 20), 5.720958909263182e-19)).toBeLessThan(1e-10); // scipy 1.17.1 f.sf(500, 3, 20)
    expect(rel(fUpper(2000, 2, 50), 1.94032521748263e-48)).toBeLessThan(1e-10); // scipy 1.17.1 f.sf(2000, 2, 50)
    expect(rel(fUpper(3000, 1, 5), 3.8366388782340884e-08)).toBeLessThan(1e-10); // scipy 1.17.1 f.sf(3000, 1, 5)
    expect(rel(fUpper(4.103, 2, 10), 0.049995084647059505)).toBeLessThan(1e-10); // scipy 1.17.1 f.sf(4.103, 2, 10)
    expect(rel(fUpper(0.5, 3, 20), 0.686518612836403)).toBeLessThan(1e-10); // scipy 1.17.1 f.sf(0.5, 3, 20)
    expect(fUpper(0, 3, 20)).toBe(1);
    expect(fUpper(1, 0, 20)).toBeNaN();
    expect(1 - fCdf(500, 3, 20)).toBe(0);
  });
  it('χ²: P(X > x)', () => {
    expect(rel(chiSquareUpper(200, 10), 1.6139305336977317e-37)).toBeLessThan(1e-10); // scipy 1.17.1 chi2.sf(200, 10)
    expect(rel(chiSquareUpper(1000, 3), 1.7994208765314067e-216)).toBeLessThan(1e-10); // scipy 1.17.1 chi2.sf(1000, 3)
    expect(rel(chiSquareUpper(3.841, 1), 0.050013683763956804)).toBeLessThan(1e-10); // scipy 1.17.1 chi2.sf(3.841, 1)
    expect(chiSquareUpper(-1, 3)).toBe(1);
    expect(chiSquareUpper(1, 0)).toBeNaN();
    expect(1 - chiSquareCdf(200, 10)).toBe(0);
  });
  it('normal: P(X > x)', () => {
    expect(rel(normalUpper(10), 7.61985302416047e-24)).toBeLessThan(1e-10); // scipy 1.17.1 norm.sf(10)
    expect(rel(normalUpper(30), 4.906713927147908e-198)).toBeLessThan(1e-10); // scipy 1.17.1 norm.sf(30)
    expect(rel(normalUpper(12, 2, 0.5), 2.7536241186061556e-89)).toBeLessThan(1e-10); // scipy 1.17.1 norm.sf(12, loc=2, scale=0.5)
    expect(1 - normalCdf(10)).toBe(0);
  });
});

describe('stats/distributions tQuantile memo', () => {
  it('gives what @stdlib gives, also when asked again and after many other pairs', async () => {
    const std = (await import('@stdlib/stats-base-dists-t-quantile')).default;
    const pairs: [number, number][] = [[0.975, 8], [0.975, 8], [0.995, 3], [0.5, 1], [NaN, 4], [0.975, -1], [0.975, NaN]];
    for (let d = 1; d <= 600; d++) pairs.push([0.975, d], [1 - 0.05 / (2 * d), d]);
    pairs.push([0.975, 8], [0.995, 3]);
    for (const [p, dof] of pairs) expect(Object.is(tQuantile(p, dof), std(p, dof))).toBe(true);
    expect(tCritical(0.95, 8)).toBe(std(0.975, 8));
  });
});
