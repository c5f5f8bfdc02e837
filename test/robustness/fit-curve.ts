/**
 * Fits a robustness-suite curve as a user would (a checked spec's fit plan,
 * `runFit` with its solver dispatch), with the bounds handled by the
 * interior reflective method (default) or by projection with an active set,
 * and classifies the outcome against the reference minimum.
 */
import { analyze } from '../../parser/index';
import type { FitPlan } from '../../parser/plan';
import { runFit, type FitData } from '../../engine/run';
import { defaultSolvers, type Solvers } from '../../engine/run/solvers';
import { solveNonlinear, type BoundsMethod } from '../../engine/solve';
import type { FitResult } from '../../engine/result';
import type { Curve, Family } from './scenarios';

/** Relative SSR margin above the reference minimum that counts as a different (worse) minimum. */
export const WRONG_MINIMUM_MARGIN = 1e-6;

export function fitPlanFor(family: Family, curve: Curve): FitPlan {
  // `profile never`: the suite measures the fit itself (failures, wrong minima, time); profile intervals are tested in test/run/profile.test.ts
  const text = ['data d = "d.csv"', 'fit f on d {', `  model y = ${family.model}`, ...family.paramLines(curve).map((p) => `  param ${p}`), '  profile never', '}', ''].join('\n');
  const a = analyze(text);
  const errors = a.diagnostics.filter((d) => d.severity === 'error');
  if (errors.length > 0) throw new Error(`robustness spec for ${family.id} does not check: ${errors.map((e) => e.message).join('; ')}`);
  return a.plan.fits[0];
}

export function curveData(fit: FitPlan, curve: Curve): FitData {
  const n = curve.x.length;
  const x = Float64Array.from(curve.x);
  return {
    fit: fit.name, source: 'd', file: 'd.csv', n, modelColumns: ['x'], columns: [x],
    lines: Int32Array.from({ length: n }, (_, i) => i + 2), y: Float64Array.from(curve.y), weights: null,
    sigmaAbsolute: false, x, predictor: 'x', rowsDropped: 0, rowsWithoutGroup: 0,
  };
}

export function solversFor(bounds: BoundsMethod): Solvers {
  return bounds === 'reflective' ? defaultSolvers : { ...defaultSolvers, levenbergMarquardt: (p, t, o) => solveNonlinear(p, t, { ...o, bounds: 'projection' }) };
}

export type Verdict = 'ok' | 'failed' | 'wrong_minimum';

export interface CurveOutcome {
  verdict: Verdict;
  ssr: number;
  /** Our SSR below the reference by more than the margin (the reference missed a lower minimum). */
  belowReference: boolean;
  result: FitResult;
}

export function classify(result: FitResult, referenceSsr: number): CurveOutcome {
  const ssr = result.goodness.ssr;
  const converged = result.stop.converged && Number.isFinite(ssr);
  const verdict: Verdict = !converged ? 'failed' : ssr > referenceSsr * (1 + WRONG_MINIMUM_MARGIN) ? 'wrong_minimum' : 'ok';
  return { verdict, ssr, belowReference: converged && ssr < referenceSsr * (1 - WRONG_MINIMUM_MARGIN), result };
}

export function fitCurve(family: Family, curve: Curve, bounds: BoundsMethod, plan = fitPlanFor(family, curve)): FitResult {
  return runFit(plan, curveData(plan, curve), { solvers: solversFor(bounds) });
}
