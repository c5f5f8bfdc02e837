/**
 * The robustness suite, seeded subset: the first SUBSET curves of every
 * family (test/robustness/scenarios.ts) fitted as a user would, with bounds
 * handled by the interior reflective method (the default), against reference
 * minima from scipy 1.17.1 least_squares 'trf' (general-purpose library,
 * fixture reference.json written by reference.py; source line in the
 * fixture). The full run over all 12,000 curves, with both bounds methods, is
 * the benchmark case `robustness` (test/bench/cases/robustness.ts).
 */
import { describe, expect, it } from 'vitest';
import { FAMILIES, curvesOf, fullCount } from './scenarios';
import { loadReference, runSuite, totals, ySum } from './suite';
import { WRONG_MINIMUM_MARGIN, curveData, fitCurve, fitPlanFor } from './fit-curve';
import { runFit } from '../../engine/run';

const SUBSET = 60;
const reference = loadReference();

/**
 * The subset's one local minimum from the spec's start: curve 12 of
 * logistic4-rising-zero, whose potency lies below the lowest dose (truth ec
 * 3e-4, lowest dose 1e-3). From the single start the solver converges at SSR
 * 226.3 with ec on its lower bound 0; the reference (best of six starts)
 * is 216.9, and scipy's trf from the same spec start ends higher still
 * (332.9, computed once with scipy 1.17.1). The check of a fit from given
 * starts (engine/solve/start/check.ts) sees ec on its bound, runs its
 * search and reports the lower minimum with a `lower_minimum` warning.
 */
const CHECKED_LOCAL_MINIMUM = { family: 'logistic4-rising-zero', index: 12, fromStart: 226.2602, reference: 216.9103812 };

describe('robustness suite (seeded subset, interior reflective bounds)', () => {
  it('the fixture matches the generated curves (scipy reference, data fingerprint per family)', () => {
    expect(reference.source).toMatch(/^scipy \d+\.\d+\.\d+ \(numpy \d/);
    expect(fullCount()).toBeGreaterThanOrEqual(10_000);
    for (const family of FAMILIES) {
      const ref = reference.families[family.id];
      expect(ref, family.id).toBeDefined();
      expect(ref.ssr).toHaveLength(family.count);
      const sum = ySum(curvesOf(family));
      expect(Math.abs(sum - ref.ySum) / Math.abs(ref.ySum), family.id).toBeLessThan(1e-13);
    }
  });

  it(`fits the first ${SUBSET} curves of every family: no failure, no wrong minimum`, () => {
    const run = runSuite('reflective', reference, () => SUBSET);
    const t = totals(run);
    expect(t.curves).toBe(SUBSET * FAMILIES.length);
    const failed = run.failures.filter((f) => f.verdict === 'failed');
    expect(failed.map((f) => `${f.family}#${f.index}: ${f.stop}`)).toEqual([]);
    const wrong = run.failures.filter((f) => f.verdict === 'wrong_minimum').map((f) => `${f.family}#${f.index}: SSR ${f.ssr} vs ${f.reference}`);
    expect(wrong).toEqual([]);
    expect(t.corrected).toBeGreaterThanOrEqual(1);
  });

  it('reports the lower minimum of the known local one, with a lower_minimum warning naming the SSR from the start', () => {
    const { family: id, index, fromStart, reference: refSsr } = CHECKED_LOCAL_MINIMUM;
    const family = FAMILIES.find((f) => f.id === id)!;
    const curve = curvesOf(family, index + 1)[index];
    expect(reference.families[id].ssr[index]).toBeCloseTo(refSsr, 6);
    const r = fitCurve(family, curve, 'reflective');
    expect(r.stop.converged).toBe(true);
    expect(r.goodness.ssr).toBeLessThanOrEqual(refSsr * (1 + WRONG_MINIMUM_MARGIN));
    expect(r.search).toMatchObject({ reason: 'check', lowerElsewhere: true, mark: 'ec ended on its lower bound' });
    expect(r.search!.startSsr).toBeCloseTo(fromStart, 3);
    const w = r.warnings.find((x) => x.code === 'lower_minimum');
    expect(w?.message).toContain('SSR 226.26');
    expect(r.stop.message).toContain('SSR 226.26');
    // with the check off (`explore 0`) the fit stays at the local minimum from the start
    const plan = fitPlanFor(family, curve);
    const off = runFit({ ...plan, options: { ...plan.options, explore: 0 } }, curveData(plan, curve));
    expect(off.goodness.ssr).toBeCloseTo(fromStart, 3);
    expect(off.search).toBeUndefined();
  });

  it('our parameters agree with the reference parameters on the zero-dose 4-parameter logistic wells (first 60)', () => {
    const family = FAMILIES.find((f) => f.id === 'logistic4-falling-zero')!;
    const ref = reference.families[family.id];
    let worst = 0;
    for (const c of curvesOf(family, SUBSET)) {
      const r = fitCurve(family, c, 'reflective');
      expect(r.stop.converged).toBe(true);
      const p = ref.params[c.index]!;
      // the reference parameters carry 8 significant digits (fixture)
      r.parameters.forEach((q, j) => { worst = Math.max(worst, Math.abs(q.estimate - p[j]) / Math.max(Math.abs(p[j]), 1e-3)); });
    }
    expect(worst).toBeLessThan(1e-4);
  });
});

describe('robustness suite: projection with an active set (the method replaced for bounded fits)', () => {
  it('fails on zero-dose 4-parameter logistic wells where the reflective method does not (comparison, first 60 curves)', () => {
    const family = FAMILIES.find((f) => f.id === 'logistic4-falling-zero')!;
    const projection = totals(runSuite('projection', reference, () => SUBSET, [family]));
    const reflective = totals(runSuite('reflective', reference, () => SUBSET, [family]));
    expect(reflective.failed + reflective.wrong).toBe(0);
    expect(projection.failed + projection.wrong).toBeGreaterThan(0);
  });
});
