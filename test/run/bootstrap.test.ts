/**
 * Bootstrap intervals (engine/run/bootstrap*.ts) end to end: spec → plan → run.
 * Checks: the random streams (bootstrap-rng.ts); a run reproduces with its
 * seed and changes with another; the refits are bit-identical on 1 and 2
 * worker threads and in any chunking; on a straight line with many points the
 * percentile interval agrees with the Wald interval within a tolerance from
 * the Monte-Carlo error of a sample quantile; failed refits are counted and,
 * beyond one tail's worth, withhold the interval; the residual pool of a
 * weighted fit; derived quantities get intervals from the same refits.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import Ajv from 'ajv';
import schema from '../../engine/result.schema.json';
import { resultToJsonValue } from '../../engine/run/json';
import { replicateStream } from '../../engine/run/bootstrap-rng';
import { residualPool, runBootstrapRange } from '../../engine/run/bootstrap';
import { planBootstrap } from '../../engine/run/bootstrap-fit';
import { bootstrapInterval } from '../../engine/run/bootstrap-summary';
import type { FitResult } from '../../engine/result';
import type { FitData } from '../../engine/run/fit-data';
import { normalQuantile, tCritical } from '../../engine/stats/distributions';
import { fitTextLines, derivedTextLines } from '../../engine/front/views/text';
import { normals, runSpec, tempDir, writeCsv } from './helpers';
import { buildBundles, removeBuilt, type Built } from '../fixtures/built';

const dir = tempDir();
// Invented: a tracer washing out of a test cell, 8 readings.
writeCsv(dir, 'wash.csv', ['t', 'y'], [[0.5, 8.61], [1, 7.12], [2, 5.30], [3, 3.81], [4, 2.92], [6, 1.77], [8, 1.26], [10, 0.83]]);
// Invented: a long calibration line, 400 standards with seeded normal noise (σ = 0.05).
const xs = Array.from({ length: 400 }, (_, i) => i / 40);
const e = normals(77, xs.length);
writeCsv(dir, 'line.csv', ['x', 'y'], xs.map((x, i) => [x, 0.2 + 0.5 * x + 0.05 * e[i]]));
// Invented: a weighted calibration, σ growing with the level.
writeCsv(dir, 'wcal.csv', ['x', 'y', 's'], [[1, 1.12, 0.05], [2, 2.05, 0.08], [4, 4.21, 0.15], [8, 7.85, 0.3], [16, 16.4, 0.6], [32, 31.1, 1.2]]);

const wash = (extra: string) => `data wash = "wash.csv"
fit w on wash {
  model y = a * exp(-k * t)
  param a = 9
  param k = 0.3
${extra}
}
derive half = ln(2) / w.k
derive at5 = w.a * exp(-5 * w.k)
`;

async function run(spec: string, options: Record<string, unknown> = {}) {
  const { result } = await runSpec(spec, dir, options);
  expect(result.errors).toEqual([]);
  return result;
}

let built: Built | undefined;
beforeAll(async () => {
  built = await buildBundles();
}, 180_000);
afterAll(() => removeBuilt(built));

describe('engine/run/bootstrap-rng: one stream per replicate', () => {
  it('a stream depends only on (seed, replicate) and is uniform on [0, 1)', () => {
    const draw = (seed: number, b: number) => Array.from({ length: 5 }, (() => { const s = replicateStream(seed, b); return () => s.next32(); })());
    expect(draw(1, 3)).toEqual(draw(1, 3));
    expect(draw(1, 3)).not.toEqual(draw(1, 4));
    expect(draw(1, 3)).not.toEqual(draw(2, 3));
    // mean and variance of 100,000 uniforms: 1/2 and 1/12 within 5 standard errors (exact moments of U(0, 1))
    const s = replicateStream(5, 0);
    const m = 100_000;
    let sum = 0;
    let sq = 0;
    let min = 1;
    let max = 0;
    for (let i = 0; i < m; i++) {
      const u = s.uniform();
      sum += u;
      sq += u * u;
      min = Math.min(min, u);
      max = Math.max(max, u);
    }
    expect(min).toBeGreaterThanOrEqual(0);
    expect(max).toBeLessThan(1);
    expect(Math.abs(sum / m - 0.5)).toBeLessThan(5 * Math.sqrt(1 / 12 / m));
    expect(Math.abs(sq / m - sum * sum / m / m - 1 / 12)).toBeLessThan(5 * Math.sqrt(1 / 180 / m));
    // indices 0..9: each count within 5 binomial standard errors of m/10
    const counts = new Array(10).fill(0);
    for (let i = 0; i < m; i++) counts[s.index(10)]++;
    for (const c of counts) expect(Math.abs(c - m / 10)).toBeLessThan(5 * Math.sqrt(m * 0.09));
  });
});

describe('engine/run/bootstrap: seeded refits', () => {
  it('a run reproduces with its seed (default seed 1 reported) and changes with another seed', async () => {
    const a = await run(wash('  bootstrap 200'));
    const b = await run(wash('  bootstrap 200'));
    const c = await run(wash('  bootstrap 200 seed 2'));
    const fa = a.fits[0];
    expect(fa.bootstrap?.status).toBe('computed');
    expect(fa.bootstrap?.seed).toBe(1);
    expect(fa.bootstrap?.resample).toBe('residuals');
    expect(fa.parameters.map((p) => p.bootstrap)).toEqual(b.fits[0].parameters.map((p) => p.bootstrap));
    expect(fa.parameters[1].bootstrap!.lower).not.toBe(c.fits[0].parameters[1].bootstrap!.lower);
    expect(c.fits[0].bootstrap?.seed).toBe(2);
    // the JSON validates against the result schema
    const ajv = new Ajv({ allErrors: true, strict: false });
    expect(ajv.validate(schema, resultToJsonValue(a)), JSON.stringify(ajv.errors)).toBe(true);
  });

  it('bit-identical on 1 and 2 worker threads, and in any chunking', async () => {
    const spec = wash('  bootstrap 300 cases seed 11');
    const one = await run(spec, { threads: 1 });
    const two = await run(spec, { threads: 2, workerFile: built!.worker });
    const p1 = one.fits[0].parameters.map((p) => p.bootstrap);
    expect(p1[0]).toBeDefined();
    expect(two.fits[0].parameters.map((p) => p.bootstrap)).toEqual(p1);
    expect(two.derived!.map((d) => d.bootstrap)).toEqual(one.derived!.map((d) => d.bootstrap));
    // the same refits computed as one range and as three chunks
    const { analyze } = await import('../../parser/index');
    const { loadSources } = await import('../../engine/run/datasets');
    const { prepareFitData } = await import('../../engine/run/fit-data');
    const { compileColumnExpr } = await import('../../engine/compile');
    const plan = analyze(spec).plan;
    const src = loadSources(plan.data, dir).tables.get('wash')!;
    const prep = prepareFitData(plan.fits[0], src.source, src.table, compileColumnExpr);
    if (!prep.ok) throw new Error('data');
    const planned = planBootstrap(plan.fits[0], prep.data[0], one.fits[0]);
    if (!planned || 'skipped' in planned) throw new Error('no job');
    const whole = runBootstrapRange(planned.job, 0, 40);
    const parts = [runBootstrapRange(planned.job, 0, 7), runBootstrapRange(planned.job, 7, 29), runBootstrapRange(planned.job, 29, 40)];
    expect(Array.from(whole.theta)).toEqual(parts.flatMap((c) => Array.from(c.theta)));
  }, 120_000);

  it('a straight line with 400 points: the percentile interval is the Wald interval within the Monte-Carlo error', async () => {
    const r = await run(`data line = "line.csv"
fit f on line {
  model y = b0 + b1 * x
  param b0
  param b1
  bootstrap 2000 adjusted seed 3
}`);
    const f = r.fits[0];
    expect(f.bootstrap?.status).toBe('computed');
    expect(f.bootstrap?.failed).toBe(0);
    for (const p of f.parameters) {
      const b = p.bootstrap!;
      const se = p.stderr!;
      // Standard error of the sample quantile at q = 0.025 of a normal with sd se, B = 2000 draws:
      // √(q(1 − q)/B)/φ(z_q)·se = 0.0597·se (asymptotic variance of a sample quantile, e.g. Serfling 1980,
      // Approximation Theorems of Mathematical Statistics, §2.3.3). Tolerance: 4 such errors, plus the gap
      // between the t (398 dof) and normal quantiles (0.006·se) the bootstrap does not reproduce.
      const q = 0.025;
      const z = normalQuantile(1 - q);
      const phi = Math.exp(-z * z / 2) / Math.sqrt(2 * Math.PI);
      const mc = (Math.sqrt((q * (1 - q)) / 2000) / phi) * se;
      const gap = (tCritical(0.95, f.goodness.dof) - z) * se;
      expect(Math.abs(b.lower - p.lower!)).toBeLessThan(4 * mc + gap);
      expect(Math.abs(b.upper - p.upper!)).toBeLessThan(4 * mc + gap);
      // the bootstrap standard error: relative sampling error of a standard deviation from B draws is 1/√(2B) = 1.6 %; 4 of them
      expect(Math.abs(b.stderr / se - 1)).toBeLessThan(4 / Math.sqrt(2 * 2000));
      // BCa needs 400 leave-one-out refits: computed, and close to the percentile interval for a linear model (z₀, a ≈ 0)
      expect(b.bcaLower).not.toBeNull();
      expect(Math.abs(b.bcaLower! - b.lower)).toBeLessThan(4 * mc);
    }
  }, 120_000);

  it('too many failed refits withhold the intervals, with the count and the reason (cases; all x but one equal)', async () => {
    // Invented: a line through 9 readings at x = 1 and one at x = 0. A case sample misses the row at x = 0 with
    // probability 0.9^10 = 35 %: its line is not determined (rank 1), far more than the 2.5 % one tail may lose.
    writeCsv(dir, 'lever.csv', ['x', 'y'], [[0, 0.11], ...[1.02, 0.97, 1.05, 0.99, 1.01, 0.96, 1.03, 0.98, 1.0].map((y) => [1, y])]);
    const r = await run(`data lever = "lever.csv"
fit f on lever {
  model y = b0 + b1 * x
  param b0
  param b1
  bootstrap 200 cases
}
derive ratio = f.b0 / f.b1`);
    const f = r.fits[0];
    expect(f.stop.converged).toBe(true);
    const s = f.bootstrap!;
    expect(s.status).toBe('withheld');
    expect(s.failed).toBeGreaterThan(40);
    expect(s.failed).toBeLessThan(110);
    expect(s.failures[0].reason).toMatch(/does not determine every parameter/);
    expect(f.parameters.every((p) => p.bootstrap === undefined)).toBe(true);
    expect(f.warnings.map((w) => w.code)).toContain('bootstrap_failures');
    expect(r.derived![0].bootstrap?.status).toBe('withheld');
    expect(fitTextLines(f).join('\n')).toMatch(/Bootstrap: withheld: \d+ of 200 refits failed/);
  });

  it('a few failed refits are left out and counted (cases; 4 of 40 rows at x = 0)', async () => {
    // a case sample misses all 4 rows at x = 0 with probability 0.9^40 = 1.5 %: about 15 of 1000, below the 25 allowed
    writeCsv(dir, 'fewlever.csv', ['x', 'y'], Array.from({ length: 40 }, (_, i) => [i < 4 ? 0 : 1, (i < 4 ? 0.1 : 1) + 0.01 * ((i * 7) % 5 - 2)]));
    const r = await run(`data few = "fewlever.csv"
fit f on few {
  model y = b0 + b1 * x
  param b0
  param b1
  bootstrap 1000 cases seed 5
}`);
    const s = r.fits[0].bootstrap!;
    expect(s.status).toBe('computed');
    expect(s.failed).toBeGreaterThan(0);
    expect(s.failed).toBeLessThanOrEqual(25);
    expect(s.note).toContain(`${s.failed} refits failed and are left out`);
  });

  it('derived quantities: intervals from the same refits; a quantity that is a parameter has the parameter\'s intervals', async () => {
    const r = await run(wash('  bootstrap 400 seed 8') + 'derive kk = w.k\n');
    const k = r.fits[0].parameters.find((p) => p.name === 'k')!.bootstrap!;
    const kk = r.derived!.find((d) => d.name === 'kk')!.bootstrap!;
    expect(kk.status).toBe('computed');
    expect(kk.interval).toEqual(k);
    // half = ln 2 / k is decreasing in k: its percentile ends are the transformed ends of k (percentile intervals are
    // transformation-respecting, Efron & Tibshirani 1993, §13.6), up to the interpolation between order statistics
    const half = r.derived!.find((d) => d.name === 'half')!.bootstrap!.interval!;
    expect(half.lower).toBeCloseTo(Math.LN2 / k.upper, 2);
    expect(half.upper).toBeCloseTo(Math.LN2 / k.lower, 2);
    const text = derivedTextLines(r).join('\n');
    expect(text).toContain('Derived quantities: profile and bootstrap intervals');
    expect(text).toContain('seed 8');
  });

  it('skipped for a per-group fit and a robust loss, with the reason', async () => {
    writeCsv(dir, 'two.csv', ['t', 'y', 'g'], [[0.5, 8.61, 1], [1, 7.12, 1], [2, 5.30, 1], [3, 3.81, 1], [4, 2.92, 1], [0.5, 8.1, 2], [1, 7.0, 2], [2, 5.1, 2], [3, 3.9, 2], [4, 2.8, 2]]);
    const r = await run(wash('  bootstrap 200\n  loss huber'));
    expect(r.fits[0].bootstrap?.status).toBe('skipped');
    expect(r.fits[0].bootstrap?.note).toMatch(/robust/);
    const g = await run(`data two = "two.csv"
fit w on two {
  model y = a * exp(-k * t)
  param a = 9
  param k = 0.3
  per g
  bootstrap 200
}`);
    expect(g.fits.length).toBe(2);
    for (const f of g.fits) {
      expect(f.bootstrap?.status).toBe('skipped');
      expect(f.bootstrap?.note).toMatch(/per-group/);
    }
  });
});

describe('engine/run/bootstrap: residual pool and intervals', () => {
  it('a weighted fit resamples √wᵢ·(yᵢ − ŷᵢ), centred; adjusted divides by √(1 − hᵢ) (Davison & Hinkley 1997, §6.2.3)', () => {
    const data = { n: 3, y: Float64Array.from([1, 2, 4]), weights: Float64Array.from([4, 1, 0.25]) } as unknown as FitData;
    const fitted = [0.9, 2.2, 3.6];
    const raw = [2 * 0.1, 1 * -0.2, 0.5 * 0.4];
    const mean = (raw[0] + raw[1] + raw[2]) / 3;
    expect(Array.from(residualPool(data, fitted, null, false, 1e-10))).toEqual(raw.map((v) => v - mean).map((v) => expect.closeTo(v, 15)));
    const h = [0.5, 0.2, 1];
    const adj = [raw[0] / Math.sqrt(0.5), raw[1] / Math.sqrt(0.8)]; // leverage one left out
    const am = (adj[0] + adj[1]) / 2;
    expect(Array.from(residualPool(data, fitted, h, true, 1e-10))).toEqual(adj.map((v) => v - am).map((v) => expect.closeTo(v, 15)));
  });

  it('BCa with no bias and no acceleration is the percentile interval (E&T eq. 14.10 with z₀ = a = 0)', () => {
    // symmetric replicates around the estimate 0 and a symmetric jackknife: z₀ = 0, a = 0
    const values = Float64Array.from({ length: 201 }, (_, i) => (i - 100) / 10);
    const jack = Float64Array.from([-1, 1, -2, 2]);
    const iv = bootstrapInterval(values, jack, 0, 0.9)!;
    expect(iv.z0).toBe(0);
    expect(iv.acceleration).toBe(0);
    expect(iv.bcaLower).toBeCloseTo(iv.lower, 12);
    expect(iv.bcaUpper).toBeCloseTo(iv.upper, 12);
    // percentile ends: Hyndman & Fan definition 7 at 0.05 and 0.95 of −10 … 10 in steps of 0.1
    expect(iv.lower).toBeCloseTo(-9, 12);
    expect(iv.upper).toBeCloseTo(9, 12);
  });
});

export type { FitResult };
