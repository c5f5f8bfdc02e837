import { describe, expect, it } from 'vitest';
import { goodnessOfFit, informationCriteria } from '../../engine/stats/goodness';

const y = [1.2, 1.9, 3.2, 3.8, 5.1, 6.2, 6.8];
const f = [1.1, 2.05, 3.0, 4.0, 5.0, 6.0, 7.0];
const w = [1, 2, 1, 0.5, 4, 1, 2];

/** Direct Gaussian log-density sum Σ ln N(yᵢ; fᵢ, vᵢ) (common practice, written independently). */
function logLik(vars: number[]): number {
  return y.reduce((s, yi, i) => s - 0.5 * Math.log(2 * Math.PI * vars[i]) - (yi - f[i]) ** 2 / (2 * vars[i]), 0);
}

describe('stats/goodness goodnessOfFit', () => {
  it('unweighted: SSR, RMSE, R², adjusted R² by their definitions', () => {
    const r = y.map((v, i) => v - f[i]);
    const g = goodnessOfFit({ residuals: r, y, weights: null, p: 2, sigmaAbsolute: false, condition: 3 });
    const ssr = r.reduce((s, v) => s + v * v, 0);
    const mean = y.reduce((a, b) => a + b) / y.length;
    const sst = y.reduce((s, v) => s + (v - mean) ** 2, 0);
    expect(g.ssr).toBeCloseTo(ssr, 14);
    expect(g.rmse).toBeCloseTo(Math.sqrt(ssr / 5), 14);
    expect(g.r2).toBeCloseTo(1 - ssr / sst, 14);
    expect(g.adjR2).toBeCloseTo(1 - ((ssr / 5) / (sst / 6)), 12);
    expect(g.chi2).toBeNull();
    expect(g.condition).toBe(3);
  });

  it('variance estimated: ln L, AIC, AICc, BIC equal a direct likelihood at σ̂² = SSR/n (Burnham & Anderson 2002, ch. 2)', () => {
    const r = y.map((v, i) => Math.sqrt(w[i]) * (v - f[i]));
    const g = goodnessOfFit({ residuals: r, y, weights: w, p: 2, sigmaAbsolute: false, condition: 1 });
    const sigma2 = g.ssr / y.length;
    const ll = logLik(w.map((wi) => sigma2 / wi));
    const k = 3; // p + 1 (the variance)
    expect(g.logLikelihood).toBeCloseTo(ll, 10);
    expect(g.aic).toBeCloseTo(2 * k - 2 * ll, 10);
    expect(g.aicc).toBeCloseTo(2 * k - 2 * ll + (2 * k * (k + 1)) / (7 - k - 1), 10);
    expect(g.bic).toBeCloseTo(k * Math.log(7) - 2 * ll, 10);
  });

  it('weighted R² is about the weighted mean', () => {
    const r = y.map((v, i) => Math.sqrt(w[i]) * (v - f[i]));
    const g = goodnessOfFit({ residuals: r, y, weights: w, p: 2, sigmaAbsolute: false, condition: 1 });
    const sw = w.reduce((a, b) => a + b);
    const mean = y.reduce((s, v, i) => s + w[i] * v, 0) / sw;
    const sst = y.reduce((s, v, i) => s + w[i] * (v - mean) ** 2, 0);
    expect(g.r2).toBeCloseTo(1 - g.ssr / sst, 14);
  });

  it('σ absolute: χ², reduced χ², and a likelihood with known variances (k = p)', () => {
    const sigma = [0.1, 0.2, 0.1, 0.3, 0.1, 0.2, 0.1];
    const ws = sigma.map((s) => 1 / s ** 2);
    const r = y.map((v, i) => (v - f[i]) / sigma[i]);
    const g = goodnessOfFit({ residuals: r, y, weights: ws, p: 2, sigmaAbsolute: true, condition: 1 });
    const chi2 = r.reduce((s, v) => s + v * v, 0);
    expect(g.chi2).toBeCloseTo(chi2, 12);
    expect(g.chi2Reduced).toBeCloseTo(chi2 / 5, 12);
    const ll = logLik(sigma.map((s) => s * s));
    expect(g.logLikelihood).toBeCloseTo(ll, 10);
    expect(g.aic).toBeCloseTo(4 - 2 * ll, 10);
    expect(g.bic).toBeCloseTo(2 * Math.log(7) - 2 * ll, 10);
  });

  it('undefined figures are NaN', () => {
    const g = goodnessOfFit({ residuals: [0.1, -0.1], y: [1, 2], weights: null, p: 2, sigmaAbsolute: false, condition: 1 });
    expect(g.dof).toBe(0);
    expect(g.rmse).toBeNaN();
    expect(g.aicc).toBeNaN();
    expect(informationCriteria(-3, 3, 4).aicc).toBeNaN();
    expect(goodnessOfFit({ residuals: [0, 0, 0], y: [1, 1, 1], weights: null, p: 1, sigmaAbsolute: false, condition: 1 }).r2).toBeNaN();
  });
});
