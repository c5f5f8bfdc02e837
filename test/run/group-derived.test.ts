/**
 * Derived quantities and expectations reading one named group of a per-group fit (`FIT."GROUP".NAME`,
 * engine/run/derived.ts), on the invented two-sample plate of test/run/joint/plate.csv:
 * - a joint fit (bottom/top/slope shared): the relative potency ec50[REF] / ec50[TEST] and a quantity mixing a
 *   shared and per-group parameters, against the delta method on scipy.optimize.least_squares' stacked
 *   covariance (test/run/group-derived/reference.py; values and library versions in reference.json);
 *   the value cross-checked against the ratio the joint comparison reports (with its Fieller interval);
 * - a separate per-group fit: two groups independent, and a quantity within one group;
 * - errors: a group label the fit does not have (with the nearest labels), a fit without groups.
 */
import { describe, expect, it } from 'vitest';
import { copyFileSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { analyze } from '../../parser/index';
import { tCritical } from '../../engine/stats/distributions';
import { runSpec, tempDir } from './helpers';

const ref = JSON.parse(readFileSync(join(__dirname, 'group-derived', 'reference.json'), 'utf8')) as {
  library: string;
  joint: { dof: number; rel: number; rel_se: number; rel_se_without_cross: number; mix: number; mix_se: number };
  separate: { rel: number; rel_se: number; diff_in_test: number; diff_in_test_se: number; test_dof: number };
};

const fitText = (shared: boolean) => `data plate = "plate.csv"
fit potency on plate {
  model signal = bottom + (top - bottom) / (1 + (dose / ec50)^slope)
  param bottom${shared ? ' shared' : ''}
  param top${shared ? ' shared' : ''}
  param slope${shared ? ' shared' : ''}
  param ec50 in [0, inf]
  per sample
}
`;

async function run(spec: string) {
  const dir = tempDir();
  copyFileSync(join(__dirname, 'joint', 'plate.csv'), join(dir, 'plate.csv'));
  return (await runSpec(spec, dir)).result;
}

describe('derive and expect on one group of a per-group fit', () => {
  it(`joint fit: relative potency with the joint covariance, cross-group terms included (${ref.library})`, async () => {
    const result = await run(`${fitText(true)}derive rel = potency."REF".ec50 / potency."TEST".ec50
derive mix = potency."REF".top * potency."REF".ec50 - potency."TEST".ec50
derive same = potency."REF".top - potency."TEST".top
derive against = potency.ec50 / potency."REF".ec50
expect rel within 0.4 .. 0.6
expect rel.se below 0.02
expect potency."TEST".ec50.lower above 1.5
expect potency."REF".ec50 below 1.5
`);
    expect(result.errors).toEqual([]);
    const rel = result.derived!.filter((d) => d.name === 'rel');
    // every group is named: one value, not one per group
    expect(rel).toHaveLength(1);
    expect(rel[0].group).toBeUndefined();
    // the solvers stop at relative reductions of 1e-10 and 1e-15: the values agree far inside a standard error
    expect(Math.abs(rel[0].value! - ref.joint.rel)).toBeLessThan(1e-6 * ref.joint.rel_se);
    expect(rel[0].stderr! / ref.joint.rel_se).toBeCloseTo(1, 5);
    // the cross-group covariance matters here: without it the standard error would be 29 % larger
    expect(Math.abs(rel[0].stderr! / ref.joint.rel_se_without_cross - 1)).toBeGreaterThan(0.2);
    // Student t with the joint fit's degrees of freedom
    expect(rel[0].dof).toBe(ref.joint.dof);
    const t = tCritical(0.95, ref.joint.dof);
    expect(rel[0].upper! - rel[0].value!).toBeCloseTo(t * rel[0].stderr!, 12);
    expect(rel[0].note).toMatch(/joint fit/);
    // cross-check of the value: the joint comparison reports TEST / REF with a Fieller interval
    const pair = result.joint![0].pairs.find((q) => q.parameter === 'ec50' && q.a === 'REF' && q.b === 'TEST')!;
    expect(1 / pair.ratio).toBeCloseTo(rel[0].value!, 12);
    // the Fieller interval of TEST / REF, inverted, lies close to the delta-method interval of REF / TEST (well-determined ec50s)
    expect(1 / pair.ratioUpper!).toBeCloseTo(rel[0].lower!, 2);
    expect(1 / pair.ratioLower!).toBeCloseTo(rel[0].upper!, 2);
    const mix = result.derived!.find((d) => d.name === 'mix')!;
    expect(Math.abs(mix.value! - ref.joint.mix)).toBeLessThan(1e-6 * ref.joint.mix_se);
    expect(mix.stderr! / ref.joint.mix_se).toBeCloseTo(1, 5);
    // a shared parameter is one number in every group: the difference is 0 with no spread
    const same = result.derived!.find((d) => d.name === 'same')!;
    expect(same.value).toBe(0);
    expect(same.stderr).toBe(0);
    // an unnamed group follows the row: REF / REF is 1 exactly; TEST / REF is 1/rel, whose first-order standard
    // error is rel_se / rel² (the gradient of b/a is −(b/a)² times that of a/b)
    const against = result.derived!.filter((d) => d.name === 'against');
    expect(against.map((d) => d.group)).toEqual(['REF', 'TEST']);
    expect(against[0].value).toBe(1);
    expect(against[0].stderr).toBe(0);
    expect(against[1].value! * ref.joint.rel).toBeCloseTo(1, 6);
    expect((against[1].stderr! * ref.joint.rel ** 2) / ref.joint.rel_se).toBeCloseTo(1, 5);
    // the named group only: one check each, not one per group
    expect(result.expectations.map((e) => [e.expectation.text, e.passed, e.group])).toEqual([
      ['rel within 0.4 .. 0.6', true, undefined],
      ['rel.se below 0.02', true, undefined],
      ['potency."TEST".ec50.lower above 1.5', true, 'TEST'],
      ['potency."REF".ec50 below 1.5', true, 'REF'],
    ]);
    const test = result.fits.find((f) => f.group === 'TEST')!.parameters.find((q) => q.name === 'ec50')!;
    expect(result.expectations[2].actual).toBe(test.lower);
  });

  it(`separate per-group fit: different groups independent, one group its own covariance (${ref.library})`, async () => {
    const result = await run(`${fitText(false)}derive rel = potency."REF".ec50 / potency."TEST".ec50
derive inner = potency."TEST".ec50 - potency."TEST".top
derive span = potency.top - potency."REF".top
`);
    expect(result.errors).toEqual([]);
    const rel = result.derived!.find((d) => d.name === 'rel')!;
    // separate fits with guessed starts stop at their own tolerance: 1e-5 of a standard error
    expect(Math.abs(rel.value! - ref.separate.rel)).toBeLessThan(1e-5 * ref.separate.rel_se);
    expect(rel.stderr! / ref.separate.rel_se).toBeCloseTo(1, 4);
    expect(rel.note).toMatch(/independent/);
    // two groups: a normal interval
    expect(rel.dof).toBeNull();
    const inner = result.derived!.find((d) => d.name === 'inner')!;
    expect(inner.stderr! / ref.separate.diff_in_test_se).toBeCloseTo(1, 4);
    expect(inner.dof).toBe(ref.separate.test_dof);
    // an unnamed group follows the row: one value per group, 0 with no spread for REF itself
    const span = result.derived!.filter((d) => d.name === 'span');
    expect(span.map((d) => d.group)).toEqual(['REF', 'TEST']);
    expect(span[0].value).toBe(0);
    expect(span[0].stderr).toBe(0);
    expect(span[1].stderr!).toBeGreaterThan(0);
  });

  it('a group the fit does not have: no value, the note names the nearest labels', async () => {
    const result = await run(`${fitText(true)}derive rel = potency."REF".ec50 / potency."TSET".ec50
expect potency."RFE".ec50.se below 1
`);
    expect(result.expectations).toHaveLength(1);
    expect(result.expectations[0].passed).toBe(false);
    expect(result.expectations[0].message).toContain('no group "RFE" (did you mean "REF"');
    const rel = result.derived!.find((d) => d.name === 'rel')!;
    expect(rel.value).toBeNull();
    expect(rel.note).toContain('no group "TSET"');
    expect(rel.note).toContain('did you mean "TEST"');
    expect(rel.range?.start.line).toBe(10);
    // and located errors of the run: the derive's reference (line 10, from its column) and the expectation (line 11)
    expect(result.errors.map((e) => [e.code, e.range?.start.line, e.fit])).toEqual([['unknown_group', 10, 'potency'], ['unknown_group', 11, 'potency']]);
    expect(result.errors[0].range!.start.column).toBeGreaterThan(1);
    expect(result.errors[0].message).toBe(rel.note.replace(/\.$/, ''));
  });

  it('a fit without groups, or a misplaced label: located errors from the checker', () => {
    const spec = `data plate = "plate.csv"
fit one on plate {
  model signal = a + b * dose
}
derive x = one."REF".a
derive y = one.a."REF"
`;
    const { diagnostics } = analyze(spec);
    const errs = diagnostics.filter((d) => d.severity === 'error');
    const x = errs.find((d) => d.range.start.line === 5)!;
    expect(x.code).toBe('unknown_target');
    expect(x.message).toContain('has no groups');
    const y = errs.find((d) => d.range.start.line === 6)!;
    expect(y.message).toContain('right after the fit name');
  });
});
