/**
 * Joint fits over groups with shared parameters (engine/run/joint.ts, engine/solve/block-lm.ts,
 * engine/solve/block-covariance.ts, engine/run/joint-compare.ts):
 * - against scipy.optimize.least_squares on the stacked problem (test/run/joint/reference.py, values and
 *   library versions in reference.json, computed once);
 * - the F tests recomputed by hand from the two sums of squares;
 * - many groups from the robustness suite's generator: the block covariance against the dense (JᵀJ)⁻¹ of
 *   the assembled Jacobian, and the dense gradient Jᵀr at the solution;
 * - edge shapes: a group with too few rows, a group whose separate fit cannot run.
 */
import { describe, expect, it } from 'vitest';
import { copyFileSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyze } from '../../parser/index';
import { headerLookup } from '../../engine/data/header';
import { parseCsvText } from '../../engine/data/csv';
import { compileColumnExpr } from '../../engine/compile';
import { prepareFitData } from '../../engine/run/fit-data';
import { jointSetup, solveJoint } from '../../engine/run/joint';
import { fieller } from '../../engine/run/joint-compare';
import { fUpper, tCritical } from '../../engine/stats/distributions';
import { FAMILIES, curvesOf } from '../robustness/scenarios';
import Ajv from 'ajv';
import schema from '../../engine/result.schema.json';
import { resultToJsonValue } from '../../engine/run/json';
import binomialQuantile from '@stdlib/stats-base-dists-binomial-quantile';
import { generate } from '../../samples/generate.mjs';
import { runSpec, tempDir } from './helpers';

const here = join(__dirname, 'joint');
const reference = JSON.parse(readFileSync(join(here, 'reference.json'), 'utf8')) as {
  library: string; estimates: number[]; covariance: number[][]; ssr: number; dof: number; separate: { ssr: number; dof: number };
};

const potencySpec = `data plate = "plate.csv"
fit potency on plate {
  model signal = bottom + (top - bottom) / (1 + (dose / ec50)^slope)
  param bottom shared
  param top shared
  param slope shared
  param ec50 in [0, inf]
  per sample
}
`;

describe('run/joint', () => {
  it('matches scipy least_squares on the stacked problem (reference.json: ' + reference.library + ')', async () => {
    const dir = tempDir();
    copyFileSync(join(here, 'plate.csv'), join(dir, 'plate.csv'));
    const { result } = await runSpec(potencySpec, dir);
    expect(result.errors).toEqual([]);
    const joint = result.joint![0];
    expect(joint.stop.converged).toBe(true);
    expect(joint.dof).toBe(reference.dof);
    expect(joint.ssr).toBeCloseTo(reference.ssr, 10);
    const ref = reference.estimates;
    const se = (k: number) => Math.sqrt(reference.covariance[k][k]);
    joint.estimates.forEach((e, k) => {
      // the solvers stop at relative reductions of 1e-10 and 1e-15: estimates agree far inside a standard error
      expect(Math.abs(e.estimate - ref[k])).toBeLessThan(1e-7 * se(k));
      expect(e.stderr! / se(k)).toBeCloseTo(1, 5);
    });
    const groups = result.fits.filter((f) => f.name === 'potency');
    expect(groups.map((g) => g.group)).toEqual(['REF', 'TEST']);
    groups.forEach((g, k) => {
      const ec = g.parameters.find((p) => p.name === 'ec50')!;
      expect(Math.abs(ec.estimate - ref[3 + k])).toBeLessThan(1e-7 * se(3 + k));
      expect(ec.stderr! / se(3 + k)).toBeCloseTo(1, 5);
      // the shared parameters' rows in each group carry the joint values
      expect(g.parameters[0].estimate).toBe(joint.estimates[0].estimate);
      // covariance between a shared and this group's parameter (bottom, ec50)
      expect(g.covariance[0][3] / reference.covariance[0][3 + k]).toBeCloseTo(1, 4);
    });
    // the difference TEST − REF uses the covariance between the two groups' ec50
    const C = reference.covariance;
    const varDiff = C[3][3] + C[4][4] - 2 * C[3][4];
    const pair = joint.pairs[0];
    expect(pair.parameter).toBe('ec50');
    expect(pair.differenceSe! / Math.sqrt(varDiff)).toBeCloseTo(1, 4);
    // Fieller's interval of TEST / REF from the reference covariance
    const fl = fieller(ref[3], ref[4], C[3][3], C[4][4], C[3][4], tCritical(0.95, reference.dof))!;
    expect(pair.ratioLower!).toBeCloseTo(fl[0], 4);
    expect(pair.ratioUpper!).toBeCloseTo(fl[1], 4);
    expect(pair.ratioLower!).toBeLessThan(pair.ratio);
    expect(pair.ratioUpper!).toBeGreaterThan(pair.ratio);
    // the result with its joint section is what engine/result.schema.json describes
    const validate = new Ajv().compile(schema);
    expect(validate(resultToJsonValue(result)), JSON.stringify(validate.errors)).toBe(true);
  });

  it('the shared-versus-separate F test equals the one by hand from the two sums of squares', async () => {
    const dir = tempDir();
    copyFileSync(join(here, 'plate.csv'), join(dir, 'plate.csv'));
    const { result } = await runSpec(potencySpec, dir);
    const t = result.joint![0].sharedVsSeparate!;
    // by hand: separate fits (scipy) 2 × (16 − 4) dof, joint 32 − 5 dof
    const { ssr: s1, dof: d1 } = reference.separate;
    const s0 = reference.ssr;
    const d0 = reference.dof;
    const f = ((s0 - s1) / (d0 - d1)) / (s1 / d1);
    expect(t.df1).toBe(3);
    expect(t.df2).toBe(24);
    expect(t.f).toBeCloseTo(f, 5);
    expect(t.pValue).toBeCloseTo(fUpper(f, 3, 24), 6);
    // each parameter released alone: the released fit has one more parameter and a sum of squares no larger
    for (const one of result.joint![0].perParameter) {
      expect(one.df1).toBe(1);
      expect(one.general.ssr).toBeLessThanOrEqual(one.restricted.ssr * (1 + 1e-12));
      expect(one.f).toBeCloseTo(((one.restricted.ssr - one.general.ssr) / 1) / (one.general.ssr / one.df2), 8);
    }
  });

  it('many groups (robustness generator): block covariance equals the dense (JᵀJ)⁻¹, and the dense gradient vanishes', () => {
    const fam = FAMILIES.find((f) => f.id === 'logistic4-falling-plain')!;
    const curves = curvesOf(fam, 30);
    const lines = ['well,x,y', ...curves.flatMap((c, k) => c.x.map((x, i) => `W${String(k).padStart(2, '0')},${x},${c.y[i]}`))];
    const spec = `data d = "d.csv"\nfit f on d {\n  model y = bot + (top - bot) / (1 + (x / ec)^h)\n  param bot\n  param top\n  param ec in [0, inf]\n  param h = 1 shared\n  per well\n}\n`;
    const { plan } = analyze(spec, { headers: () => ['well', 'x', 'y'] });
    const fit = plan.fits[0];
    const parsed = parseCsvText(lines.join('\n') + '\n');
    if (!('table' in parsed) || !parsed.table) throw new Error('csv');
    const prepared = prepareFitData(fit, plan.data[0], parsed.table, compileColumnExpr);
    if (!prepared.ok) throw new Error('data');
    const setup = jointSetup(fit, prepared.data, new Set(['h']));
    const G = prepared.data.length;
    const s0 = Float64Array.of(1.5);
    const l0 = Float64Array.from(curves.flatMap((c) => [c.truth[0], c.truth[1], c.truth[2]]));
    const solved = solveJoint(setup, s0, l0, {});
    expect(solved.outcome.stop.converged).toBe(true);
    // dense J: columns h, then (bot, top, ec) of each group
    const P = 1 + 3 * G;
    const N = solved.n;
    const J = new Float64Array(N * P);
    const r = new Float64Array(N);
    let row = 0;
    setup.data.forEach((d, g) => {
      const theta = Float64Array.of(solved.outcome.local[3 * g], solved.outcome.local[3 * g + 1], solved.outcome.local[3 * g + 2], solved.outcome.shared[0]);
      const jg = new Float64Array(d.n * 4);
      const rg = new Float64Array(d.n);
      setup.problems[g].residualsAndJacobian!(theta, rg, jg);
      for (let i = 0; i < d.n; i++) {
        r[row + i] = rg[i];
        J[(row + i) * P] = jg[3 * d.n + i];
        for (let m = 0; m < 3; m++) J[(row + i) * P + 1 + 3 * g + m] = jg[m * d.n + i];
      }
      row += d.n;
    });
    // normal matrix and its inverse by Gauss–Jordan (dense reference, P = 91)
    const A = new Float64Array(P * P);
    for (let i = 0; i < N; i++) for (let a = 0; a < P; a++) { const v = J[i * P + a]; if (v) for (let b = 0; b < P; b++) A[a * P + b] += v * J[i * P + b]; }
    const inv = invert(A, P);
    // gradient Jᵀr relative to ‖J_col‖·‖r‖
    const rn = Math.hypot(...r);
    for (let a = 0; a < P; a++) {
      let gsum = 0;
      for (let i = 0; i < N; i++) gsum += J[i * P + a] * r[i];
      expect(Math.abs(gsum) / (Math.sqrt(A[a * P + a]) * rn)).toBeLessThan(1e-6);
    }
    // shared variance, a group's own block, the shared–own covariance and one between groups
    const rel = (x: number, y: number) => Math.abs(x - y) / Math.max(Math.abs(y), 1e-300);
    expect(rel(solved.cov.shared[0], inv[0])).toBeLessThan(1e-8);
    for (const g of [0, 7, G - 1]) {
      const c = solved.cov.groups[g].cov; // order (h, bot, top, ec)
      for (let m = 0; m < 3; m++) {
        expect(rel(c[(1 + m) * 4 + 1 + m], inv[(1 + 3 * g + m) * P + 1 + 3 * g + m])).toBeLessThan(1e-8);
        expect(rel(c[(1 + m) * 4], inv[(1 + 3 * g + m) * P])).toBeLessThan(1e-6);
      }
    }
    const x0 = solved.cov.groups[0].x;
    const x5 = solved.cov.groups[5].x;
    expect(rel(x0[2] * x5[2], inv[(1 + 2) * P + 1 + 3 * 5 + 2])).toBeLessThan(1e-6);
  });

  it('coverage over fresh data of the potency sample: the 95 % intervals of the joint fit and of the Fieller ratio miss as often as they should', async () => {
    // samples/generate.mjs draws the plate around known values (shared bottom, top, hill; ec50 40 and 50, ratio 1.25).
    // A miss count is Binomial(DRAWS, 0.05) when the intervals are right; with Bonferroni over the 6 checks each must
    // stay at or below the binomial 1 − 0.001/6 quantile (common practice for a coverage check, as test/samples/recovery.test.ts).
    const DRAWS = 40;
    const spec = readFileSync(join(__dirname, '../../samples/potency/potency.lsq'), 'utf8');
    const misses: Record<string, number> = {};
    const miss = (k: string, hit: boolean) => (misses[k] = (misses[k] ?? 0) + (hit ? 0 : 1));
    for (let d = 0; d < DRAWS; d++) {
      const dir = tempDir();
      writeFileSync(join(dir, 'plate.csv'), generate({ potency: 50000 + d })['potency/plate.csv']);
      const { result } = await runSpec(spec, dir);
      const joint = result.joint![0];
      expect(joint.stop.converged).toBe(true);
      const truth: Record<string, number> = { bottom: 2000, top: 52000, hill: 1.1 };
      for (const e of joint.estimates) miss(e.name, e.lower! <= truth[e.name] && truth[e.name] <= e.upper!);
      const fits = result.fits.filter((f) => f.name === 'potency');
      fits.forEach((f, k) => {
        const ec = f.parameters.find((p) => p.name === 'ec50')!;
        const t = k === 0 ? 40 : 50;
        miss(`ec50 ${f.group}`, ec.lower! <= t && t <= ec.upper!);
      });
      const pair = joint.pairs[0];
      miss('ratio', pair.ratioLower! <= 1.25 && 1.25 <= pair.ratioUpper!);
    }
    const limit = binomialQuantile(1 - 0.001 / 6, DRAWS, 0.05);
    expect(Object.keys(misses).length).toBe(6);
    for (const [k, m] of Object.entries(misses)) expect(m, `${k}: ${m} of ${DRAWS} intervals miss the truth`).toBeLessThanOrEqual(limit);
  }, 60000);

  it('a group with too few rows is left out with its reason; a group whose separate fit cannot run still joins', async () => {
    const dir = tempDir();
    const rows = readFileSync(join(here, 'plate.csv'), 'utf8').trimEnd().split('\n');
    // ONE: a single row for one per-group parameter (enough for ec50 alone, not for a separate 4-parameter fit)
    // EMPTY-ish: a group "Q 1" with a space, whose rows have no signal: left out of the fit as missing rows
    rows.push('"S, one",1,1.2');
    writeFileSync(join(dir, 'plate.csv'), rows.join('\n') + '\n');
    const { result } = await runSpec(potencySpec, dir);
    const joint = result.joint![0];
    expect(joint.groups).toEqual(['REF', 'S, one', 'TEST']);
    expect(joint.leftOut).toEqual([]);
    expect(joint.stop.converged).toBe(true);
    const one = result.fits.find((f) => f.group === 'S, one')!;
    expect(one.stop.converged).toBe(true);
    // a separate fit is missing, so no shared-versus-separate test; the per-parameter tests still run
    expect(joint.sharedVsSeparate).toBeNull();
    expect(joint.perParameter.length).toBe(3);
  });

  it('a group with no row for its own parameters is named in leftOut', async () => {
    const dir = tempDir();
    const spec = potencySpec.replace('param ec50 in [0, inf]', 'param ec50 in [0, inf]\n  param shift');
    const model = spec.replace('(dose / ec50)^slope', '(dose / ec50)^slope + shift * 0');
    void model;
    // two per-group parameters (ec50, shift) and a group with one row
    const rows = readFileSync(join(here, 'plate.csv'), 'utf8').trimEnd().split('\n');
    rows.push('LONE,1,1.2');
    writeFileSync(join(dir, 'plate.csv'), rows.join('\n') + '\n');
    const twoLocal = potencySpec.replace('bottom + (top - bottom)', 'bottom + shift + (top - bottom)').replace('param ec50 in [0, inf]', 'param ec50 in [0, inf]\n  param shift = 0');
    const { result } = await runSpec(twoLocal, dir);
    const joint = result.joint![0];
    expect(joint.leftOut.map((l) => l.group)).toEqual(['LONE']);
    expect(joint.leftOut[0].reason).toMatch(/1 usable row for 2 per-group parameters/);
    expect(joint.groups).toEqual(['REF', 'TEST']);
  });
});

/** Inverse of a symmetric positive definite P×P matrix by Gauss–Jordan with partial pivoting (test reference only). */
function invert(a: Float64Array, n: number): Float64Array {
  const m = Float64Array.from(a);
  const inv = new Float64Array(n * n);
  for (let i = 0; i < n; i++) inv[i * n + i] = 1;
  for (let c = 0; c < n; c++) {
    let piv = c;
    for (let i = c + 1; i < n; i++) if (Math.abs(m[i * n + c]) > Math.abs(m[piv * n + c])) piv = i;
    if (piv !== c) for (let k = 0; k < n; k++) {
      [m[c * n + k], m[piv * n + k]] = [m[piv * n + k], m[c * n + k]];
      [inv[c * n + k], inv[piv * n + k]] = [inv[piv * n + k], inv[c * n + k]];
    }
    const d = m[c * n + c];
    for (let k = 0; k < n; k++) { m[c * n + k] /= d; inv[c * n + k] /= d; }
    for (let i = 0; i < n; i++) if (i !== c) {
      const f = m[i * n + c];
      if (f) for (let k = 0; k < n; k++) { m[i * n + k] -= f * m[c * n + k]; inv[i * n + k] -= f * inv[c * n + k]; }
    }
  }
  return inv;
}
