import { describe, expect, it } from 'vitest';
import { chiSquareCdf, fCdf, normalCdf, normalQuantile, tCdf, tCritical, tQuantile } from '../../engine/stats/distributions';

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
