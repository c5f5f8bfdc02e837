/**
 * Joint fits over several tables (`fit NAME on A, B, C`; engine/run/joint-tables.ts with the block solver of
 * engine/run/joint.ts):
 * - against scipy.optimize.least_squares on the stacked residuals of three invented tables
 *   (test/run/joint-tables/reference.py; values and library versions in reference.json, computed once);
 * - the shared-versus-separate F test by hand from the two sums of squares (the separate fits by scipy too);
 * - many tables from the robustness suite's generator: the same numbers as the joint fit over the groups of one
 *   column holding the same rows (itself checked against the dense (JᵀJ)⁻¹ in joint.test.ts);
 * - a user's mistakes: a column missing in one table, an empty table, a table with one row, a misspelt table,
 *   different units; each an error (or a named left-out table) at its place in the spec.
 */
import { describe, expect, it } from 'vitest';
import { copyFileSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import Ajv from 'ajv';
import { analyze } from '../../parser/index';
import schema from '../../engine/result.schema.json';
import { resultToJsonValue } from '../../engine/run/json';
import { fUpper } from '../../engine/stats/distributions';
import { FAMILIES, curvesOf } from '../robustness/scenarios';
import { runPlanSync } from '../../engine/runner/run-plan';
import { runSpec, tempDir } from './helpers';

const here = join(__dirname, 'joint-tables');
const reference = JSON.parse(readFileSync(join(here, 'reference.json'), 'utf8')) as {
  library: string; estimates: number[]; covariance: number[][]; ssr: number; n: number; dof: number;
  separate: { table: string; estimates: number[]; ssr: number; dof: number }[];
};

const SPEC = `data day1 = "day1.csv"
data day2 = "day2.csv" where flag == 0
data day3 = "day3.csv"
fit decay on day1, day2, day3 {
  model signal = a * exp(-k * time_s) + c
  param k = 0.5 shared in [0, inf]
  param a = 1
  param c = 0
}
`;

function fixture(): string {
  const dir = tempDir();
  for (const f of ['day1.csv', 'day2.csv', 'day3.csv']) copyFileSync(join(here, f), join(dir, f));
  return dir;
}

describe('run/joint-tables', () => {
  it('matches scipy least_squares on the stacked tables (reference.json: ' + reference.library + ')', async () => {
    const { result } = await runSpec(SPEC, fixture());
    expect(result.errors).toEqual([]);
    const joint = result.joint![0];
    expect(joint.over).toBe('tables');
    expect(joint.groups).toEqual(['day1', 'day2', 'day3']);
    expect(joint.stop.converged).toBe(true);
    expect(joint.n).toBe(reference.n);
    expect(joint.dof).toBe(reference.dof);
    expect(joint.ssr / reference.ssr).toBeCloseTo(1, 9);
    const C = reference.covariance;
    const se = (k: number) => Math.sqrt(C[k][k]);
    // the shared rate: estimate far inside a standard error (the solvers stop at relative reductions 1e-10 and 1e-15), its se to 5 digits
    expect(Math.abs(joint.estimates[0].estimate - reference.estimates[0])).toBeLessThan(1e-6 * se(0));
    expect(joint.estimates[0].stderr! / se(0)).toBeCloseTo(1, 5);
    const fits = result.fits.filter((f) => f.name === 'decay');
    expect(fits.map((f) => f.group)).toEqual(['day1', 'day2', 'day3']);
    // day2 has one row flagged and left out by its own where condition
    expect(fits.map((f) => f.goodness.n)).toEqual([12, 14, 10]);
    fits.forEach((f, g) => {
      for (const [m, name] of ['a', 'c'].entries()) {
        const k = 1 + 2 * g + m;
        const p = f.parameters.find((q) => q.name === name)!;
        expect(Math.abs(p.estimate - reference.estimates[k])).toBeLessThan(1e-6 * se(k));
        expect(p.stderr! / se(k)).toBeCloseTo(1, 5);
      }
      // covariance of the shared k with this table's a (order k, a, c in the fit)
      expect(f.covariance[0][1] / C[0][1 + 2 * g]).toBeCloseTo(1, 4);
    });
    // a difference between tables uses the covariance the shared rate induces between them (a of day3 − a of day1)
    const pair = joint.pairs.find((p) => p.parameter === 'a' && p.a === 'day1' && p.b === 'day3')!;
    expect(pair.differenceSe! / Math.sqrt(C[1][1] + C[5][5] - 2 * C[1][5])).toBeCloseTo(1, 4);
    const validate = new Ajv().compile(schema);
    expect(validate(resultToJsonValue(result)), JSON.stringify(validate.errors)).toBe(true);
  });

  it('the shared-versus-separate F test equals the one by hand from the two sums of squares', async () => {
    const { result } = await runSpec(SPEC, fixture());
    const t = result.joint![0].sharedVsSeparate!;
    const s1 = reference.separate.reduce((a, s) => a + s.ssr, 0);
    const d1 = reference.separate.reduce((a, s) => a + s.dof, 0);
    const s0 = reference.ssr;
    const d0 = reference.dof;
    // 36 rows: joint 36 − (1 + 3 × 2) = 29, separate 3 × (n_t − 3) = 27
    expect([d0, d1]).toEqual([29, 27]);
    const f = ((s0 - s1) / (d0 - d1)) / (s1 / d1);
    expect(t.df1).toBe(2);
    expect(t.df2).toBe(27);
    expect(t.f).toBeCloseTo(f, 5);
    expect(t.pValue).toBeCloseTo(fUpper(f, 2, 27), 6);
    // each table's separate fit (kept beside the joint one in the test's numbers) is scipy's
    expect(t.general.ssr / s1).toBeCloseTo(1, 7);
  });

  it('many tables (robustness generator): the same numbers as the joint fit over the groups of one column', async () => {
    const fam = FAMILIES.find((f) => f.id === 'logistic4-falling-plain')!;
    const curves = curvesOf(fam, 25);
    const dir = tempDir();
    const names = curves.map((_, k) => `w${String(k).padStart(2, '0')}`);
    curves.forEach((c, k) => writeFileSync(join(dir, `${names[k]}.csv`), ['x,y', ...c.x.map((x, i) => `${x},${c.y[i]}`)].join('\n') + '\n'));
    writeFileSync(join(dir, 'all.csv'), ['well,x,y', ...curves.flatMap((c, k) => c.x.map((x, i) => `${names[k]},${x},${c.y[i]}`))].join('\n') + '\n');
    const body = '  model y = bot + (top - bot) / (1 + (x / ec)^h)\n  param bot\n  param top\n  param ec in [0, inf]\n  param h = 1 shared\n';
    const tables = `${names.map((n) => `data ${n} = "${n}.csv"`).join('\n')}\nfit f on ${names.join(', ')} {\n${body}}\n`;
    const column = `data all = "all.csv"\nfit f on all {\n${body}  per well\n}\n`;
    const a = (await runSpec(tables, dir)).result;
    const b = (await runSpec(column, dir)).result;
    expect(a.errors).toEqual([]);
    const ja = a.joint![0];
    const jb = b.joint![0];
    expect(ja.stop.converged).toBe(true);
    expect(ja.groups).toEqual(jb.groups);
    expect(ja.dof).toBe(jb.dof);
    expect(ja.ssr / jb.ssr).toBeCloseTo(1, 10);
    expect(ja.estimates[0].estimate / jb.estimates[0].estimate).toBeCloseTo(1, 8);
    expect(ja.estimates[0].stderr! / jb.estimates[0].stderr!).toBeCloseTo(1, 6);
    const fa = a.fits.filter((f) => f.name === 'f');
    const fb = b.fits.filter((f) => f.name === 'f');
    expect(fa.length).toBe(25);
    fa.forEach((f, g) => f.parameters.forEach((p, m) => expect(p.estimate / fb[g].parameters[m].estimate).toBeCloseTo(1, 6)));
    expect(ja.sharedVsSeparate!.f / jb.sharedVsSeparate!.f).toBeCloseTo(1, 5);
    // more than six tables: each against the first
    expect(ja.pairs.filter((p) => p.parameter === 'ec').length).toBe(24);
  });

  it('a column missing in one table: an error at that table in the on list, before and while running', async () => {
    const dir = fixture();
    writeFileSync(join(dir, 'day3.csv'), 'time_s,signl\n1,5\n2,4\n3,3\n4,2.5\n');
    const { plan, diagnostics } = analyze(SPEC, { headers: (name) => (name === 'day3' ? ['time_s', 'signl'] : ['time_s', 'signal', 'flag']) });
    const d = diagnostics.find((x) => x.code === 'table_column_missing')!;
    expect(d.message).toContain("'signal'");
    expect(d.suggestions).toEqual(['signl']);
    expect(SPEC.slice(d.range.start.offset, d.range.end.offset)).toBe('day3');
    // without headers (the check could not read them) the run reports it, at the same place
    const { result } = await runSpec(SPEC, dir, { headers: false });
    const e = result.errors.find((x) => x.code === 'missing_column')!;
    expect(e, JSON.stringify(result.errors)).toBeDefined();
    expect(SPEC.slice(e.range!.start.offset, e.range!.end.offset)).toBe('day3');
    expect(e.message).toContain('day3.csv');
    expect(result.fits.filter((f) => f.name === 'decay')).toEqual([]);
    void plan;
  });

  it('an empty table stops the fit with an error at its data statement; a table with fewer rows than its own parameters at its name', async () => {
    const dir = fixture();
    writeFileSync(join(dir, 'day3.csv'), 'time_s,signal\n');
    const empty = (await runSpec(SPEC, dir)).result;
    const e = empty.errors.find((x) => x.code === 'no_rows')!;
    expect(e.message).toContain('day3.csv');
    expect(SPEC.slice(e.range!.start.offset, e.range!.end.offset)).toContain('data day3');
    expect(empty.joint ?? []).toEqual([]);

    writeFileSync(join(dir, 'day3.csv'), 'time_s,signal\n1,5.4\n');
    const one = (await runSpec(SPEC, dir)).result;
    const t = one.errors.find((x) => x.code === 'too_few_rows')!;
    expect(t.message).toMatch(/table day3 \(day3\.csv\) leaves 1 usable row for its 2 own parameters/);
    expect(SPEC.slice(t.range!.start.offset, t.range!.end.offset)).toBe('day3');
    expect(one.joint ?? []).toEqual([]);

    // two rows are enough for a table's own a and c: the shared k comes from the other tables; its separate fit
    // (three parameters) cannot run, so the test of shared against separate is not made, and says why
    writeFileSync(join(dir, 'day3.csv'), 'time_s,signal\n1,5.4\n3,2.9\n');
    const two = (await runSpec(SPEC, dir)).result;
    expect(two.errors).toEqual([]);
    const joint = two.joint![0];
    expect(joint.groups).toEqual(['day1', 'day2', 'day3']);
    expect(joint.stop.converged).toBe(true);
    expect(joint.sharedVsSeparate).toBeNull();
  });

  it('a misspelt table name and different units are errors of the check at the table name', () => {
    const typo = SPEC.replace('fit decay on day1, day2, day3', 'fit decay on day1, dya2, day3');
    const d = analyze(typo).diagnostics.find((x) => x.code === 'unknown_data')!;
    expect(typo.slice(d.range.start.offset, d.range.end.offset)).toBe('dya2');
    expect(d.suggestions).toContain('day2');
    const units = SPEC.replace('data day1 = "day1.csv"', 'data day1 = "day1.csv" units time_s [s]').replace('data day3 = "day3.csv"', 'data day3 = "day3.csv" units time_s [min]');
    const u = analyze(units).diagnostics.find((x) => x.code === 'table_units_differ')!;
    expect(u.message).toContain('[min]');
    expect(units.slice(u.range.start.offset, u.range.end.offset)).toBe('day3');
  });

  it('a plan with several tables and a grouping column (only another tool can write one) is refused, not half-run', () => {
    const { plan } = analyze(SPEC);
    const bad = { ...plan, fits: [{ ...plan.fits[0], groupBy: 'flag' }] };
    const result = runPlanSync(bad, { baseDir: fixture(), specText: SPEC });
    expect(result.errors.map((e) => e.code)).toEqual(['not_supported']);
    expect(result.errors[0].message).toMatch(/reads several tables/);
    expect(result.fits).toEqual([]);
  });
});
