import { describe, expect, it } from 'vitest';
import Papa from 'papaparse';
import chisquareCdf from '@stdlib/stats-base-dists-chisquare-cdf';
import { buildGroupTable, worstGroups } from '../../engine/groups/table';
import { toCsv, toJson, summaryToCsv, rowCells } from '../../engine/front/views/group-csv';
import { flagsOf, holmRejected, isPoorFit, isGroupFlag } from '../../engine/groups/flags';
import { quantileSorted, spreadOf } from '../../engine/groups/quantile';
import type { FitResult } from '../../engine/result';
import { lineData, lineFit } from '../fixtures/line-fit';
import { warningText } from '../../engine/messages';
import { THRESHOLDS } from '../../engine/thresholds';

/** Straight-line fits for groups g0..g(k-1), slopes 0.09, 0.10, ... (invented calibration batches). */
function groupFits(k: number): FitResult[] {
  return Array.from({ length: k }, (_, i) => {
    const d = lineData(12, 100 + i, { b: 0.09 + 0.01 * i });
    return lineFit({ ...d, name: 'cal', group: `g${i}` });
  });
}

function failed(group: string): FitResult {
  const f = lineFit({ ...lineData(5, 7), name: 'cal', group });
  return { ...f, stop: { code: 'failed', message: 'fit cal has 1 row but 2 free parameters', converged: false } };
}

describe('engine/groups/quantile', () => {
  it('uses Hyndman–Fan definition 7 (from memory: the default of common statistics packages)', () => {
    const s = Float64Array.from([1, 2, 3, 4]);
    expect(quantileSorted(s, 0.25)).toBe(1.75);
    expect(quantileSorted(s, 0.5)).toBe(2.5);
    expect(quantileSorted(s, 0.75)).toBe(3.25);
    expect(quantileSorted(s, 0)).toBe(1);
    expect(quantileSorted(s, 1)).toBe(4);
  });

  it('ignores non-finite values and reports an empty spread as nulls', () => {
    expect(spreadOf([5, NaN, 1, Infinity, 3])).toEqual({ count: 3, median: 3, q1: 2, q3: 4, iqr: 2, min: 1, max: 5 });
    expect(spreadOf([NaN])).toEqual({ count: 0, median: null, q1: null, q3: null, iqr: null, min: null, max: null });
  });
});

describe('engine/groups/flags', () => {
  it('flags a failed fit as failed only', () => {
    expect(flagsOf(failed('x'))).toEqual(['failed']);
  });

  it('flags not converged and at bound', () => {
    const f = groupFits(1)[0];
    expect(flagsOf(f)).toEqual([]);
    const g: FitResult = {
      ...f,
      stop: { code: 'max_iterations', message: '200 iterations', converged: false },
      parameters: f.parameters.map((p, j) => (j === 1 ? { ...p, atBound: 'upper' } : p)),
    };
    expect(flagsOf(g)).toEqual(['not_converged', 'at_bound']);
  });

  it('uses R² < 0.9 without absolute sigma', () => {
    const f = groupFits(1)[0];
    expect(isPoorFit({ ...f, goodness: { ...f.goodness, r2: 0.89 } })).toBe(true);
    expect(isPoorFit({ ...f, goodness: { ...f.goodness, r2: 0.91 } })).toBe(false);
    expect(isPoorFit({ ...f, goodness: { ...f.goodness, r2: 0.95 } }, { minR2: 0.99 })).toBe(true);
  });

  it('does not judge a model nonlinear in its parameters by R² (the engine says R² is no measure of fit there): its runs test flags it instead', () => {
    const f = groupFits(1)[0];
    const r2Nonlinear = { code: 'r2_nonlinear' as const, message: warningText.r2_nonlinear() };
    const nonlinear = (r2: number, runsP: number): FitResult => ({
      ...f, method: 'levenberg_marquardt', goodness: { ...f.goodness, r2 }, warnings: [r2Nonlinear],
      residuals: { ...f.residuals, runs: { observed: 3, expected: 7, pValue: runsP } },
    });
    expect(isPoorFit(nonlinear(0.5, 0.4))).toBe(false);
    expect(isPoorFit(nonlinear(0.999, 0.002))).toBe(true);
    expect(flagsOf(nonlinear(0.999, 0.002))).toEqual(['poor_fit']);
    // a model linear in its parameters fitted iteratively keeps the R² screen (keyed on the model, not the method)
    expect(isPoorFit({ ...f, method: 'levenberg_marquardt', goodness: { ...f.goodness, r2: 0.5 } })).toBe(true);
    expect(THRESHOLDS.groupMinR2).toBe(0.9);
    // across groups, the runs tests are one family (Holm): p = 0.002 alone is flagged, not among 96 groups
    const many = Array.from({ length: 96 }, (_, i) => ({ ...nonlinear(0.99, i === 0 ? 0.002 : 0.5), group: `w${i}` }));
    expect(buildGroupTable(many).summary.poorFit).toBe(0);
    many[1] = { ...nonlinear(0.99, 1e-5), group: 'w1' };
    const t = buildGroupTable(many);
    expect(t.rows.filter((r) => r.flags.includes('poor_fit')).map((r) => r.group)).toEqual(['w1']);
  });

  it('decides a family of tests by Holm\'s step-down procedure (Holm 1979; values worked from its definition)', () => {
    // sorted 0.01 <= 0.05/3, then 0.03 > 0.05/2: stop
    expect(holmRejected([0.01, 0.04, 0.03, null], 0.05)).toEqual([true, false, false, false]);
    // 0.001 <= 0.0125, 0.01 <= 0.0167, 0.02 <= 0.025, 0.04 <= 0.05: all
    expect(holmRejected([0.04, 0.02, 0.01, 0.001], 0.05)).toEqual([true, true, true, true]);
    expect(holmRejected([], 0.05)).toEqual([]);
    expect(holmRejected([0.05], 0.05)).toEqual([true]);
  });

  it('uses a two-sided χ² test at 0.001 per tail with absolute sigma, ignoring R²', () => {
    const f = groupFits(1)[0];
    const dof = 10;
    const withChi2 = (chi2: number): FitResult => ({ ...f, sigmaAbsolute: true, goodness: { ...f.goodness, dof, r2: 0.1, chi2, chi2Reduced: chi2 / dof } });
    // from memory: the 0.999 quantile of χ² with 10 dof is 29.59 and the 0.001 quantile 1.479 (checked against @stdlib below)
    expect(chisquareCdf(29.59, dof)).toBeCloseTo(0.999, 4);
    expect(chisquareCdf(1.479, dof)).toBeCloseTo(0.001, 4);
    expect(isPoorFit(withChi2(29.7))).toBe(true);
    expect(isPoorFit(withChi2(29.4))).toBe(false);
    expect(isPoorFit(withChi2(10))).toBe(false);
    expect(isPoorFit(withChi2(1.4))).toBe(true);
    expect(isPoorFit(withChi2(1.6))).toBe(false);
  });

  it('has a guard for flag names', () => {
    expect(isGroupFlag('poor_fit')).toBe(true);
    expect(isGroupFlag('bad')).toBe(false);
  });
});

describe('engine/groups/table', () => {
  it('has one row per group with each free parameter\'s estimate and standard error', () => {
    const fits = groupFits(4);
    const t = buildGroupTable(fits);
    expect(t.fit).toBe('cal');
    expect(t.parameters).toEqual(['intercept', 'slope']);
    expect(t.columns.map((c) => c.key)).toEqual(['group', 'n', 'intercept', 'intercept_se', 'slope', 'slope_se', 'r2', 'chi2_reduced', 'stop', 'flags']);
    expect(t.rows.map((r) => r.group)).toEqual(['g0', 'g1', 'g2', 'g3']);
    t.rows.forEach((r, i) => {
      expect(r.estimates).toEqual([fits[i].parameters[0].estimate, fits[i].parameters[1].estimate]);
      expect(r.stderrs).toEqual([fits[i].parameters[0].stderr, fits[i].parameters[1].stderr]);
      expect(r.n).toBe(12);
      expect(rowCells(t, r)).toHaveLength(t.columns.length);
    });
  });

  it('leaves out parameters fixed in every group', () => {
    const fits = groupFits(2).map((f) => ({ ...f, parameters: f.parameters.map((p, j) => (j === 0 ? { ...p, fixed: true } : p)) }));
    expect(buildGroupTable(fits).parameters).toEqual(['slope']);
  });

  it('summarises converged groups: median and IQR of each estimate, counts of failed ones', () => {
    const fits = [...groupFits(5), failed('zz')];
    const t = buildGroupTable(fits);
    const slopes = fits.slice(0, 5).map((f) => f.parameters[1].estimate).sort((a, b) => a - b);
    const s = t.summary.parameters.find((p) => p.name === 'slope')!;
    expect(s.count).toBe(5);
    expect(s.median).toBe(slopes[2]);
    // n = 5: h = 4·0.25 = 1 and 4·0.75 = 3 fall on order statistics 2 and 4
    expect(s.q1).toBe(slopes[1]);
    expect(s.q3).toBe(slopes[3]);
    expect(s.iqr).toBe(slopes[3] - slopes[1]);
    expect(t.summary).toMatchObject({ groups: 6, converged: 5, failed: 1, notConverged: 0, poorFit: 0 });
    const bad = t.rows[5];
    expect(bad.flags).toEqual(['failed']);
    expect(bad.estimates).toEqual([null, null]);
    expect(bad.message).toMatch(/1 row/);
  });

  it('writes CSV that a CSV reader reads back to the same cells (RFC 4180 quoting)', () => {
    const fits = groupFits(3);
    fits[1] = { ...fits[1], group: 'lot "7", north' };
    const t = buildGroupTable([...fits, failed('late')]);
    const csv = toCsv(t);
    const parsed = Papa.parse<string[]>(csv.trimEnd(), { dynamicTyping: false });
    expect(parsed.errors).toEqual([]);
    expect(parsed.data[0]).toEqual(t.columns.map((c) => c.key));
    expect(parsed.data[2][0]).toBe('lot "7", north');
    expect(Number(parsed.data[1][4])).toBe(fits[0].parameters[1].estimate);
    expect(parsed.data[4][2]).toBe('');
    expect(parsed.data[4][t.columns.length - 1]).toBe('failed');
    expect(parsed.data).toHaveLength(5);
  });

  it('writes the summary as CSV and the table as JSON without NaN', () => {
    const t = buildGroupTable([...groupFits(3), failed('f')]);
    const lines = summaryToCsv(t).trimEnd().split('\n');
    expect(lines[0]).toBe('statistic,count,median,q1,q3,iqr,min,max');
    expect(lines.map((l) => l.split(',')[0])).toEqual(['statistic', 'intercept', 'slope', 'r2']);
    const json = toJson(t);
    expect(json).not.toMatch(/NaN/);
    expect(JSON.parse(json)).toEqual(t);
  });

  it('ranks the worst groups: failed, not converged, poor fit, at bound, then by misfit', () => {
    const fits = groupFits(6);
    const r2 = (f: FitResult, v: number): FitResult => ({ ...f, goodness: { ...f.goodness, r2: v } });
    fits[0] = r2(fits[0], 0.95);
    fits[1] = { ...fits[1], stop: { code: 'max_iterations', message: 'limit', converged: false } };
    fits[2] = r2(fits[2], 0.5);
    fits[3] = r2(fits[3], 0.7);
    fits[4] = { ...r2(fits[4], 0.999), parameters: fits[4].parameters.map((p) => ({ ...p, atBound: 'lower' as const })) };
    fits[5] = r2(fits[5], 0.999);
    const t = buildGroupTable([...fits, failed('f')]);
    expect(worstGroups(t, 10).map((r) => r.group)).toEqual(['f', 'g1', 'g2', 'g3', 'g4', 'g0', 'g5']);
    expect(worstGroups(t, 2).map((r) => r.group)).toEqual(['f', 'g1']);
    expect(worstGroups(t, 0)).toEqual([]);
  });

  it('builds an empty table from no results', () => {
    const t = buildGroupTable([]);
    expect(t.rows).toEqual([]);
    expect(t.summary.groups).toBe(0);
    expect(toCsv(t).split('\n')[0]).toBe('group,n,r2,chi2_reduced,stop,flags');
  });
});
