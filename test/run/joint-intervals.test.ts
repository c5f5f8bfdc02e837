/**
 * Profile and bootstrap intervals of joint fits (engine/run/joint-profile.ts, joint-intervals.ts,
 * joint-bootstrap.ts, joint-derived.ts, joint-leverage.ts):
 * - profiles of the shared and per-group parameters and of the ratio ec50[REF]/ec50[TEST] against a profile
 *   computed by hand with scipy.optimize.least_squares + brentq on the stacked problem
 *   (test/run/joint-intervals/reference.py; library versions in reference.json);
 * - Fieller's interval of the ratio by its formula (Fieller 1954, J. R. Statist. Soc. B 16:175–185; in
 *   reference.py) against the between-groups table, and beside the profile interval;
 * - the joint leverages sum to P (trace of the hat matrix; Cook & Weisberg 1982, §2.1) and equal the dense
 *   J(JᵀJ)⁻¹Jᵀ diagonal;
 * - the bootstrap: reproducible from its seed, stratified by group, bootstrap standard errors near the Wald ones.
 */
import { describe, expect, it } from 'vitest';
import { copyFileSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import Ajv from 'ajv';
import schema from '../../engine/result.schema.json';
import { resultToJsonValue } from '../../engine/run/json';
import { analyze } from '../../parser/index';
import { headerLookup } from '../../engine/data/header';
import { parseCsvText } from '../../engine/data/csv';
import { compileColumnExpr } from '../../engine/compile';
import { prepareFitData } from '../../engine/run/fit-data';
import { jointSetup, solveJoint } from '../../engine/run/joint';
import { jointLeverages } from '../../engine/run/joint-leverage';
import type { RunResult } from '../../engine/result';
import { runSpec, tempDir } from './helpers';

const here = join(__dirname, 'joint-intervals');
const plate = join(__dirname, 'joint', 'plate.csv');
const reference = JSON.parse(readFileSync(join(here, 'reference.json'), 'utf8')) as {
  library: string; names: string[]; estimates: number[]; se: number[]; ssr: number; dof: number; t: number;
  profiles: Record<string, [number, number]>;
  ratio: { value: number; se: number; profile: [number, number]; fieller: [number, number] };
};

const spec = (extra = '') => `data plate = "plate.csv"
fit potency on plate {
  model signal = bottom + (top - bottom) / (1 + (dose / ec50)^slope)
  param bottom shared
  param top shared
  param slope shared
  param ec50 in [0, inf]
  per sample
  tolerance 1e-14
${extra}}
derive rel = potency."REF".ec50 / potency."TEST".ec50
`;

async function run(extra = ''): Promise<RunResult> {
  const dir = tempDir();
  copyFileSync(plate, join(dir, 'plate.csv'));
  const { result } = await runSpec(spec(extra), dir, { threads: 1 });
  expect(result.errors).toEqual([]);
  return result;
}

const value = (e: { value: number | null } | undefined) => e?.value ?? NaN;

describe('run/joint-intervals', () => {
  it(`profiles of shared and per-group parameters match a profile by hand (${reference.library})`, async () => {
    const result = await run();
    const groups = result.fits.filter((f) => f.name === 'potency');
    expect(groups[0].profile?.status).toBe('computed');
    expect(groups[0].profile?.critical).toBeCloseTo(reference.t, 10);
    const ends = (name: string, g: number) => groups[g].parameters.find((p) => p.name === name)!.profile!;
    const checks: [string, string, number][] = [
      ['bottom', 'bottom', 0], ['top', 'top', 0], ['slope', 'slope', 0], ['ec50[REF]', 'ec50', 0], ['ec50[TEST]', 'ec50', 1],
    ];
    for (const [ref, name, g] of checks) {
      const k = reference.names.indexOf(ref);
      const pr = ends(name, g);
      expect(pr.lower.kind).toBe('reached');
      expect(pr.upper.kind).toBe('reached');
      // both sides solve to 1e-14 relative reduction; the ends agree to a millionth of a standard error
      expect(Math.abs(value(pr.lower) - reference.profiles[ref][0])).toBeLessThan(1e-6 * reference.se[k]);
      expect(Math.abs(value(pr.upper) - reference.profiles[ref][1])).toBeLessThan(1e-6 * reference.se[k]);
    }
    // a shared parameter's profile is one interval, shown alike in every group and in the joint estimates
    expect(ends('slope', 1)).toEqual(ends('slope', 0));
    expect(result.joint![0].estimates[2].profile).toEqual(ends('slope', 0));
    const validate = new Ajv().compile(schema);
    expect(validate(resultToJsonValue(result)), JSON.stringify(validate.errors)).toBe(true);
  });

  it('the profile interval of a ratio across groups matches the one by hand and lies beside Fieller\'s', async () => {
    const result = await run();
    const rel = result.derived!.find((d) => d.name === 'rel')!;
    expect(rel.value!).toBeCloseTo(reference.ratio.value, 8);
    expect(rel.stderr! / reference.ratio.se).toBeCloseTo(1, 4);
    expect(rel.profile?.status).toBe('computed');
    const iv = rel.profile!.interval!;
    expect(Math.abs(value(iv.lower) - reference.ratio.profile[0])).toBeLessThan(1e-6 * reference.ratio.se);
    expect(Math.abs(value(iv.upper) - reference.ratio.profile[1])).toBeLessThan(1e-6 * reference.ratio.se);
    // Fieller's interval (formula in reference.py) is that of the between-groups table: TEST/REF, the inverse
    const pair = result.joint![0].pairs[0];
    expect(1 / pair.ratioUpper!).toBeCloseTo(reference.ratio.fieller[0], 6);
    expect(1 / pair.ratioLower!).toBeCloseTo(reference.ratio.fieller[1], 6);
    // on this well-determined assay the two agree to within 1 % of the half-width, and neither is the Wald interval
    const half = (reference.ratio.fieller[1] - reference.ratio.fieller[0]) / 2;
    expect(Math.abs(value(iv.lower) - reference.ratio.fieller[0])).toBeLessThan(0.01 * half);
    expect(Math.abs(value(iv.upper) - reference.ratio.fieller[1])).toBeLessThan(0.01 * half);
    expect(Math.abs(rel.lower! - value(iv.lower))).toBeGreaterThan(1e-4 * half);
  });

  it('profile never and the work bound switch the joint profiles off with a note', async () => {
    const off = await run('  profile never\n');
    const g = off.fits.find((f) => f.name === 'potency')!;
    expect(g.profile?.status).toBe('skipped');
    expect(g.parameters.every((p) => p.profile === undefined)).toBe(true);
    expect(off.derived![0].profile?.status).toBe('skipped');
  });

  it('group statistics: pooled s and dof, shares of the parameters summing to P, the lack-of-fit test pooled by hand', async () => {
    const result = await run();
    const joint = result.joint![0];
    const groups = result.fits.filter((f) => f.name === 'potency');
    const P = joint.n - joint.dof;
    expect(P).toBe(5);
    let share = 0;
    for (const g of groups) {
      expect(g.goodness.dof).toBe(joint.dof);
      expect(g.goodness.rmse).toBeCloseTo(joint.rmse, 12);
      expect(g.goodness.aic).toBeNaN();
      expect(g.jointShare!.dof).toBeCloseTo(g.goodness.n - g.jointShare!.parameters, 12);
      expect(g.jointShare!.rmse).toBeCloseTo(Math.sqrt(g.goodness.ssr / g.jointShare!.dof), 10);
      // each group has its own ec50 (1) and part of the 3 shared parameters
      expect(g.jointShare!.parameters).toBeGreaterThan(1);
      expect(g.jointShare!.parameters).toBeLessThan(4);
      share += g.jointShare!.parameters;
      expect(g.residuals.lackOfFit?.f).toBeNull();
      expect(g.residuals.curvature).toBeUndefined();
      // studentized residuals with the pooled s and the joint leverages: eᵢ/(s√(1 − hᵢ))
      g.points.studentized.forEach((t, i) => expect(t).toBeCloseTo(g.points.residual[i] / (joint.rmse * Math.sqrt(1 - g.points.leverage[i])), 10));
    }
    expect(share).toBeCloseTo(P, 10);
    // pooled lack of fit by hand (NIST/SEMATECH e-Handbook §4.4.4.4): pure error about the mean of each (sample, dose) cell
    const lines = readFileSync(plate, 'utf8').trim().split('\n').slice(1).map((l) => l.split(','));
    const cells = new Map<string, number[]>();
    for (const [sample, dose, signal] of lines) cells.set(`${sample}|${dose}`, [...(cells.get(`${sample}|${dose}`) ?? []), Number(signal)]);
    let pe = 0;
    for (const ys of cells.values()) {
      const m = ys.reduce((a, b) => a + b, 0) / ys.length;
      pe += ys.reduce((a, y) => a + (y - m) ** 2, 0);
    }
    const dfLof = cells.size - P;
    const dfPe = lines.length - cells.size;
    const f = ((reference.ssr - pe) / dfLof) / (pe / dfPe);
    const lof = joint.lackOfFit!;
    expect(lof.dfLackOfFit).toBe(dfLof);
    expect(lof.dfPureError).toBe(dfPe);
    expect(lof.f!).toBeCloseTo(f, 6);
  });

  it('joint leverages equal the diagonal of the dense hat matrix and sum to P', () => {
    const text = readFileSync(plate, 'utf8');
    const { plan } = analyze(spec(), { headers: () => ['sample', 'dose', 'signal'] });
    const fit = plan.fits[0];
    const parsed = parseCsvText(text);
    if (!parsed.ok) throw new Error('csv');
    const prepared = prepareFitData(fit, plan.data[0], parsed.table, compileColumnExpr);
    if (!prepared.ok) throw new Error('prepare failed');
    const setup = jointSetup(fit, prepared.data, new Set(['bottom', 'top', 'slope']));
    const solved = solveJoint(setup, Float64Array.of(0.1, 2, 1.2), Float64Array.of(1, 2), {});
    const h = jointLeverages(solved);
    // dense J (n × 5) assembled for the check only
    const rows: number[][] = [];
    setup.data.forEach((d, g) => {
      const theta = Float64Array.of(solved.outcome.shared[0], solved.outcome.shared[1], solved.outcome.shared[2], solved.outcome.local[g]);
      const r = new Float64Array(d.n);
      const J = new Float64Array(d.n * 4);
      setup.problems[g].residualsAndJacobian!(theta, r, J);
      for (let i = 0; i < d.n; i++) rows.push([J[i], J[d.n + i], J[2 * d.n + i], g === 0 ? J[3 * d.n + i] : 0, g === 1 ? J[3 * d.n + i] : 0]);
    });
    const jtj = Array.from({ length: 5 }, (_, a) => Array.from({ length: 5 }, (_, b) => rows.reduce((s, row) => s + row[a] * row[b], 0)));
    const inv = invert(jtj);
    const dense = rows.map((row) => row.reduce((s, ra, a) => s + ra * row.reduce((t, rb, b) => t + inv[a][b] * rb, 0), 0));
    const flat = [...h[0], ...h[1]];
    flat.forEach((v, i) => expect(Math.abs(v - dense[i])).toBeLessThan(1e-10));
    expect(flat.reduce((a, b) => a + b, 0)).toBeCloseTo(5, 10);
  });

  it('the bootstrap within groups is reproducible, gives BCa, and its standard errors are near the Wald ones', async () => {
    const a = await run('  bootstrap 400 seed 11\n');
    const b = await run('  bootstrap 400 seed 11\n');
    const ga = a.fits.filter((f) => f.name === 'potency');
    const gb = b.fits.filter((f) => f.name === 'potency');
    expect(ga.map((g) => g.parameters.map((p) => p.bootstrap))).toEqual(gb.map((g) => g.parameters.map((p) => p.bootstrap)));
    const s = ga[0].bootstrap!;
    expect(s.status).toBe('computed');
    expect(s.failed).toBe(0);
    expect(s.jackknife).toBe(32);
    expect(s.bca).toBe(true);
    for (const g of ga) {
      for (const p of g.parameters) {
        // 400 replicates: the bootstrap s.e. has a relative sampling error of about 1/√(2·400) ≈ 3.5 %; the
        // residual bootstrap's spread is that of raw residuals, √((n − P)/n) ≈ 0.92 of s (common practice)
        const ratio = p.bootstrap!.stderr / p.stderr!;
        expect(ratio).toBeGreaterThan(0.75);
        expect(ratio).toBeLessThan(1.15);
        expect(p.bootstrap!.lower).toBeLessThan(p.estimate);
        expect(p.bootstrap!.upper).toBeGreaterThan(p.estimate);
      }
    }
    const rel = a.derived!.find((d) => d.name === 'rel')!;
    expect(rel.bootstrap?.status).toBe('computed');
    expect(rel.bootstrap!.interval!.lower).toBeLessThan(rel.value!);
    expect(rel.bootstrap!.interval!.upper).toBeGreaterThan(rel.value!);
    // another seed gives other draws
    const c = await run('  bootstrap 400 seed 12\n');
    expect(c.fits[0].parameters[0].bootstrap!.lower).not.toBe(ga[0].parameters[0].bootstrap!.lower);
  });

  it('case and leverage-adjusted resampling within groups run and are wider than raw residuals on average', async () => {
    const raw = await run('  bootstrap 400 seed 5\n');
    const adj = await run('  bootstrap 400 adjusted seed 5\n');
    const cases = await run('  bootstrap 400 cases seed 5\n');
    for (const r of [adj, cases]) expect(r.fits[0].bootstrap?.status).toBe('computed');
    expect(cases.fits[0].bootstrap!.note).toMatch(/within each group/);
    // adjusted residuals eᵢ/√(1 − hᵢ) are larger than eᵢ row by row (Davison & Hinkley 1997, §6.2.3): same draws, wider spread
    const se = (r: RunResult) => r.fits.filter((f) => f.name === 'potency').flatMap((g) => g.parameters.map((p) => p.bootstrap!.stderr));
    const sum = (v: number[]) => v.reduce((x, y) => x + y, 0);
    expect(sum(se(adj))).toBeGreaterThan(sum(se(raw)));
  });
});

/** Gauss–Jordan inverse of a small symmetric positive definite matrix (test only). */
function invert(m: number[][]): number[][] {
  const n = m.length;
  const a = m.map((row, i) => [...row, ...Array.from({ length: n }, (_, j) => (i === j ? 1 : 0))]);
  for (let c = 0; c < n; c++) {
    let piv = c;
    for (let r = c + 1; r < n; r++) if (Math.abs(a[r][c]) > Math.abs(a[piv][c])) piv = r;
    [a[c], a[piv]] = [a[piv], a[c]];
    const d = a[c][c];
    for (let j = 0; j < 2 * n; j++) a[c][j] /= d;
    for (let r = 0; r < n; r++) {
      if (r === c) continue;
      const f = a[r][c];
      for (let j = 0; j < 2 * n; j++) a[r][j] -= f * a[c][j];
    }
  }
  return a.map((row) => row.slice(n));
}
