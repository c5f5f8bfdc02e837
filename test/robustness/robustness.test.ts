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
import { WRONG_MINIMUM_MARGIN, fitCurve } from './fit-curve';

const SUBSET = 60;
const reference = loadReference();

/**
 * Known local minima of the subset: from the spec's single start the fit
 * converges to a different (higher) local minimum than the best of the
 * reference's six starts. Curve 12 of logistic4-rising-zero: its potency
 * lies below the lowest dose (truth ec 3e-4, lowest dose 1e-3); we end at
 * SSR 226.3 with ec → 0, the reference at 216.9 from the true parameters,
 * and scipy's trf from the same spec start ends higher still (332.9,
 * computed once with scipy 1.17.1). Finding the lower minimum needs other
 * starts (a multi-start phase), not a better local method.
 */
const KNOWN_LOCAL_MINIMA = new Set(['logistic4-rising-zero#12']);

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

  it(`fits the first ${SUBSET} curves of every family: no failure, no wrong minimum beyond the known local one`, () => {
    const run = runSuite('reflective', reference, () => SUBSET);
    const t = totals(run);
    expect(t.curves).toBe(SUBSET * FAMILIES.length);
    const failed = run.failures.filter((f) => f.verdict === 'failed');
    expect(failed.map((f) => `${f.family}#${f.index}: ${f.stop}`)).toEqual([]);
    const wrong = run.failures.filter((f) => f.verdict === 'wrong_minimum').map((f) => `${f.family}#${f.index}`);
    expect(wrong.filter((w) => !KNOWN_LOCAL_MINIMA.has(w))).toEqual([]);
    // the known one is a converged local minimum above the reference, not a failure
    for (const f of run.failures.filter((x) => KNOWN_LOCAL_MINIMA.has(`${x.family}#${x.index}`))) {
      expect(f.ssr).toBeGreaterThan(f.reference * (1 + WRONG_MINIMUM_MARGIN));
    }
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
