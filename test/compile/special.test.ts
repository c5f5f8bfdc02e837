import { describe, it, expect } from 'vitest';
import normalCdf from '@stdlib/stats-base-dists-normal-cdf';
import { erf, erfc } from '../../engine/compile/special';

/** Relative difference, with an absolute floor for values near zero. */
const rel = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);

describe('engine/compile/special erf and erfc (Cody 1969)', () => {
  it('matches the standard normal CDF of @stdlib (general-purpose library): erf(x) = 2Φ(x√2) − 1', () => {
    for (let x = 0.5; x <= 5; x += 0.0625) {
      // erf(x) for x ≥ 0.5 is ≥ 0.52, so the subtraction loses no digits.
      expect(rel(erf(x), 2 * normalCdf(x * Math.SQRT2, 0, 1) - 1)).toBeLessThan(1e-14);
    }
  });

  it('matches the normal tail of @stdlib (general-purpose library): erfc(x) = 2Φ(−x√2)', () => {
    for (let x = 0.5; x <= 26; x += 0.25) {
      // The argument x√2 is rounded (relative 1e-16), which moves erfc by ~2x²·1e-16 relative.
      expect(rel(erfc(x), 2 * normalCdf(-x * Math.SQRT2, 0, 1))).toBeLessThan(1e-14 + 4 * x * x * 1.2e-16);
    }
  });

  it('agrees with the Maclaurin series for small arguments (Abramowitz & Stegun 7.1.5)', () => {
    for (const x of [1e-12, 1e-5, 0.01, 0.1, 0.3, 0.46875, 0.6]) {
      let term = x;
      let sum = x;
      for (let k = 1; k < 40; k++) {
        term *= (-x * x) / k;
        sum += term / (2 * k + 1);
      }
      expect(rel(erf(x), (2 / Math.sqrt(Math.PI)) * sum)).toBeLessThan(2e-16 * 4);
    }
  });

  it('symmetry and complement identities', () => {
    for (const x of [0, 0.2, 0.46875, 0.47, 1, 3.9, 4, 4.1, 8]) {
      expect(erf(-x)).toBe(-erf(x));
      expect(Math.abs(erf(x) + erfc(x) - 1)).toBeLessThan(2.3e-16);
      expect(Math.abs(erfc(-x) - (2 - erfc(x)))).toBeLessThan(4.5e-16);
    }
  });

  it('limits and special values', () => {
    expect(erf(0)).toBe(0);
    expect(erfc(0)).toBe(1);
    expect(erf(Infinity)).toBe(1);
    expect(erf(-Infinity)).toBe(-1);
    expect(erfc(30)).toBe(0);
    expect(erfc(-30)).toBe(2);
    expect(Number.isNaN(erf(NaN))).toBe(true);
    expect(Number.isNaN(erfc(NaN))).toBe(true);
  });
});
