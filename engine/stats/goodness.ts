/**
 * Goodness-of-fit figures of a least-squares fit.
 *
 * With weighted residuals rᵢ = √wᵢ(yᵢ − ŷᵢ) (wᵢ = 1 when unweighted,
 * wᵢ = 1/σᵢ² when σ is absolute):
 * - SSR = Σ rᵢ², dof = n − p, s = RMSE = √(SSR/dof);
 * - R² = 1 − SSR/SST about the (weighted) mean ȳ_w = Σwᵢyᵢ/Σwᵢ, SST = Σwᵢ(yᵢ − ȳ_w)²;
 *   adjusted R² = 1 − (1 − R²)(n − 1)/(n − p) (the usual definitions, e.g. Draper &
 *   Smith 1998, Applied Regression Analysis, 3rd ed.); for models without an
 *   intercept or nonlinear models R² is descriptive only;
 * - χ² = SSR and reduced χ² = SSR/dof when σ is absolute;
 * - Gaussian log-likelihood at the estimate:
 *   σ absolute: ln L = −½ Σ ln(2πσᵢ²) − ½ χ², with k = p estimated quantities;
 *   variance estimated (σ² unknown, Var yᵢ = σ²/wᵢ, MLE σ̂² = SSR/n):
 *   ln L = −(n/2)(ln 2π + ln(SSR/n) + 1) + ½ Σ ln wᵢ, with k = p + 1;
 * - AIC = 2k − 2 ln L, AICc = AIC + 2k(k + 1)/(n − k − 1), BIC = k ln n − 2 ln L
 *   (Burnham & Anderson 2002, Model Selection and Multimodel Inference, 2nd ed.,
 *   ch. 2: AIC and its least-squares form, the small-sample AICc; BIC: Schwarz
 *   1978, Ann. Statist. 6:461–464).
 * Undefined figures (dof ≤ 0, n − k − 1 ≤ 0, SST = 0) are NaN (null in JSON).
 *
 * Scale (`scale` c, a power of two, engine/linalg/scale.ts): the residuals
 * given are rᵢ/c, and every sum of squares is formed from values divided by
 * c (weights by a power of two near their largest), so data near 1e-300 or
 * 1e+300 give the same R², s/c, χ²/c² and likelihood as data near 1; only the
 * reported SSR = c²·Σ(rᵢ/c)² and s = c·√(Σ(rᵢ/c)²/dof) carry the units (and
 * SSR can leave the range of doubles where s does not). With c = 1 and
 * moderate weights every figure is computed exactly as without scaling.
 */
import { powerOfTwoNear } from '../linalg/scale';
import type { GoodnessOfFit } from '../result';

export interface GoodnessInput {
  /** Weighted residuals √wᵢ(yᵢ − ŷᵢ). */
  residuals: ArrayLike<number>;
  /** Observed responses yᵢ. */
  y: ArrayLike<number>;
  /** Weights wᵢ, or null when unweighted (all 1). */
  weights: ArrayLike<number> | null;
  /** Number of free parameters. */
  p: number;
  /** True when weights are 1/σᵢ² from an absolute σ. */
  sigmaAbsolute: boolean;
  /** 2-norm condition number of the Jacobian at the estimate (passed through). */
  condition: number;
  /** Response scale c: `residuals` are rᵢ/c. Default 1. */
  scale?: number;
}

/** Number of estimated quantities in the likelihood: p, plus 1 for the variance when it is estimated. */
export function likelihoodParameterCount(p: number, sigmaAbsolute: boolean): number {
  return sigmaAbsolute ? p : p + 1;
}

export function informationCriteria(logLikelihood: number, k: number, n: number): { aic: number; aicc: number; bic: number } {
  const aic = 2 * k - 2 * logLikelihood;
  const aicc = n - k - 1 > 0 ? aic + (2 * k * (k + 1)) / (n - k - 1) : NaN;
  const bic = k * Math.log(n) - 2 * logLikelihood;
  return { aic, aicc, bic };
}

export function goodnessOfFit(input: GoodnessInput): GoodnessOfFit {
  const { residuals, y, weights, p, sigmaAbsolute } = input;
  const c = input.scale ?? 1;
  const n = residuals.length;
  // weights divided by a power of two near the largest (exact), so Σw and Σwy cannot overflow
  let wBig = 0;
  if (weights) for (let i = 0; i < n; i++) if (weights[i] > wBig && weights[i] < Infinity) wBig = weights[i];
  const wScale = wBig > 2 ** 400 || (wBig > 0 && wBig < 2 ** -400) ? powerOfTwoNear(wBig) : 1;
  const w = (i: number) => (weights ? (wScale === 1 ? weights[i] : weights[i] / wScale) : 1);
  let ss = 0; // Σ (rᵢ/c)²
  let sw = 0;
  let swy = 0; // Σ w·y/c
  let sumLogW = 0;
  for (let i = 0; i < n; i++) {
    ss += residuals[i] * residuals[i];
    sw += w(i);
    swy += w(i) * (c === 1 ? y[i] : y[i] / c);
    sumLogW += weights ? Math.log(weights[i]) : 0;
  }
  const mean = swy / sw; // ȳ_w / c
  let sst = 0; // Σ wᵢ(yᵢ − ȳ_w)² / c² (with w/wScale)
  for (let i = 0; i < n; i++) sst += w(i) * ((c === 1 ? y[i] : y[i] / c) - mean) ** 2;
  if (wScale !== 1) sst *= wScale; // back to Σ wᵢ(…)²/c², now that the terms are summed
  const dof = n - p;
  const ssr = ss * c * c;
  const rmse = dof > 0 ? Math.sqrt(ss / dof) * c : NaN;
  const r2 = sst > 0 ? 1 - ss / sst : NaN;
  const adjR2 = dof > 0 && n > 1 ? 1 - ((1 - r2) * (n - 1)) / dof : NaN;
  // ln(SSR/n) = ln(Σ(r/c)²/n) + 2 ln c: finite where SSR itself is out of range
  const logLikelihood = sigmaAbsolute
    ? -0.5 * n * Math.log(2 * Math.PI) + 0.5 * sumLogW - 0.5 * ssr
    : -0.5 * n * (Math.log(2 * Math.PI) + Math.log(ss / n) + 2 * Math.log(c) + 1) + 0.5 * sumLogW;
  const k = likelihoodParameterCount(p, sigmaAbsolute);
  return {
    n,
    p,
    dof,
    ssr,
    rmse,
    r2,
    adjR2,
    chi2: sigmaAbsolute ? ssr : null,
    chi2Reduced: sigmaAbsolute ? (dof > 0 ? ssr / dof : NaN) : null,
    logLikelihood,
    ...informationCriteria(logLikelihood, k, n),
    condition: input.condition,
  };
}
