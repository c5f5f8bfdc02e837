/**
 * `compare` of fits with groups (engine/run/compare-groups.ts):
 * - a joint fit against the same model fitted separately per group: the F test by hand from the two sums of
 *   squares computed by scipy least_squares (test/run/joint/reference.json, test/run/joint-tables/reference.json:
 *   library versions recorded there), and AICc by hand from the pooled Gaussian log-likelihood;
 * - two per-group fits group by group: one row per group whose numbers are that group's own fits';
 * - refusals: groups whose labels differ once the data are read.
 */
import { describe, expect, it } from 'vitest';
import { copyFileSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fUpper } from '../../engine/stats/distributions';
import { FAMILIES, curvesOf } from '../robustness/scenarios';
import { runSpec, tempDir, writeCsv } from './helpers';

type Compare = Extract<import('../../engine/result').QueryResult, { kind: 'compare' }>;

const plateRef = JSON.parse(readFileSync(join(__dirname, 'joint', 'reference.json'), 'utf8')) as { library: string; ssr: number; dof: number; separate: { ssr: number; dof: number } };
const tablesRef = JSON.parse(readFileSync(join(__dirname, 'joint-tables', 'reference.json'), 'utf8')) as { library: string; ssr: number; dof: number; n: number; separate: { ssr: number; dof: number }[] };

const curve = 'signal = bottom + (top - bottom) / (1 + (dose / ec50)^slope)';
const PLATE = `data plate = "plate.csv"
fit joint on plate {
  model ${curve}
  param bottom shared
  param top shared
  param slope shared
  param ec50 in [0, inf]
  per sample
}
fit separate on plate {
  model ${curve}
  param bottom
  param top
  param slope
  param ec50 in [0, inf]
  per sample
}
fit slope1 on plate {
  model signal = bottom + (top - bottom) / (1 + dose / ec50)
  param bottom
  param top
  param ec50 in [0, inf]
  per sample
}
compare joint, separate
compare slope1, separate
`;

/** AICc of a least-squares fit with estimated variance (engine/stats/goodness.ts): k = p + 1, ln L = −(n/2)(ln 2π + ln(SSR/n) + 1). */
function aicc(n: number, p: number, ssr: number): number {
  const k = p + 1;
  const logL = -(n / 2) * (Math.log(2 * Math.PI) + Math.log(ssr / n) + 1);
  return 2 * k - 2 * logL + (2 * k * (k + 1)) / (n - k - 1);
}

async function plate(): Promise<{ joint: Compare; slope: Compare; result: import('../../engine/result').RunResult }> {
  const dir = tempDir();
  copyFileSync(join(__dirname, 'joint', 'plate.csv'), join(dir, 'plate.csv'));
  const { result } = await runSpec(PLATE, dir);
  expect(result.errors).toEqual([]);
  const [joint, slope] = result.queries as Compare[];
  return { joint, slope, result };
}

describe('run/compare-groups', () => {
  it(`a joint fit against the separate fits per group: the F test by hand from scipy's sums of squares (${plateRef.library})`, async () => {
    const { joint: q, result } = await plate();
    expect(q.grouped).toMatchObject({ by: 'sample', over: 'column', groups: ['REF', 'TEST'], joint: ['joint'] });
    expect(q.grouped!.perGroup).toBeUndefined();
    expect(q.grouped!.noPerGroup).toMatch(/joint is a joint fit/);
    expect(q.nesting?.status).toBe('established');
    const [s0, d0] = [plateRef.ssr, plateRef.dof];
    const [s1, d1] = [plateRef.separate.ssr, plateRef.separate.dof];
    const f = ((s0 - s1) / (d0 - d1)) / (s1 / d1);
    expect(q.fTest!).toMatchObject({ simpler: 'joint', richer: 'separate', df1: d0 - d1, df2: d1 });
    expect(q.fTest!.f).toBeCloseTo(f, 5);
    expect(q.fTest!.pValue).toBeCloseTo(fUpper(f, d0 - d1, d1), 6);
    // the same test as the joint fit's own shared-versus-separate one
    expect(q.fTest!.f).toBeCloseTo(result.joint![0].sharedVsSeparate!.f, 10);
    // the ranking: n, p, SSR of the wholes; AICc by hand from the pooled likelihood
    const rows = Object.fromEntries(q.rows.map((r) => [r.fit, r]));
    expect([rows.joint.n, rows.joint.p, rows.separate.p]).toEqual([32, 5, 8]);
    expect(rows.joint.ssr / s0).toBeCloseTo(1, 9);
    expect(rows.separate.ssr / s1).toBeCloseTo(1, 8);
    expect(rows.joint.aicc).toBeCloseTo(aicc(32, 5, s0), 6);
    expect(rows.separate.aicc).toBeCloseTo(aicc(32, 8, s1), 6);
  });

  it('two per-group fits, group by group: each row holds that group\'s own fits; nested in every group, so nested as wholes', async () => {
    const { slope: q, result } = await plate();
    const rows = q.grouped!.perGroup!;
    expect(rows.map((r) => r.group)).toEqual(['REF', 'TEST']);
    for (const row of rows) {
      const a = result.fits.find((f) => f.name === 'slope1' && f.group === row.group)!;
      const b = result.fits.find((f) => f.name === 'separate' && f.group === row.group)!;
      expect(row.aicc).toEqual([a.goodness.aicc, b.goodness.aicc]);
      expect(row.best).toBe(a.goodness.aicc < b.goodness.aicc ? 'slope1' : 'separate');
      expect(row.deltaAicc).toBeCloseTo(Math.abs(a.goodness.aicc - b.goodness.aicc), 10);
      // the group's F test by hand from its two sums of squares (1 extra parameter)
      const f = (a.goodness.ssr - b.goodness.ssr) / (b.goodness.ssr / b.goodness.dof);
      expect(row.fTest!.df1).toBe(1);
      expect(row.fTest!.f).toBeCloseTo(f, 6);
    }
    // the wholes: every group nested, the F test pools the groups
    expect(q.nesting?.status).toBe('established');
    const sum = (name: string, k: 'ssr' | 'dof') => result.fits.filter((f) => f.name === name).reduce((s, f) => s + f.goodness[k], 0);
    const f = ((sum('slope1', 'ssr') - sum('separate', 'ssr')) / 2) / (sum('separate', 'ssr') / sum('separate', 'dof'));
    expect(q.fTest!.f).toBeCloseTo(f, 6);
  });

  it(`fits over several tables: the joint fit against the separate fits per table (${tablesRef.library})`, async () => {
    const dir = tempDir();
    for (const f of ['day1.csv', 'day2.csv', 'day3.csv']) copyFileSync(join(__dirname, 'joint-tables', f), join(dir, f));
    const body = (shared: string) => `  model signal = a * exp(-k * time_s) + c\n  param k = 0.5${shared} in [0, inf]\n  param a = 1\n  param c = 0\n`;
    const spec = `data day1 = "day1.csv"\ndata day2 = "day2.csv" where flag == 0\ndata day3 = "day3.csv"\nfit shared on day1, day2, day3 {\n${body(' shared')}}\nfit apart on day1, day2, day3 {\n${body('')}}\ncompare shared, apart\n`;
    const { result } = await runSpec(spec, dir);
    expect(result.errors).toEqual([]);
    const q = result.queries[0] as Compare;
    expect(q.grouped).toMatchObject({ over: 'tables', groups: ['day1', 'day2', 'day3'], joint: ['shared'] });
    const s0 = tablesRef.ssr;
    const s1 = tablesRef.separate.reduce((a, s) => a + s.ssr, 0);
    const d1 = tablesRef.separate.reduce((a, s) => a + s.dof, 0);
    const f = ((s0 - s1) / (tablesRef.dof - d1)) / (s1 / d1);
    expect(q.fTest!.f).toBeCloseTo(f, 5);
    expect(q.fTest!.df2).toBe(d1);
  });

  it('refuses fits whose groups differ once the data are read, at the compare statement', async () => {
    const dir = tempDir();
    // group C has no value in extra, so the fit reading it has no group C
    writeCsv(dir, 'd.csv', ['g', 'x', 'y', 'extra'], [
      ...[1, 2, 3, 4, 5].map((x) => ['A', x, 2 * x + 0.1 * (x % 2), 1]),
      ...[1, 2, 3, 4, 5].map((x) => ['C', x, 3 * x - 0.1 * (x % 2), '']),
    ]);
    const spec = 'data d = "d.csv"\nfit f on d {\n  model y = a * x\n  param a = 1\n  per g\n}\nfit h on d {\n  model y = a * x + 0 * extra\n  param a = 1\n  per g\n}\ncompare f, h\n';
    const { result } = await runSpec(spec, dir);
    const e = result.errors.find((x) => x.code === 'compare_groups_differ')!;
    expect(e, JSON.stringify(result.errors)).toBeDefined();
    expect(e.message).toMatch(/"C" is a group of f only/);
    expect(spec.slice(e.range!.start.offset, e.range!.end.offset)).toBe('compare f, h');
    expect(result.queries).toEqual([]);
  });

  it('many groups (robustness generator): 40 decay curves, with and without an offset, compared group by group', async () => {
    const fam = FAMILIES.find((f) => f.id === 'exp-decay')!;
    const curves = curvesOf(fam, 40);
    const dir = tempDir();
    writeCsv(dir, 'd.csv', ['run', 'x', 'y'], curves.flatMap((c, k) => c.x.map((x, i) => [`R${k}`, x, c.y[i]])));
    const spec = [
      'data d = "d.csv"',
      'fit offset on d {', '  model y = a * exp(-k * x) + c', '  param a = 10', '  param k = 1 in [0, inf]', '  param c = 0', '  per run', '}',
      'fit plain on d {', '  model y = a * exp(-k * x)', '  param a = 10', '  param k = 1 in [0, inf]', '  per run', '}',
      'compare plain, offset',
    ].join('\n') + '\n';
    const { result } = await runSpec(spec, dir);
    expect(result.errors).toEqual([]);
    const q = result.queries[0] as Compare;
    const rows = q.grouped!.perGroup!;
    expect(rows.length).toBe(40);
    let tested = 0;
    for (const row of rows) {
      const a = result.fits.find((f) => f.name === 'plain' && f.group === row.group)!;
      const b = result.fits.find((f) => f.name === 'offset' && f.group === row.group)!;
      expect(row.aicc).toEqual([a.goodness.aicc, b.goodness.aicc]);
      if (!row.fTest) continue;
      tested++;
      // by hand from the group's two sums of squares: 1 extra parameter, 25 − 3 degrees of freedom
      const f = (a.goodness.ssr - b.goodness.ssr) / (b.goodness.ssr / 22);
      expect(row.fTest.df2).toBe(22);
      expect(row.fTest.f / f).toBeCloseTo(1, 6);
    }
    // every curve has an offset c between 0 and 10 (2 % noise): the nesting holds in every group, and the data see c
    expect(tested).toBe(40);
    expect(q.nesting?.status).toBe('established');
    expect(rows.filter((r) => r.best === 'offset').length).toBeGreaterThan(30);
  });
});
