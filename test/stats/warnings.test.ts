import { describe, expect, it } from 'vitest';
import { THRESHOLDS } from '../../engine/thresholds';
import { boundHit, fitWarnings, type WarningInput } from '../../engine/stats/warnings';
import { warningInput } from '../fixtures/warning-input';

const base = warningInput;
const codes = (over: Partial<WarningInput>) => fitWarnings(base(over)).map((w) => w.code);

describe('stats/warnings fitWarnings', () => {
  it('gives no warning for a clean fit', () => {
    expect(fitWarnings(base())).toEqual([]);
  });

  it('flags each documented condition at its threshold', () => {
    expect(codes({ free: [{ name: 'a', estimate: 0, lower: 0, upper: 1 }], correlation: [[1]] })).toEqual(['at_bound']);
    expect(codes({ correlation: [[1, 0.995], [0.995, 1]] })).toEqual(['high_correlation']);
    expect(codes({ correlation: [[1, THRESHOLDS.correlation], [THRESHOLDS.correlation, 1]] })).toEqual([]);
    expect(codes({ condition: 2e10 })).toEqual(['ill_conditioned']);
    expect(codes({ rank: 1, undetermined: ['b'], condition: Infinity })).toEqual(['rank_deficient']);
    expect(codes({ n: 4 })).toEqual(['few_dof']);
    expect(codes({ n: 5 })).toEqual([]);
    expect(codes({ stop: { code: 'max_iterations', message: '200 iterations', converged: false } })).toEqual(['no_convergence']);
    expect(codes({ residuals: { durbinWatson: 0.9, runs: null, shapiroWilk: null } })).toEqual(['residual_pattern']);
    expect(codes({ residuals: { durbinWatson: 2, runs: { observed: 3, expected: 10, pValue: 0.001 }, shapiroWilk: null } })).toEqual(['residual_pattern']);
    expect(codes({ residuals: { durbinWatson: 2, runs: null, shapiroWilk: { w: 0.8, pValue: 0.002 } } })).toEqual(['non_normal_residuals']);
    expect(codes({ linear: false })).toEqual(['r2_nonlinear']);
    expect(codes({ rowsDropped: 3 })).toEqual(['rows_dropped']);
    expect(codes({ guessed: { names: ['a'], how: 'linear least squares for a' } })).toEqual(['guessed_start']);
  });

  it('names the parameters a warning is about', () => {
    const w = fitWarnings(base({ correlation: [[1, -0.999], [-0.999, 1]] }))[0];
    expect(w.parameters).toEqual(['a', 'b']);
    expect(w.message).toContain('ρ = -0.999');
    const r = fitWarnings(base({ rank: 1, undetermined: ['b'], condition: Infinity }))[0];
    expect(r.parameters).toEqual(['b']);
    expect(r.message).toContain('rank 1 of 2');
  });

  it('summarises many strongly correlated pairs in one warning: all pairs in `pairs`, worst first, the worst three in the text', () => {
    const names = ['c0', 'c1', 'c2', 'c3', 'c4'];
    // invented correlations: every pair above 0.99 except c0–c4, strongest c3–c4; ties (c1–c4, c2–c3) keep pair order
    const rho = (j: number, k: number) => (j === k ? 1 : j === 0 && k === 4 ? 0.5 : 0.991 + 0.001 * (j + k));
    const correlation = names.map((_, j) => names.map((__, k) => rho(Math.min(j, k), Math.max(j, k))));
    const w = fitWarnings(base({ free: names.map((name) => ({ name, estimate: 1, lower: -Infinity, upper: Infinity })), correlation })).filter((x) => x.code === 'high_correlation');
    expect(w).toHaveLength(1);
    expect(w[0].pairs).toHaveLength(9); // 10 pairs of 5, less c0–c4
    expect(w[0].pairs![0]).toEqual({ parameters: ['c3', 'c4'], rho: 0.991 + 0.007 });
    expect(w[0].pairs!.map((x) => Math.abs(x.rho))).toEqual([...w[0].pairs!.map((x) => Math.abs(x.rho))].sort((a, b) => b - a));
    expect(w[0].parameters!.slice(0, 2)).toEqual(['c3', 'c4']);
    expect(w[0].message).toMatch(/^9 pairs of parameters are strongly correlated \(\|ρ\| > 0\.99; 5 of the 5 free parameters take part\), the strongest c3–c4 \(ρ = 0\.998\), c2–c4 \(ρ = 0\.997\), c1–c4 \(ρ = 0\.996\) and 6 more;/);
  });

  it('boundHit uses the relative tolerance max(1, |bound|)·1e-8', () => {
    expect(boundHit(100 + 5e-7, 100, 200)).toBe('lower');
    expect(boundHit(100 + 2e-6, 100, 200)).toBeNull();
    expect(boundHit(200, 100, 200)).toBe('upper');
    expect(boundHit(0, -Infinity, Infinity)).toBeNull();
  });
});
