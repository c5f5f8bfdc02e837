import { describe, expect, it } from 'vitest';
import { norm2 } from '../../engine/linalg/norm';
import { powerOfTwoNear, quadraticFormRoot, responseScale, SAFE_HIGH, SAFE_LOW } from '../../engine/linalg/scale';
import { estimateCovariance, unscaledCovariance } from '../../engine/stats/covariance';
import { goodnessOfFit } from '../../engine/stats/goodness';

describe('linalg/norm norm2 at the ends of the range', () => {
  it('does not take squares that underflow to 0 for a zero vector (entries near 1e-300)', () => {
    // by hand: ‖(3, 4)·1e-300‖ = 5e-300
    expect(norm2([3e-300, 4e-300]) / 5e-300).toBeCloseTo(1, 15);
    expect(norm2([3e300, 4e300]) / 5e300).toBeCloseTo(1, 15);
    expect(norm2([0, 0])).toBe(0);
    expect(norm2([1e-320, 0])).toBe(1e-320);
    expect(norm2([NaN, 1])).toBeNaN();
  });
});

describe('linalg/scale', () => {
  it('powerOfTwoNear is an exact power of two within a factor √2 of |x|', () => {
    for (const x of [1e-300, 3.7e-150, 1, 12345, -8e299]) {
      const c = powerOfTwoNear(x);
      expect(Number.isInteger(Math.log2(c))).toBe(true);
      expect(Math.abs(x) / c).toBeGreaterThanOrEqual(Math.SQRT1_2);
      expect(Math.abs(x) / c).toBeLessThanOrEqual(Math.SQRT2);
    }
    expect(powerOfTwoNear(0)).toBe(1);
    expect(powerOfTwoNear(Infinity)).toBe(1);
  });

  it('responseScale is 1 in the safe range and scales √w·y beyond it', () => {
    expect(responseScale([1e-100, 5, -1e100], null)).toBe(1);
    expect(responseScale([SAFE_LOW, 0], null)).toBe(1);
    expect(responseScale([SAFE_HIGH], null)).toBe(1);
    expect(responseScale([1e-300, 2e-300], null)).toBe(powerOfTwoNear(2e-300));
    // weights count: y ~ 1 with √w = 1e300
    expect(responseScale([1, 2], Float64Array.of(1e300, 1e300))).toBe(powerOfTwoNear(2e300));
    expect(responseScale([0, 0], null)).toBe(1);
  });

  it('quadraticFormRoot equals √(vᵀρv) by hand and keeps its relative value at 1e±300', () => {
    const rho = [1, -0.5, -0.5, 1];
    const v = [3, 4];
    const byHand = Math.sqrt(9 + 16 - 2 * 0.5 * 12); // 9 + 16 + 2·(−0.5)·12 = 13
    expect(quadraticFormRoot(v, rho, 2)).toBeCloseTo(byHand, 14);
    for (const k of [1e-300, 1e300]) expect(quadraticFormRoot(v.map((x) => x * k), rho, 2) / k / byHand).toBeCloseTo(1, 14);
    expect(quadraticFormRoot([0, 0], [NaN, NaN, NaN, NaN], 2)).toBe(0);
    expect(quadraticFormRoot([1, NaN], rho, 2)).toBeNaN();
  });
});

describe('stats/covariance estimateCovariance with columns of very different size', () => {
  it('gives the standard errors of the line y = a + b·x whatever the units of x (closed form)', () => {
    // closed form (common practice): for x = 1..n, Var b = s²/Sxx, Var a = s²(1/n + x̄²/Sxx)
    const n = 6;
    const s = 0.3;
    const sxx = 17.5;
    for (const k of [1e-300, 1, 1e300]) {
      const jac = new Float64Array(2 * n);
      for (let i = 0; i < n; i++) {
        jac[i] = 1;
        jac[n + i] = (i + 1) * k;
      }
      const cov = unscaledCovariance(jac, n, 2);
      const e = estimateCovariance(cov, s);
      expect(e.se[0] / (s * Math.sqrt(1 / n + 3.5 ** 2 / sxx))).toBeCloseTo(1, 12);
      expect((e.se[1] * k) / (s / Math.sqrt(sxx))).toBeCloseTo(1, 12);
      // ρ(a, b) = −x̄/√(x̄² + Sxx/n), unit-free
      expect(e.correlation[1]).toBeCloseTo(-3.5 / Math.sqrt(3.5 ** 2 + sxx / n), 12);
    }
  });
});

describe('stats/goodness goodnessOfFit with a response scale', () => {
  it('scaled residuals give the same R², s/c and likelihood shift as unscaled ones', () => {
    const y = [1, 2.1, 2.9, 4.2, 5];
    const r = [0.05, -0.1, 0.02, 0.08, -0.05];
    const one = goodnessOfFit({ residuals: r, y, weights: null, p: 2, sigmaAbsolute: false, condition: 1 });
    const c = 2 ** -1000;
    const tiny = goodnessOfFit({ residuals: r, y: y.map((v) => v * c), weights: null, p: 2, sigmaAbsolute: false, condition: 1, scale: c });
    expect(tiny.r2).toBe(one.r2);
    expect(tiny.rmse / c).toBe(one.rmse);
    expect(tiny.logLikelihood + 5 * Math.log(c)).toBeCloseTo(one.logLikelihood, 9);
    expect(tiny.ssr).toBe(0); // c²·SSR = 2^-2000·… is below the smallest double: the true value rounds to 0
  });
});
