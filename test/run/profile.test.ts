/**
 * Profile-likelihood intervals (engine/run/profile.ts, profile-fit.ts) end to
 * end: spec → plan → run, against reference values computed once with
 * general-purpose libraries (numpy 2.4.6, scipy 1.17.1: the fit and every
 * reduced fit by scipy.optimize.least_squares, method 'lm' or, with bounds,
 * 'trf', exact Jacobians by complex step, xtol = ftol = gtol = 1e-15; each end
 * by scipy.optimize.brentq on τ(v) = ±t(n − p, 0.975), xtol 1e-14; the profile
 * t statistic τ of Bates & Watts 1988, §6.1), and exact theory for a model
 * linear in its parameters (its profile interval is the Wald interval).
 */
import Ajv from 'ajv';
import { describe, expect, it } from 'vitest';
import schema from '../../engine/result.schema.json';
import { resultToJsonValue } from '../../engine/run/json';
import type { FitResult, ParameterResult } from '../../engine/result';
import { analyze } from '../../parser/index';
import { fitTextLines } from '../../engine/front/views/text';
import { normals, runSpec, tempDir, writeCsv } from './helpers';
import { requireInCi } from '../fixtures/required';
import { readStrd, strdAvailable, strdDir } from '../strd/read-strd';

const dir = tempDir();

// Invented: a tracer washing out of a test cell, 8 readings.
writeCsv(dir, 'wash.csv', ['t', 'y'], [[0.5, 8.61], [1, 7.12], [2, 5.30], [3, 3.81], [4, 2.92], [6, 1.77], [8, 1.26], [10, 0.83]]);
// Invented: a dose-response of an inhibitor, 10 concentrations, 4-parameter logistic.
writeCsv(dir, 'dose.csv', ['c', 'y'], [[0.01, 98.2], [0.03, 97.1], [0.1, 93.5], [0.3, 84.0], [1, 62.3], [3, 38.9], [10, 19.6], [30, 9.8], [100, 6.1], [300, 4.4]]);
// Invented: a sensor reading that barely drifts (rate near 0, bounded at 0).
writeCsv(dir, 'drift.csv', ['t', 'y'], [[0, 5.0], [1, 5.02], [2, 4.953], [3, 4.881], [4, 4.915], [5, 4.851], [6, 4.946], [7, 5.065], [8, 4.871], [9, 4.849]]);
// Invented: an enzyme assay read only far below saturation (vmax and km not closed from above).
writeCsv(dir, 'low.csv', ['x', 'y'], [[0.1, 0.52], [0.2, 0.97], [0.3, 1.55], [0.4, 1.98], [0.5, 2.61], [0.6, 2.95]]);
// Invented: a calibration line, 12 standards, seeded noise.
const xs = [0, 0.5, 1, 1.5, 2, 3, 4, 5, 6, 7, 8, 10];
const e = normals(21, xs.length);
writeCsv(dir, 'line.csv', ['x', 'y'], xs.map((x, i) => [x, 0.004 + 0.1 * x + 0.003 * e[i]]));
// Invented: two batches of the wash-out.
writeCsv(dir, 'batches.csv', ['t', 'y', 'batch'], [
  ...[[0.5, 8.61], [1, 7.12], [2, 5.30], [3, 3.81], [4, 2.92], [6, 1.77], [8, 1.26], [10, 0.83]].map((r) => [...r, 1]),
  ...[[0.5, 7.9], [1, 6.8], [2, 5.1], [3, 3.9], [4, 2.8], [6, 1.8], [8, 1.1], [10, 0.7]].map((r) => [...r, 2]),
]);

const param = (f: FitResult, name: string): ParameterResult => f.parameters.find((p) => p.name === name)!;

/** The ends agree with the reference within `rel`·(standard error). */
function expectEnds(p: ParameterResult, lower: number, upper: number, rel = 1e-7): void {
  expect(p.profile?.lower.kind).toBe('reached');
  expect(p.profile?.upper.kind).toBe('reached');
  const se = p.stderr!;
  expect(Math.abs(p.profile!.lower.value! - lower)).toBeLessThan(rel * se);
  expect(Math.abs(p.profile!.upper.value! - upper)).toBeLessThan(rel * se);
}

async function fitOf(spec: string): Promise<FitResult> {
  const { result } = await runSpec(spec, dir);
  expect(result.errors).toEqual([]);
  return result.fits[0];
}

describe('engine/run/profile: profile-likelihood intervals against scipy', () => {
  it('exponential wash-out a·exp(−k·t): both ends of both parameters (scipy 1.17.1 reference)', async () => {
    const f = await fitOf('data d = "wash.csv"\nfit wash on d {\n  model y = a * exp(-k * t)\n  param a = 9\n  param k = 0.3\n}\n');
    expect(f.profile?.status).toBe('computed');
    expect(f.profile?.critical).toBeCloseTo(2.4469118511449692, 12);
    // scipy 1.17.1 / numpy 2.4.6 (see module comment)
    expectEnds(param(f, 'a'), 9.051330440243698, 10.34955059784337);
    expectEnds(param(f, 'k'), 0.2577735387354287, 0.3291971080501105);
    // k: the upper profile end lies 10.3 % of the Wald half-width beyond the Wald end: material (PROFILE_MATERIAL 0.1)
    expect(param(f, 'k').profile?.differs).toBe(true);
    expect(param(f, 'a').profile?.differs).toBe(false);
    const w = f.warnings.filter((x) => x.code === 'profile_differs');
    expect(w.map((x) => x.parameters)).toEqual([['k']]);
    expect(w[0].message).toContain('curvature of the model makes the symmetric interval misleading for k');
  });

  it('one free parameter: the profile is S itself, no refit (scipy 1.17.1: least_squares and brentq on S(k))', async () => {
    const f = await fitOf('data d = "wash.csv"\nfit one on d {\n  model y = 9.7 * exp(-k * t)\n  param k = 0.3\n}\n');
    expectEnds(param(f, 'k'), 0.2722657352125265, 0.3139813653692438);
    expect(param(f, 'k').profile!.refits).toBeGreaterThan(2);
  });

  it('a fit by gradient descent is profiled with the same reduced fits (ends as for Levenberg–Marquardt)', async () => {
    const f = await fitOf('data d = "wash.csv"\nfit wash on d {\n  model y = a * exp(-k * t)\n  param a = 9\n  param k = 0.3\n  method gradient_descent\n}\n');
    expect(f.profile?.status).toBe('computed');
    expectEnds(param(f, 'k'), 0.2577735387354287, 0.3291971080501105, 1e-5);
  });

  it('4-parameter logistic: all four parameters (scipy 1.17.1 reference)', async () => {
    const f = await fitOf(
      'data d = "dose.csv"\nfit dr on d {\n  model y = bottom + (top - bottom) / (1 + (c / ec) ^ hill)\n  param top = 100\n  param bottom = 4\n  param ec = 2\n  param hill = 1\n}\n',
    );
    expect(f.profile?.status).toBe('computed');
    expectEnds(param(f, 'top'), 98.42886524029596, 100.41008903671272);
    expectEnds(param(f, 'bottom'), 2.9473879129980625, 4.92352283139979);
    expectEnds(param(f, 'ec'), 1.5866344714697944, 1.7631874204203584);
    expectEnds(param(f, 'hill'), 0.8926770770287762, 0.9808363332198378);
  });

  it('an end that runs into a bound is open at the bound (k ≥ 0; scipy 1.17.1 with bounds, τ(0) = −1.304 > −t)', async () => {
    const f = await fitOf('data d = "drift.csv"\nfit drift on d {\n  model y = a * exp(-k * t)\n  param a = 5\n  param k = 0.01 in [0, inf]\n}\n');
    const k = param(f, 'k');
    expect(k.lower).toBeLessThan(0); // the Wald interval crosses the bound
    expect(k.profile?.lower).toEqual({ kind: 'bound', value: 0 });
    expect(Math.abs(k.profile!.upper.value! - 0.005825485079926066)).toBeLessThan(1e-7 * k.stderr!);
    expectEnds(param(f, 'a'), 4.891646041470875, 5.080640638246512);
    expect(k.profile?.differs).toBe(true);
    const text = fitTextLines(f).join('\n');
    expect(text).toContain('open at bound 0');
    expect(text).toContain('differs: use the profile interval');
  });

  it('an end the profile never reaches is open, not a number (Michaelis–Menten far below saturation)', async () => {
    const f = await fitOf('data d = "low.csv"\nfit mm on d {\n  model y = vmax * x / (km + x)\n  param vmax = 50 in [0, inf]\n  param km = 10 in [0, inf]\n}\n');
    for (const name of ['vmax', 'km']) {
      const p = param(f, name);
      expect(p.profile?.upper.kind).toBe('not_reached');
      expect(p.profile?.lower.kind).toBe('reached');
      expect(p.profile?.lower.value).toBeGreaterThan(0);
      expect(p.profile?.differs).toBe(true);
    }
    expect(fitTextLines(f).join('\n')).toContain('open (not reached)');
  });
});

const strd = strdDir();
const haveStrd = requireInCi('NIST StRD data', strdAvailable(strd), `STRD_DIR=${strd}`);

describe.skipIf(!haveStrd)('engine/run/profile: NIST StRD problems against scipy', () => {
  // NIST StRD Misra1a and BoxBOD (y = b1·(1 − exp(−b2·x))), data read from STRD_DIR; profile ends by
  // scipy 1.17.1 / numpy 2.4.6 as in the module comment (the scipy fit reproduces the certified values
  // of Misra1a to 9 digits).
  const cases = [
    { name: 'Misra1a', start: [500, 0.0001], b1: [233.1953079616618, 245.01736924321898], b2: [0.0005343182679287341, 0.0005660298972765047] },
    { name: 'BoxBOD', start: [100, 0.75], b1: [180.967004673521, 258.5677771071613], b2: [0.3025896226931218, 1.0730532049513988] },
  ];
  for (const c of cases) {
    it(`NIST StRD ${c.name}: profile ends of b1 and b2`, async () => {
      const ds = readStrd('nls', c.name, strd);
      const [y, x] = ds.data;
      writeCsv(dir, `${c.name}.csv`, ['x', 'y'], Array.from(x, (v, i) => [v, y[i]]));
      const f = await fitOf(`data d = "${c.name}.csv"\nfit s on d {\n  model y = b1 * (1 - exp(-b2 * x))\n  param b1 = ${c.start[0]}\n  param b2 = ${c.start[1]}\n}\n`);
      expect(f.stop.converged).toBe(true);
      // the estimates are the certified ones
      expect(param(f, 'b1').estimate).toBeCloseTo(ds.parameters[0].certified, 5);
      expectEnds(param(f, 'b1'), c.b1[0], c.b1[1], 1e-6);
      expectEnds(param(f, 'b2'), c.b2[0], c.b2[1], 1e-6);
    });
  }

  it('NIST StRD Lanczos1 (residuals at rounding level, certified SSR 1.4e-25): no profile, and the reason', async () => {
    const ds = readStrd('nls', 'Lanczos1', strd);
    const [y, x] = ds.data;
    writeCsv(dir, 'Lanczos1.csv', ['x', 'y'], Array.from(x, (v, i) => [v, y[i]]));
    const starts = ds.parameters.map((q) => `  param ${q.name} = ${q.starts![1]}\n`).join('');
    const f = await fitOf(`data d = "Lanczos1.csv"\nfit s on d {\n  model y = b1*exp(-b2*x) + b3*exp(-b4*x) + b5*exp(-b6*x)\n${starts}}\n`);
    expect(f.stop.converged).toBe(true);
    expect(f.profile).toMatchObject({ status: 'skipped', note: expect.stringContaining('rounding level') });
  });

  it('NIST StRD BoxBOD: the curvature warning names both parameters (profile far from the symmetric interval)', async () => {
    const f = await fitOf('data d = "BoxBOD.csv"\nfit s on d {\n  model y = b1 * (1 - exp(-b2 * x))\n  param b1 = 100\n  param b2 = 0.75\n}\n');
    expect(f.warnings.filter((w) => w.code === 'profile_differs').flatMap((w) => w.parameters)).toEqual(['b1', 'b2']);
  });
});

describe('engine/run/profile-fit: when profiles are computed', () => {
  it('a model linear in its parameters: the profile interval is the Wald interval (exact theory), skipped by default, equal when forced', async () => {
    const base = 'data d = "line.csv"\nfit cal on d {\n  model y = a + b * x\n  param a\n  param b\n';
    const byDefault = await fitOf(`${base}}\n`);
    expect(byDefault.profile?.status).toBe('linear');
    expect(byDefault.parameters.every((p) => p.profile === undefined)).toBe(true);
    expect(fitTextLines(byDefault).join('\n')).toContain('the profile interval is the symmetric (Wald) interval');
    const forced = await fitOf(`${base}  profile always\n}\n`);
    expect(forced.profile?.status).toBe('computed');
    for (const p of forced.parameters) {
      const half = (p.upper! - p.lower!) / 2;
      expect(Math.abs(p.profile!.lower.value! - p.lower!)).toBeLessThan(1e-7 * half);
      expect(Math.abs(p.profile!.upper.value! - p.upper!)).toBeLessThan(1e-7 * half);
      expect(p.profile?.differs).toBe(false);
    }
    expect(forced.warnings.some((w) => w.code === 'profile_differs')).toBe(false);
    // the same with relative weights and with absolute σ (s = 1): the profile keeps the Wald interval's scale
    for (const extra of ['  weight 1 / (1 + x)\n', '  sigma 0.002 + 0.001 * x\n']) {
      const w = await fitOf(`${base}  profile always\n${extra}}\n`);
      for (const p of w.parameters) {
        const half = (p.upper! - p.lower!) / 2;
        expect(Math.abs(p.profile!.lower.value! - p.lower!)).toBeLessThan(1e-7 * half);
        expect(Math.abs(p.profile!.upper.value! - p.upper!)).toBeLessThan(1e-7 * half);
      }
    }
  });

  it('a fixed parameter is not profiled; the free ones keep their order', async () => {
    const f = await fitOf('data d = "wash.csv"\nfit wash on d {\n  model y = a * exp(-k * t) + c\n  param a = 9\n  param c = 0 fixed\n  param k = 0.3\n}\n');
    expect(param(f, 'c').profile).toBeUndefined();
    expectEnds(param(f, 'a'), 9.051330440243698, 10.34955059784337);
    expectEnds(param(f, 'k'), 0.2577735387354287, 0.3291971080501105);
  });

  it('profile never, a robust loss, and groups of a per-group fit unless asked: skipped with the reason', async () => {
    const wash = 'data d = "wash.csv"\nfit wash on d {\n  model y = a * exp(-k * t)\n  param a = 9\n  param k = 0.3\n';
    const never = await fitOf(`${wash}  profile never\n}\n`);
    expect(never.profile).toMatchObject({ status: 'skipped', note: expect.stringContaining('profile never') });
    expect(never.parameters.every((p) => p.profile === undefined)).toBe(true);
    const robust = await fitOf(`${wash}  loss huber scale 0.5\n}\n`);
    expect(robust.profile).toMatchObject({ status: 'skipped', note: expect.stringContaining('robust loss') });

    const per = 'data d = "batches.csv"\nfit wash on d {\n  model y = a * exp(-k * t)\n  param a = 9\n  param k = 0.3\n  per batch\n';
    const { result: groups } = await runSpec(`${per}}\n`, dir);
    expect(groups.fits.map((f) => f.profile?.status)).toEqual(['skipped', 'skipped']);
    const { result: asked } = await runSpec(`${per}  profile always\n}\n`, dir);
    expect(asked.fits.map((f) => f.profile?.status)).toEqual(['computed', 'computed']);
    expect(asked.fits[0].parameters.every((p) => p.profile?.lower.kind === 'reached')).toBe(true);
  });

  it('over the work bound (n·p > 10000) only when asked', async () => {
    const n = 5_001;
    writeCsv(dir, 'long.csv', ['t', 'y'], Array.from({ length: n }, (_, i) => {
      const t = (10 * i) / (n - 1);
      return [t, 9 * Math.exp(-0.3 * t) + 0.05 * Math.sin(7 * i)];
    }));
    const f = await fitOf('data d = "long.csv"\nfit wash on d {\n  model y = a * exp(-k * t)\n  param a = 9\n  param k = 0.3\n}\n');
    expect(f.profile).toMatchObject({ status: 'skipped', note: expect.stringContaining('work bound 10000') });
  });

  it('the JSON result with profiles validates against engine/result.schema.json', async () => {
    const { result } = await runSpec('data d = "drift.csv"\nfit drift on d {\n  model y = a * exp(-k * t)\n  param a = 5\n  param k = 0.01 in [0, inf]\n}\n', dir);
    const validate = new Ajv({ allErrors: true, strict: false }).compile(schema);
    const json = resultToJsonValue(result);
    expect(validate(json), JSON.stringify(validate.errors)).toBe(true);
    expect(JSON.stringify(json)).toContain('"kind":"bound"');
  });
});

describe('parser: the profile option', () => {
  it('reads auto | always | never and reports another word with its range', () => {
    const spec = (mode: string) => `data d = "wash.csv"\nfit w on d {\n  model y = a * exp(-k * t)\n  param a = 9\n  param k = 0.3\n  profile ${mode}\n}\n`;
    expect(analyze(spec('always')).plan.fits[0].options.profile).toBe('always');
    expect(analyze(spec('never')).plan.fits[0].options.profile).toBe('never');
    expect(analyze(spec('auto')).plan.fits[0].options.profile).toBeUndefined();
    const bad = analyze(spec('alwys'));
    const d = bad.diagnostics.find((x) => x.code === 'unknown_option');
    expect(d?.message).toContain('profile');
    expect(d?.range.start.line).toBe(6);
    expect(d?.suggestions).toContain('always');
  });
});
