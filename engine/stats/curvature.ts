/**
 * Curvature check of the residuals: does a bend in the fitted value explain them?
 * The model is augmented by one column, the centred squared fitted value
 * zᵢ = √wᵢ·((ŷᵢ − ȳ̂)/d)² (ȳ̂ the mean fitted value, d = max|ŷᵢ − ȳ̂| for scale only),
 * and the t statistic of its coefficient is computed; this is Tukey's one-degree-of-
 * freedom test for non-additivity in its regression form (Tukey 1949, Biometrics
 * 5:232–242; Weisberg 2005, Applied Linear Regression, 3rd ed., §8.2.1) and the first
 * term of Ramsey's RESET (1969, J. Roy. Statist. Soc. B 31:350–371). For a straight
 * line it is the test of an added x² term. For a nonlinear model it is computed in
 * the tangent-plane linearisation at the estimate (J, the weighted Jacobian, in place
 * of the design matrix).
 *
 * By the added-variable identity (Cook & Weisberg 1982, §2.3.2), with H = Q₁Q₁ᵀ the
 * hat matrix of J (QR factor, rank k) and z⊥ = (I − H)z:
 *   b = z⊥ᵀr / ‖z⊥‖²,  SSR₊ = ‖(I − H)r‖² − (z⊥ᵀr)²/‖z⊥‖²,  t = (z⊥ᵀr/‖z⊥‖) / √(SSR₊/(n − k − 1)),
 * all from Qᵀz and Qᵀr (their components beyond k), two applications of Qᵀ: O(n·p).
 * Under a right model with normal errors t has Student's t distribution with
 * n − k − 1 degrees of freedom (exactly for a linear model); p is two-sided.
 *
 * No test (null) when n − k − 1 < 1, when the fitted values are constant, or when the
 * squared fitted value lies in the model's own span (‖z⊥‖ ≤ 1e-8·‖z‖: the model already
 * has that bend, e.g. a quadratic in a fitted value that is linear in x).
 */
import type { CurvatureTest } from '../result';
import type { PivotedQR } from '../linalg/qr';
import { tUpper } from './distributions';
import { workArray } from '../linalg/work-array';

/** ‖z⊥‖ ≤ SPAN_RELATIVE·‖z‖: z is in the span of J to about half the digits, and b is not determined. */
const SPAN_RELATIVE = 1e-8;

/**
 * `qr`: factor of the weighted Jacobian (n×p) at the estimate; `r`: weighted residuals of the same problem; `fitted`:
 * ŷ in response units; `sqrtW`: √wᵢ or null.
 */
export function curvatureTest(qr: PivotedQR, r: ArrayLike<number>, fitted: ArrayLike<number>, sqrtW: ArrayLike<number> | null): CurvatureTest | null {
  const n = r.length;
  const k = qr.rank;
  const dof = n - k - 1;
  if (dof < 1 || qr.m !== n) return null;
  let mean = 0;
  for (let i = 0; i < n; i++) mean += fitted[i] / n;
  let d = 0;
  for (let i = 0; i < n; i++) d = Math.max(d, Math.abs(fitted[i] - mean));
  if (!(d > 0) || !Number.isFinite(d)) return null;
  const z = workArray(n);
  const rq = workArray(n);
  for (let i = 0; i < n; i++) rq[i] = r[i];
  let zNorm2 = 0;
  for (let i = 0; i < n; i++) {
    const u = (fitted[i] - mean) / d;
    z[i] = (sqrtW ? sqrtW[i] : 1) * u * u;
    zNorm2 += z[i] * z[i];
  }
  qr.applyQtBoth(z, rq);
  let zz = 0;
  let zr = 0;
  let rr = 0;
  for (let j = k; j < n; j++) {
    zz += z[j] * z[j];
    zr += z[j] * rq[j];
    rr += rq[j] * rq[j];
  }
  if (!(zz > SPAN_RELATIVE * SPAN_RELATIVE * zNorm2)) return null;
  const ssr = rr - (zr * zr) / zz;
  if (!(ssr > 0)) return null;
  const t = zr / Math.sqrt(zz) / Math.sqrt(ssr / dof);
  if (!Number.isFinite(t)) return null;
  return { t, dof, pValue: Math.min(1, 2 * tUpper(Math.abs(t), dof)) };
}
