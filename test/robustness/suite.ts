/**
 * The robustness suite's runner, shared by the vitest subset
 * (robustness.test.ts) and the full benchmark case (test/bench/cases/robustness.ts):
 * fits curves of every family with one bounds method and counts, against the
 * reference minima (reference.json, scipy least_squares 'trf', see
 * reference.py):
 *   failed         the fit did not report convergence;
 *   wrong minimum  it converged with an SSR above the reference by more than
 *                  WRONG_MINIMUM_MARGIN (relative);
 *   below          it converged below the reference by more than the margin
 *                  (the reference missed a lower minimum; counted, not a fault);
 *   checked        the check of a fit from given starts (engine/solve/start/
 *                  check.ts) ran its search;
 *   corrected      that search found a lower minimum than the one reached from
 *                  the given starts, reported with a `lower_minimum` warning.
 * A wrong minimum is a reported SSR above the reference, with or without a
 * note: a warning that a lower minimum exists does not make a higher one the
 * right answer (the run reports the lowest minimum it found, so a note
 * without the lower minimum reported does not occur; `noted` counts wrong
 * minima that carry a `lower_minimum` warning all the same).
 */
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { performance } from 'node:perf_hooks';
import type { BoundsMethod } from '../../engine/solve';
import { FAMILIES, curvesOf, type Curve, type Family } from './scenarios';
import { classify, fitCurve, fitPlanFor } from './fit-curve';

export interface Reference {
  source: string;
  families: Record<string, { ySum: number; ssr: (number | null)[]; params: (number[] | null)[] }>;
}

/** The fixture next to this module; from the repository root when bundled (the benchmark runs there: `npm run bench`). */
export function referencePath(): string {
  const here = typeof import.meta.url === 'string' && import.meta.url.startsWith('file:') ? import.meta.url : null;
  return here ? fileURLToPath(new URL('./reference.json', here)) : path.resolve('test/robustness/reference.json');
}

export function loadReference(file = referencePath()): Reference {
  return JSON.parse(readFileSync(file, 'utf8')) as Reference;
}

/** Sum of every y of the family's first `count` curves, added in order with Neumaier's compensation (to compare with the fixture's math.fsum). */
export function ySum(curves: readonly Curve[]): number {
  let s = 0;
  let c = 0;
  for (const cv of curves) {
    for (const v of cv.y) {
      const t = s + v;
      c += Math.abs(s) >= Math.abs(v) ? s - t + v : v - t + s;
      s = t;
    }
  }
  return s + c;
}

export interface CurveFailure {
  family: string;
  index: number;
  verdict: 'failed' | 'wrong_minimum';
  stop: string;
  ssr: number;
  reference: number;
  estimates: number[];
}

export interface FamilyCount {
  family: string;
  curves: number;
  failed: number;
  wrong: number;
  below: number;
  checked: number;
  corrected: number;
  /** Wrong minima that carry a `lower_minimum` warning. */
  noted: number;
  /** Milliseconds fitting (runFit only, plans prepared outside). */
  ms: number;
}

export interface SuiteRun {
  bounds: BoundsMethod;
  families: FamilyCount[];
  failures: CurveFailure[];
}

/** Fits the first `perFamily(f)` curves of each family (all of them by default). */
export function runSuite(bounds: BoundsMethod, reference: Reference, perFamily: (f: Family) => number = (f) => f.count, families: readonly Family[] = FAMILIES): SuiteRun {
  const counts: FamilyCount[] = [];
  const failures: CurveFailure[] = [];
  for (const family of families) {
    const ref = reference.families[family.id];
    if (!ref) throw new Error(`no reference minima for ${family.id}: run test/robustness/reference.py`);
    const curves = curvesOf(family, Math.min(perFamily(family), family.count));
    const plans = curves.map((c) => fitPlanFor(family, c));
    const count: FamilyCount = { family: family.id, curves: curves.length, failed: 0, wrong: 0, below: 0, checked: 0, corrected: 0, noted: 0, ms: 0 };
    curves.forEach((curve, i) => {
      const refSsr = ref.ssr[curve.index];
      if (refSsr === null || refSsr === undefined) throw new Error(`reference for ${family.id} #${curve.index} missing`);
      const t0 = performance.now();
      const result = fitCurve(family, curve, bounds, plans[i]);
      count.ms += performance.now() - t0;
      const o = classify(result, refSsr);
      if (o.belowReference) count.below++;
      if (result.search?.reason === 'check') count.checked++;
      if (result.search?.reason === 'check' && result.search.lowerElsewhere) count.corrected++;
      if (o.verdict === 'ok') return;
      if (o.verdict === 'failed') count.failed++;
      else count.wrong++;
      if (o.verdict === 'wrong_minimum' && result.warnings.some((w) => w.code === 'lower_minimum')) count.noted++;
      failures.push({ family: family.id, index: curve.index, verdict: o.verdict, stop: `${result.stop.code}: ${result.stop.message}`, ssr: o.ssr, reference: refSsr, estimates: result.parameters.map((p) => p.estimate) });
    });
    counts.push(count);
  }
  return { bounds, families: counts, failures };
}

export type SuiteTotals = Omit<FamilyCount, 'family'>;

export function totals(run: SuiteRun): SuiteTotals {
  const zero: SuiteTotals = { curves: 0, failed: 0, wrong: 0, below: 0, checked: 0, corrected: 0, noted: 0, ms: 0 };
  return run.families.reduce((t, f) => {
    const { family: _, ...counts } = f;
    const out = { ...t };
    for (const k of Object.keys(counts) as (keyof SuiteTotals)[]) out[k] += counts[k];
    return out;
  }, zero);
}
