/**
 * The robustness suite without start values (no-start.ts): the first SUBSET
 * curves of every family, each fitted from a spec whose `param` lines keep
 * their bounds but give no value, so the engine computes the starts from the
 * data and runs its multi-start search. Counted against the same reference
 * minima (scipy least_squares 'trf' from several starts, reference.json).
 */
import { describe, expect, it } from 'vitest';
import { FAMILIES, curvesOf } from './scenarios';
import { loadReference, runSuite, totals } from './suite';
import { fitCurve } from './fit-curve';
import { NO_START_FAMILIES, stripStart } from './no-start';

const SUBSET = 20;
const reference = loadReference();

describe('robustness suite without start values (seeded subset)', () => {
  it('writes every family without start values, bounds kept', () => {
    expect(stripStart('ec = 1 in [0, inf]')).toBe('ec in [0, inf]');
    expect(stripStart('b = 0')).toBe('b');
    expect(stripStart('A = 1e9 in [0, inf]')).toBe('A in [0, inf]');
    expect(NO_START_FAMILIES.map((f) => f.id)).toEqual(FAMILIES.map((f) => f.id));
    for (const f of NO_START_FAMILIES) for (const line of f.paramLines(curvesOf(f, 1)[0])) expect(line, f.id).not.toMatch(/=/);
  });

  it(`fits the first ${SUBSET} curves of every family with no failure and no wrong minimum`, () => {
    const run = runSuite('reflective', reference, () => SUBSET, NO_START_FAMILIES);
    const t = totals(run);
    expect(t.curves).toBe(SUBSET * FAMILIES.length);
    expect(run.failures.map((f) => `${f.family}#${f.index} ${f.verdict}: ${f.stop} (SSR ${f.ssr} vs ${f.reference})`)).toEqual([]);
  });

  it('finds the lower minimum that the given start misses (logistic4-rising-zero #12, known local minimum from the spec start)', () => {
    const family = NO_START_FAMILIES.find((f) => f.id === 'logistic4-rising-zero')!;
    const curve = curvesOf(family, 13)[12];
    const r = fitCurve(family, curve, 'reflective');
    const refSsr = reference.families[family.id].ssr[12]!;
    expect(r.stop.converged).toBe(true);
    expect(r.search?.reason).toBe('no_start');
    expect(r.goodness.ssr).toBeLessThanOrEqual(refSsr * (1 + 1e-6));
  });
});
