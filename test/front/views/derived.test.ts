import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import type { DerivedResult, RunResult } from '../../../engine/result';
import { derivedBlock } from '../../../engine/front/views/summary';
import { runText } from '../../../engine/front/views/text';
import { markdownReport } from '../../../engine/front/views/markdown';
import { formatEstimate } from '../../../engine/format';
import { buildPanelModel } from '../../../extension/logic/panel-model';

const run = JSON.parse(readFileSync(join(__dirname, '../../fixtures/calibration-run.json'), 'utf8')) as RunResult;

const NOTE = 'standard error by the delta method (first order) from the parameter covariance of cal; cal.rmse taken as fixed (its own uncertainty is not included); 95% Student-t interval with 16 degrees of freedom.';
const lod: DerivedResult = {
  name: 'lod', expression: '3.3 * cal.rmse / cal.slope', value: 0.0853404, stderr: 0.000139263, lower: 0.0850490, upper: 0.0856319,
  level: 0.95, dof: 16, unit: 'mg/L', fits: ['cal'], note: NOTE,
};
const loq: DerivedResult = { ...lod, name: 'loq', expression: '10 * cal.rmse / cal.slope', value: 0.258607, stderr: 0.000422009, lower: 0.257713, upper: 0.259502 };
const bad: DerivedResult = {
  name: 'ratio', group: 'b2', expression: 'cal.slope / 0', value: null, stderr: null, lower: null, upper: null, level: null, dof: null,
  fits: ['cal'], note: 'the value is not a finite number (e.g. a division by zero or the logarithm of a non-positive number).',
};
const withDerived: RunResult = { ...run, derived: [lod, loq, bad] };

describe('views/summary derivedBlock', () => {
  it('is absent without derived quantities (also for results written before them)', () => {
    expect(derivedBlock(run)).toBeNull();
    expect(derivedBlock({ ...run, derived: [] })).toBeNull();
  });

  it('has a row per quantity with value, SE and interval to one last digit, and the unit', () => {
    const b = derivedBlock(withDerived)!;
    expect(b.heading).toBe('Derived quantities');
    expect(b.headers).toEqual(['quantity', 'value', 'std. error', '95% interval', 'unit']);
    const f = formatEstimate(lod.value!, lod.stderr, lod.lower, lod.upper);
    expect(b.rows[0]).toEqual(['lod', f.estimate, f.stderr, `[${f.lower}, ${f.upper}]`, 'mg/L']);
    expect(b.rows[2]).toEqual(['ratio [b2]', 'n/a', 'n/a', '', '']);
  });

  it('groups identical notes and names the quantities they apply to', () => {
    const b = derivedBlock(withDerived)!;
    expect(b.notes).toEqual([`lod, loq: ${NOTE}`, `ratio [b2]: ${bad.note}`]);
  });

  it('labels each interval with its level and kind when the levels differ', () => {
    const b = derivedBlock({ ...run, derived: [lod, { ...loq, level: 0.9, dof: null }] })!;
    expect(b.headers[3]).toBe('interval');
    expect(b.rows[0][3]).toMatch(/\(95%, t, 16 dof\)$/);
    expect(b.rows[1][3]).toMatch(/\(90%, normal\)$/);
  });
});

describe('views: derived quantities in the CLI text, Markdown and panel', () => {
  it('the text summary prints the table between queries and expectations', () => {
    const text = runText(withDerived);
    const at = (s: string) => text.indexOf(s);
    expect(at('Derived quantities')).toBeGreaterThan(at('Predictions from cal'));
    expect(at('Derived quantities')).toBeLessThan(at('Expectations'));
    expect(text).toMatch(/\n {2}quantity +value +std\. error +95% interval +unit\n/);
    expect(text).toMatch(/\n {2}lod +0\.0853\d* +0\.00014 +\[0\.085\d*, 0\.085\d*\] +mg\/L\n/);
    expect(text).toContain(`  lod, loq: ${NOTE}`);
    expect(runText(run)).not.toContain('Derived quantities');
  });

  it('the Markdown report has a section with the definitions, a review point for a missing value, and the caution', () => {
    const md = markdownReport(withDerived);
    expect(md).toContain('## Derived quantities');
    expect(md).toContain('As defined in the spec: `lod = 3.3 * cal.rmse / cal.slope`, `loq = 10 * cal.rmse / cal.slope`, `ratio = cal.slope / 0`.');
    expect(md).toMatch(/\| quantity \| value \| std\. error \| 95% interval \| unit \|/);
    expect(md).toContain('- Derived quantity ratio [b2] could not be computed: the value is not a finite number');
    expect(md).toContain('do not replace a validated uncertainty evaluation');
    expect(markdownReport(run)).not.toContain('## Derived quantities');
  });

  it('the results panel lists the table first under "Queries and checks"', () => {
    const m = buildPanelModel(withDerived, { specUri: 'file:///s.lsq', specName: 's.lsq' });
    expect(m.queries[0].heading).toBe('Derived quantities');
    expect(m.queries[0].rows.map((r) => r[0])).toEqual(['lod', 'loq', 'ratio [b2]']);
    expect(m.queries.length).toBe(buildPanelModel(run, { specUri: 'file:///s.lsq', specName: 's.lsq' }).queries.length + 1);
  });
});
