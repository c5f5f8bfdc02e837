/**
 * Derived quantities end to end (spec → plan → run): values, delta-method
 * standard errors and intervals, groups, failures, expectations, schema.
 */
import Ajv from 'ajv';
import { describe, expect, it } from 'vitest';
import { Matrix, inverse } from 'ml-matrix';
import tQuantile from '@stdlib/stats-base-dists-t-quantile';
import schema from '../../engine/result.schema.json';
import { resultToJsonValue } from '../../engine/run/json';
import { runDerived } from '../../engine/run/derived';
import type { DerivedResult, FitResult, RunResult } from '../../engine/result';
import { normals, runSpec, tempDir, writeCsv } from './helpers';

const dir = tempDir();

// Calibration line (invented): y = 0.004 + 0.1·x + 0.003·ε at 12 standards.
const xs = [0, 0.5, 1, 1.5, 2, 3, 4, 5, 6, 7, 8, 10];
const e1 = normals(11, xs.length);
writeCsv(dir, 'line.csv', ['x', 'y'], xs.map((x, i) => [x, 0.004 + 0.1 * x + 0.003 * e1[i]]));
// A second, independent line (different data).
const e2 = normals(12, xs.length);
writeCsv(dir, 'line2.csv', ['x', 'y'], xs.map((x, i) => [x, 0.002 + 0.098 * x + 0.004 * e2[i]]));
// Exponential decay on a baseline, in two batches with different time constants.
const ts = Array.from({ length: 16 }, (_, i) => i * 2);
const e3 = normals(13, 2 * ts.length);
writeCsv(dir, 'decay.csv', ['t', 'temp', 'batch'], [
  ...ts.map((t, i) => [t, 20 + 80 * Math.exp(-t / 9) + 0.3 * e3[i], 1]),
  ...ts.map((t, i) => [t, 20 + 70 * Math.exp(-t / 12) + 0.3 * e3[ts.length + i], 2]),
]);

const LINE = `data d = "line.csv"
fit cal on d {
  model y = intercept + slope * x
  param intercept
  param slope
}
`;
const DECAY = `data dec = "decay.csv" where batch == 1
fit newton on dec {
  model temp = base + amp * exp(-t / tau)
  param base = 15
  param amp = 60
  param tau = 5
}
`;

function one(result: RunResult, name: string): DerivedResult {
  const rows = (result.derived ?? []).filter((d) => d.name === name);
  expect(rows, name).toHaveLength(1);
  return rows[0];
}

/** Ordinary least squares of y on [1, x] with ml-matrix (general-purpose library): slope, s, se(slope). */
function olsLine(x: number[], y: number[]): { slope: number; s: number; seSlope: number } {
  const X = new Matrix(x.map((v) => [1, v]));
  const Y = Matrix.columnVector(y);
  const XtXi = inverse(X.transpose().mmul(X));
  const beta = XtXi.mmul(X.transpose()).mmul(Y);
  const r = Y.sub(X.mmul(beta));
  const s = Math.sqrt(r.transpose().mmul(r).get(0, 0) / (x.length - 2));
  return { slope: beta.get(1, 0), s, seSlope: s * Math.sqrt(XtXi.get(1, 1)) };
}

describe('engine/run/derived', () => {
  it('LOD and LOQ of a calibration line match a hand computation from s and the slope', async () => {
    const { result } = await runSpec(LINE + 'derive lod = 3.3 * cal.rmse / cal.slope [mg/L]\nderive loq = 10 * cal.rmse / cal.slope [mg/L]', dir);
    const ys = xs.map((x, i) => 0.004 + 0.1 * x + 0.003 * e1[i]);
    const ols = olsLine(xs, ys);
    const lod = one(result, 'lod');
    const loq = one(result, 'loq');
    // common practice (ICH Q2): LOD = 3.3·s/slope, LOQ = 10·s/slope; s and slope from ml-matrix OLS.
    expect(lod.value!).toBeCloseTo(3.3 * ols.s / ols.slope, 12);
    expect(loq.value!).toBeCloseTo(10 * ols.s / ols.slope, 12);
    // Delta method with s fixed: se(LOD) = 3.3·s/slope² · se(slope).
    expect(lod.stderr! / ((3.3 * ols.s / ols.slope ** 2) * ols.seSlope)).toBeCloseTo(1, 10);
    // Student t interval with the fit's dof (library: @stdlib t quantile).
    const t = tQuantile(0.975, xs.length - 2);
    expect(lod.dof).toBe(xs.length - 2);
    expect(lod.level).toBe(0.95);
    expect(lod.lower!).toBeCloseTo(lod.value! - t * lod.stderr!, 12);
    expect(lod.upper!).toBeCloseTo(lod.value! + t * lod.stderr!, 12);
    expect(lod.unit).toBe('mg/L');
    expect(lod.expression).toBe('3.3 * cal.rmse / cal.slope');
    expect(lod.fits).toEqual(['cal']);
    expect(lod.note).toMatch(/delta method/);
    expect(lod.note).toMatch(/cal\.rmse taken as fixed/);
  });

  it('the delta-method standard error equals gᵀCg with a finite-difference gradient (ml-matrix)', async () => {
    const { result } = await runSpec(DECAY + 'derive q = newton.amp * exp(-3 / newton.tau) / (1 + newton.base ^ 2 / 1000)', dir);
    const fit = result.fits[0];
    const est = fit.parameters.map((p) => p.estimate);
    const f = ([base, amp, tau]: number[]) => amp * Math.exp(-3 / tau) / (1 + base ** 2 / 1000);
    // Central differences, step h_j = 1e-6·|θ_j| (finite differences in tests only).
    const g = est.map((v, j) => {
      const h = 1e-6 * Math.abs(v);
      const up = [...est];
      const dn = [...est];
      up[j] += h;
      dn[j] -= h;
      return (f(up) - f(dn)) / (2 * h);
    });
    const G = new Matrix([g]);
    const variance = G.mmul(new Matrix(fit.covariance)).mmul(G.transpose()).get(0, 0);
    const q = one(result, 'q');
    expect(q.value!).toBeCloseTo(f(est), 12);
    expect(q.stderr! / Math.sqrt(variance)).toBeCloseTo(1, 6);
    // The covariance is not diagonal here, so ignoring it would give a different answer.
    const diagonalOnly = Math.sqrt(g.reduce((s, gj, j) => s + gj * gj * fit.covariance[j][j], 0));
    expect(Math.abs(diagonalOnly / q.stderr! - 1)).toBeGreaterThan(1e-3);
  });

  it('ln(2)·tau has standard error ln(2)·se(tau) and the fit\'s t interval', async () => {
    const { result } = await runSpec(DECAY + 'derive half_life = ln(2) * newton.tau [min]', dir);
    const tau = result.fits[0].parameters.find((p) => p.name === 'tau')!;
    const h = one(result, 'half_life');
    expect(h.value!).toBeCloseTo(Math.LN2 * tau.estimate, 12);
    expect(h.stderr! / (Math.LN2 * tau.stderr!)).toBeCloseTo(1, 12);
    // Same t quantile as the parameter interval: the interval scales by ln 2.
    expect(h.lower! / (Math.LN2 * tau.lower!)).toBeCloseTo(1, 10);
    expect(h.upper! / (Math.LN2 * tau.upper!)).toBeCloseTo(1, 10);
  });

  it('a chain of derived quantities propagates through the expanded expression', async () => {
    const { result } = await runSpec(DECAY + 'derive a = ln(2) * newton.tau\nderive b = 2 * a + newton.base\nderive c = 2 * ln(2) * newton.tau + newton.base', dir);
    const b = one(result, 'b');
    const c = one(result, 'c');
    expect(b.value!).toBeCloseTo(c.value!, 12);
    expect(b.stderr! / c.stderr!).toBeCloseTo(1, 12);
    expect(b.fits).toEqual(['newton']);
  });

  it('two fits: independent parameters, normal interval at their common level', async () => {
    const spec = LINE + `data d2 = "line2.csv"
fit cal2 on d2 {
  model y = intercept + slope * x
  param intercept
  param slope
}
derive diff = cal2.slope - cal.slope`;
    const { result } = await runSpec(spec, dir);
    const se = (fit: string) => result.fits.find((f) => f.name === fit)!.parameters[1].stderr!;
    const d = one(result, 'diff');
    expect(d.stderr! / Math.hypot(se('cal'), se('cal2'))).toBeCloseTo(1, 12);
    expect(d.dof).toBeNull();
    expect(d.level).toBe(0.95);
    // z_0.975 = 1.959963984540054 (from memory; standard normal 97.5 % quantile).
    expect((d.upper! - d.value!) / d.stderr!).toBeCloseTo(1.959963984540054, 9);
    expect(d.note).toMatch(/independent/);
    expect(d.note).toMatch(/normal interval/);
  });

  it('per-group fits give one value per group; a fit without groups is shared', async () => {
    const spec = `data dec = "decay.csv"
fit newton on dec {
  model temp = base + amp * exp(-t / tau)
  param base = 15
  param amp = 60
  param tau = 5
  per batch
}
${LINE}derive half_life = ln(2) * newton.tau [min]
derive mixed = newton.tau * cal.slope
expect half_life within 5 .. 7`;
    const { result } = await runSpec(spec, dir);
    const rows = (result.derived ?? []).filter((d) => d.name === 'half_life');
    expect(rows.map((r) => r.group)).toEqual(['1', '2']);
    for (const r of rows) {
      const tau = result.fits.find((f) => f.name === 'newton' && f.group === r.group)!.parameters.find((p) => p.name === 'tau')!;
      expect(r.value!).toBeCloseTo(Math.LN2 * tau.estimate, 12);
      expect(r.stderr! / (Math.LN2 * tau.stderr!)).toBeCloseTo(1, 12);
    }
    expect((result.derived ?? []).filter((d) => d.name === 'mixed').map((r) => r.group)).toEqual(['1', '2']);
    // Batch 1 (tau 9, half-life ≈ 6.2) passes, batch 2 (tau 12, ≈ 8.3) does not.
    const checks = result.expectations.map((e) => [e.group, e.passed]);
    expect(checks).toEqual([['1', true], ['2', false]]);
  });

  it('expectations read the value or its standard error, and fail with the reason', async () => {
    const spec = LINE + `derive lod = 3.3 * cal.rmse / cal.slope
derive nope = 1 / (cal.slope - cal.slope)
expect lod below 1
expect lod above 1
expect lod.se below 1e-9
expect lod.se above 0
expect nope below 1`;
    const { result } = await runSpec(spec, dir);
    expect(result.expectations.map((e) => e.passed)).toEqual([true, false, false, true, false]);
    const lod = one(result, 'lod');
    expect(result.expectations[0].actual).toBe(lod.value);
    expect(result.expectations[2].actual).toBe(lod.stderr);
    expect(result.expectations[1].message).toMatch(/^lod = [\d.]+ is not above 1$/);
    expect(result.expectations[4].actual).toBeNull();
    expect(result.expectations[4].message).toMatch(/nope could not be computed \(the value is not a finite number/);
  });

  it('reports why a number is missing: no free parameter, statistics only, failed or missing fit', async () => {
    const spec = `data d = "line.csv"
data gone = "missing.csv"
fit fixed_line on d {
  model y = intercept + slope * x
  param intercept
  param slope = 0.1 fixed
}
fit lost on gone {
  model y = a * x
  param a
}
derive only_fixed = 2 * fixed_line.slope
derive only_stats = fixed_line.rmse * fixed_line.n
derive from_lost = lost.a
derive uses_both = fixed_line.intercept + lost.a`;
    const { result } = await runSpec(spec, dir, { headers: false });
    const fx = one(result, 'only_fixed');
    expect(fx.value).toBeCloseTo(0.2, 15);
    expect([fx.stderr, fx.lower, fx.upper, fx.level]).toEqual([null, null, null, null]);
    expect(fx.note).toMatch(/no free parameter/);
    const st = one(result, 'only_stats');
    expect(st.value!).toBeCloseTo(result.fits[0].goodness.rmse * xs.length, 12);
    expect(st.stderr).toBeNull();
    expect(st.note).toMatch(/fixed_line\.rmse, fixed_line\.n taken as fixed/);
    for (const name of ['from_lost', 'uses_both']) {
      const d = one(result, name);
      expect(d.value).toBeNull();
      expect(d.note).toBe('fit lost has no result.');
    }
  });

  it('a failed fit and a fit without the parameter give no value (direct call)', () => {
    const fit = (stop: FitResult['stop']): FitResult => ({
      name: 'f', stop, level: 0.95, goodness: { dof: 3 }, covariance: [[1]], correlation: [[1]], iterations: 0,
      parameters: [{ name: 'a', estimate: 2, stderr: 1, fixed: false }],
    }) as unknown as FitResult;
    const plan = [{ name: 'q', expr: { kind: 'result' as const, fit: 'f', of: 'estimate' as const, name: 'a' }, text: 'f.a', fits: ['f'], range: undefined as never }];
    const failed = runDerived(plan, new Map([['f', [fit({ code: 'failed', message: 'n < p', converged: false })]]]));
    expect(failed[0]).toMatchObject({ value: null, note: 'fit f failed (n < p).' });
    const ok = runDerived(plan, new Map([['f', [fit({ code: 'small_reduction', message: '', converged: true })]]]));
    expect(ok[0]).toMatchObject({ value: 2, stderr: 1 });
    const stalled = runDerived(plan, new Map([['f', [fit({ code: 'max_iterations', message: '', converged: false })]]]));
    expect(stalled[0].note).toMatch(/did not converge/);
    const other = [{ ...plan[0], expr: { ...plan[0].expr, name: 'b' } }];
    expect(runDerived(other, new Map([['f', [fit({ code: 'exact', message: '', converged: true })]]]))[0].note).toBe('fit f has no parameter b.');
  });

  it('a covariance entry that is not finite gives no standard error', () => {
    const fit = { name: 'f', stop: { code: 'exact', message: '', converged: true }, level: 0.95, goodness: { dof: 3 }, iterations: 0,
      covariance: [[NaN, 0], [0, 4]], correlation: [[NaN, NaN], [NaN, 1]],
      parameters: [{ name: 'a', estimate: 2, stderr: NaN, fixed: false }, { name: 'b', estimate: 3, stderr: 2, fixed: false }] } as unknown as FitResult;
    const mk = (text: string, expr: DerivedPlanExpr) => ({ name: text, expr, text, fits: ['f'], range: undefined as never });
    const ref = (name: string) => ({ kind: 'result' as const, fit: 'f', of: 'estimate' as const, name });
    const [onlyB, withA] = runDerived([mk('b2', { kind: 'binary', op: '*', left: { kind: 'number', value: 2 }, right: ref('b') }), mk('ab', { kind: 'binary', op: '*', left: ref('a'), right: ref('b') })], new Map([['f', [fit]]]));
    expect(onlyB.stderr).toBeCloseTo(4, 15); // 2·√4; the NaN variance of a is not read (zero derivative)
    expect(withA.stderr).toBeNull();
    expect(withA.note).toMatch(/covariance of f is not available/);
  });

  it('reads a derived quantity through its value and gradient: a doubling chain stays exact, a long chain works', () => {
    const fit = { name: 'f', stop: { code: 'exact', message: '', converged: true }, level: 0.95, goodness: { dof: 3 }, iterations: 0,
      covariance: [[1]], correlation: [[1]], parameters: [{ name: 'a', estimate: 1, stderr: 1, fixed: false }] } as unknown as FitResult;
    const a = { kind: 'result', fit: 'f', of: 'estimate', name: 'a' } as DerivedPlanExpr;
    const ref = (k: number) => ({ kind: 'derived', name: `d${k}` }) as DerivedPlanExpr;
    const plan = (k: number, expr: DerivedPlanExpr) => ({ name: `d${k}`, expr, text: '', fits: ['f'], range: undefined as never });
    // d0 = f.a, dk = d(k-1) * d(k-1) = a^(2^k): expanded, d40 would have 2^41 − 1 nodes; its derivative at a = 1 is 2^k
    const doubling = Array.from({ length: 41 }, (_, k) => plan(k, k === 0 ? a : { kind: 'binary', op: '*', left: ref(k - 1), right: ref(k - 1) } as DerivedPlanExpr));
    const out = runDerived(doubling, new Map([['f', [fit]]]));
    for (const [k, d] of out.entries()) {
      expect(d.value).toBe(1);
      expect(d.stderr).toBe(2 ** k); // se(a) = 1; exact in binary
    }
    // dk = d(k-1) + 1 over 20,000 quantities: value a + k, standard error se(a)
    const chain = Array.from({ length: 20_000 }, (_, k) => plan(k, k === 0 ? a : { kind: 'binary', op: '+', left: ref(k - 1), right: { kind: 'number', value: 1 } } as DerivedPlanExpr));
    const long = runDerived(chain, new Map([['f', [fit]]]));
    expect(long).toHaveLength(20_000);
    expect(long[19_999].value).toBe(20_000);
    expect(long[19_999].stderr).toBe(1);
    expect(long[19_999].note).toMatch(/delta method/);
  });

  it('a quantity reading one that could not be evaluated says so', () => {
    const fit = { name: 'f', stop: { code: 'exact', message: '', converged: true }, level: 0.95, goodness: { dof: 3 }, iterations: 0,
      covariance: [[1]], correlation: [[1]], parameters: [{ name: 'a', estimate: 1, stderr: 1, fixed: false }] } as unknown as FitResult;
    const plans = [
      { name: 'bad', expr: { kind: 'derived', name: 'nowhere' } as DerivedPlanExpr, text: '', fits: ['f'], range: undefined as never },
      { name: 'next', expr: { kind: 'derived', name: 'bad' } as DerivedPlanExpr, text: '', fits: ['f'], range: undefined as never },
    ];
    const out = runDerived(plans, new Map([['f', [fit]]]));
    expect(out[0].note).toBe('no derived quantity nowhere above this one.');
    expect(out[1].note).toBe('it reads bad, which could not be evaluated.');
  });

  it('skips derived quantities (and their expectations) of fits not run', async () => {
    const spec = LINE + DECAY.replace('data dec', 'data dec2').replace('on dec', 'on dec2') + 'derive a = cal.slope\nderive b = newton.tau\nexpect a above 0\nexpect b above 0';
    const { result } = await runSpec(spec, dir, { fits: ['newton'] });
    expect((result.derived ?? []).map((d) => d.name)).toEqual(['b']);
    expect(result.expectations.map((e) => e.expectation.text)).toEqual(['b above 0']);
  });

  it('results with derived quantities (groups, missing values) validate against the schema', async () => {
    const spec = `data dec = "decay.csv"
fit newton on dec {
  model temp = base + amp * exp(-t / tau)
  param base = 15
  param amp = 60
  param tau = 5
  per batch
}
${LINE}derive half_life = ln(2) * newton.tau [min]
derive nope = ln(-cal.slope)
derive s = cal.rmse
expect half_life.se below 1
expect nope above 0`;
    const { result } = await runSpec(spec, dir);
    expect(result.derived?.length).toBe(4);
    const validate = new Ajv().compile(schema);
    const ok = validate(resultToJsonValue(result));
    expect(validate.errors ?? []).toEqual([]);
    expect(ok).toBe(true);
    const broken = resultToJsonValue<{ derived: { value: unknown }[] }>(result);
    broken.derived[0].value = 'six';
    expect(validate(broken)).toBe(false);
  });
});

type DerivedPlanExpr = Parameters<typeof runDerived>[0][number]['expr'];

describe('run/derived: a standard error in derive, and numbers that depend on the weighting', () => {
  // invented calibration with scatter growing with the level (the shape of the reported case): 7 levels in triplicate
  const levels = [0.5, 1, 2, 5, 10, 20, 50];
  const e = normals(77, levels.length * 3);
  const calRows = levels.flatMap((x, i) => [0, 1, 2].map((k) => [x, 0.01 + 0.05 * x + 0.002 * x * e[3 * i + k]]));
  writeCsv(dir, 'wcal.csv', ['x', 'y'], calRows);
  const spec = (weight: string) => `data d = "wcal.csv"
fit cal on d {
  model y = intercept + slope * x
  param intercept
  param slope${weight ? `\n  weight ${weight}` : ''}
}
derive lod = 3.3 * cal.intercept.se / cal.slope
derive lod_rmse = 3.3 * cal.rmse / cal.slope
`;

  /** Weighted least squares by hand with ml-matrix: β = (XᵀWX)⁻¹XᵀWy, s² = Σw r²/(n − 2), se(β₀) = √(s²·[(XᵀWX)⁻¹]₀₀). */
  function wls(w: (x: number) => number): { b0: number; b1: number; se0: number } {
    const X = new Matrix(calRows.map(([x]) => [1, x]));
    const W = Matrix.diag(calRows.map(([x]) => w(x)));
    const y = Matrix.columnVector(calRows.map(([, yv]) => yv));
    const xtwxInv = inverse(X.transpose().mmul(W).mmul(X));
    const beta = xtwxInv.mmul(X.transpose()).mmul(W).mmul(y);
    const r = y.clone().sub(X.mmul(beta));
    const s2 = calRows.reduce((a, [x], i) => a + w(x) * r.get(i, 0) ** 2, 0) / (calRows.length - 2);
    return { b0: beta.get(0, 0), b1: beta.get(1, 0), se0: Math.sqrt(s2 * xtwxInv.get(0, 0)) };
  }

  it('3.3 · intercept.se / slope for no weights, 1/x and 1/x², against weighted least squares by hand; weighted ones carry the note', async () => {
    const cases: [string, (x: number) => number][] = [['', () => 1], ['1 / x', (x) => 1 / x], ['1 / x ^ 2', (x) => 1 / x ** 2]];
    const lods: number[] = [];
    for (const [weight, w] of cases) {
      const { result } = await runSpec(spec(weight), dir);
      const lod = result.derived!.find((d) => d.name === 'lod')!;
      const ref = wls(w);
      // reference: ml-matrix 6.x normal equations (a general-purpose library), well conditioned here
      expect(Math.abs(lod.value! / (3.3 * ref.se0 / ref.b1) - 1)).toBeLessThan(1e-9);
      expect(lod.note).toMatch(/cal\.intercept\.se taken as fixed/);
      const rmseNote = result.derived!.find((d) => d.name === 'lod_rmse')!.note;
      if (weight) {
        expect(lod.note).toContain(`cal.intercept.se depends on the weighting of cal (weight ${weight}: on the weighted scale), so this value changes when the weighting does`);
        expect(rmseNote).toContain(`cal.rmse depends on the weighting of cal (weight ${weight}`);
      } else {
        expect(lod.note).not.toMatch(/weighting/);
        expect(rmseNote).not.toMatch(/weighting/);
      }
      expect(result.fits[0].model).toEqual({ equation: 'y = intercept + slope * x', weighting: weight ? { kind: 'weight', expression: weight } : { kind: 'none', expression: null } });
      const validate = new Ajv().compile(schema);
      expect(validate(resultToJsonValue(result)), JSON.stringify(validate.errors)).toBe(true);
      lods.push(lod.value!);
    }
    // the weighting moves the number a lot: that is what the note is for
    expect(new Set(lods.map((v) => v.toPrecision(3))).size).toBe(3);
  });

  it('a σ-weighted fit: the note says the number is on the scale of σ', async () => {
    writeCsv(dir, 'scal.csv', ['x', 'y', 'sd'], calRows.map(([x, yv]) => [x, yv, 0.002 * x]));
    const { result } = await runSpec(`data d = "scal.csv"
fit cal on d {
  model y = intercept + slope * x
  param intercept
  param slope
  sigma sd
}
derive lod = 3.3 * cal.rmse / cal.slope
`, dir);
    expect(result.derived![0].note).toContain('cal.rmse depends on the weighting of cal (σ = sd: on the scale of σ)');
  });
});
