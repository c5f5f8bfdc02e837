/**
 * Whether one fit's model is a special case of another's (nested), decided
 * numerically on the two plan expressions and the rows both fits used. The
 * extra-sum-of-squares F test (engine/stats/compare.ts) is valid only for
 * nested models; parameter counts alone do not say so (a power law a·x^b and a
 * stretched exponential a·exp(−(x/c)^k) have 2 and 3 parameters and neither is
 * a special case of the other).
 *
 * Method (a reproduction test). The simpler model f₁ (p₁ free parameters) is
 * nested in the richer f₂ (p₂ > p₁) when every curve f₁ draws at the data
 * points x₁…xₙ is also a curve of f₂: fixing some of f₂'s parameters to
 * constants or tying them together must give f₁ back. So, for `TRIALS`
 * parameter vectors θ₁ of the simpler model — its estimate, then points drawn
 * around it — the target yᵢ = f₁(xᵢ; θ₁) is fitted by f₂ with
 * Levenberg–Marquardt (Moré 1978; engine/solve/lm.ts, unweighted, without
 * bounds: the question is one of the expressions, not of the richer fit's
 * box) from the richer fit's estimate and from the previous trial's solution.
 * The relative distance of the best reproduction is
 *   d = ‖f₂(x; θ₂*) − y‖ / ‖y − ȳ‖   (‖y‖ when the target is flat).
 * Nested when d ≤ `NESTING_TOLERANCE` for every trial; otherwise not nested
 * (or nested only in a limit, e.g. a parameter going to infinity, where the
 * F test's distribution does not hold either).
 *
 * The trial points are drawn by a fixed-seed generator, so a run is
 * reproducible. The test holds at the data points only, which is what the
 * sums of squares the F test compares depend on. It needs both fits to have
 * one predictor column (the rows' predictor values are in the result); for
 * models of several columns it says so, and the spec may declare the nesting
 * (`compare simple within rich`, parser/LANGUAGE.md).
 */
import type { FitPlan } from '../../parser/plan';
import { compileModel } from '../compile';
import type { FitResult } from '../result';
import { levenbergMarquardt, modelProblem } from '../solve';
import { freeModel, freeParts } from './curve';
import { mulberry32 } from '../stats/mulberry32';

/**
 * Largest relative distance d of a reproduction that still counts as exact:
 * d ≤ 1e-6. Converged reproductions of nested pairs reach d ≈ 1e-10 or less
 * (measured: test/run/nesting.test.ts, e.g. a line in a quadratic, an
 * exponential in an exponential with offset, Michaelis–Menten in the Hill
 * form), shapes that are not nested stay at d ≥ 1e-3 (a power law against a
 * stretched exponential: d ≈ 1e-2). 1e-6 sits between, far from both.
 */
export const NESTING_TOLERANCE = 1e-6;

/** Parameter vectors of the simpler model tried: its estimate and two drawn around it. */
export const TRIALS = 3;

/**
 * Size of the drawn trial points: θⱼ = θ̂ⱼ + SPREAD·uⱼ·max(|θ̂ⱼ|, seⱼ, 1e-3), uⱼ uniform on [−1, 1].
 * 0.1 moves each parameter well off the estimate while keeping it where the model is defined.
 */
export const TRIAL_SPREAD = 0.1;

export type NestingStatus = 'established' | 'not_nested' | 'not_checked';

export interface NestingCheck {
  status: NestingStatus;
  /** Largest relative distance d over the trials (null when not checked). */
  distance: number | null;
  /** Why it was not checked (status `not_checked`). */
  reason?: 'several_columns' | 'different_rows' | 'not_finite';
}

const sameNumbers = (a: readonly number[], b: readonly number[]) => a.length === b.length && a.every((v, i) => Object.is(v, b[i]));

/** Is `simple` (fewer free parameters) a special case of `rich` at the rows both fits used? */
export function checkNesting(simplePlan: FitPlan, simple: FitResult, richPlan: FitPlan, rich: FitResult): NestingCheck {
  const xs = simple.points.x;
  if (xs === null || rich.points.x === null || simple.predictor === null || rich.predictor === null) {
    return { status: 'not_checked', distance: null, reason: 'several_columns' };
  }
  if (!sameNumbers(simple.points.row, rich.points.row) || !sameNumbers(xs, rich.points.x)) {
    return { status: 'not_checked', distance: null, reason: 'different_rows' };
  }
  const n = xs.length;
  const x = Float64Array.from(xs);
  const one = freeModel(simplePlan);
  const two = freeModel(richPlan);
  const f1 = compileModel(one.expr, one.free, [simple.predictor]);
  const f2 = compileModel(two.expr, two.free, [rich.predictor]);
  const base = freeParts(simple);
  const start = freeParts(rich).estimates;
  const next = mulberry32(0x5eed13);
  let worst = 0;
  let previous: Float64Array | null = null;
  for (let t = 0; t < TRIALS; t++) {
    const theta = Float64Array.from(base.estimates, (v, j) => {
      if (t === 0) return v;
      const size = Math.max(Math.abs(v), Number.isFinite(base.cov.se[j]) ? base.cov.se[j] : 0, 1e-3);
      return v + TRIAL_SPREAD * (2 * next() - 1) * size;
    });
    const y = new Float64Array(n);
    f1.value(theta, [x], n, y);
    if (!y.every(Number.isFinite)) return { status: 'not_checked', distance: null, reason: 'not_finite' };
    const scale = spread(y);
    const problem = modelProblem({ model: f2, columns: [x], response: y, n });
    let best = Infinity;
    let bestTheta: Float64Array | null = null;
    for (const from of previous ? [start, previous] : [start]) {
      if (!from.every(Number.isFinite)) continue;
      const out = levenbergMarquardt(problem, from, { reductionTolerance: 1e-15, stepTolerance: 1e-15, gradientTolerance: 1e-15 });
      const d = norm(out.residuals) / scale;
      if (d < best) {
        best = d;
        bestTheta = out.theta;
      }
      if (best <= NESTING_TOLERANCE * 1e-3) break;
    }
    if (!Number.isFinite(best)) best = Infinity;
    worst = Math.max(worst, best);
    previous = bestTheta;
    if (worst > NESTING_TOLERANCE) break;
  }
  return { status: worst <= NESTING_TOLERANCE ? 'established' : 'not_nested', distance: worst };
}

/** ‖y − ȳ‖, or ‖y‖ when y is flat, or 1 when y is zero (scaled sums, no overflow for data near 1e±300). */
function spread(y: Float64Array): number {
  let mean = 0;
  for (const v of y) mean += v / y.length;
  const centred = norm(y.map((v) => v - mean));
  if (centred > 1e-12 * norm(y)) return centred;
  const whole = norm(y);
  return whole > 0 ? whole : 1;
}

function norm(v: Float64Array): number {
  let big = 0;
  for (const e of v) big = Math.max(big, Math.abs(e));
  if (!(big > 0) || !Number.isFinite(big)) return big;
  let s = 0;
  for (const e of v) s += (e / big) ** 2;
  return big * Math.sqrt(s);
}
