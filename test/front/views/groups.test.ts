/**
 * Per-group fits in the text summary and the Markdown report
 * (engine/front/views/groups.ts, text.ts, markdown.ts), on hand-made line fits.
 */
import { describe, expect, it } from 'vitest';
import type { DerivedResult, ExpectationResult, FitResult } from '../../../engine/result';
import { buildGroupTable } from '../../../engine/groups/table';
import { detailIndices, fitSections, groupRowCells, groupTableHeaders, MAX_DETAIL_GROUPS } from '../../../engine/front/views/groups';
import { derivedBlock, expectationRows } from '../../../engine/front/views/summary';
import { formatEstimate } from '../../../engine/format';
import { runText } from '../../../engine/front/views/text';
import { markdownReport } from '../../../engine/front/views/markdown';
import { lineData, lineFit, runOf } from '../../fixtures/line-fit';

/** `k` calibration batches b00.. of 12 points each (slopes 0.09, 0.091, ...). */
function batches(k: number): FitResult[] {
  return Array.from({ length: k }, (_, i) => lineFit({ ...lineData(12, 200 + i, { b: 0.09 + 0.001 * i }), name: 'cal', group: `b${String(i).padStart(2, '0')}` }));
}

/** Batch `i` failed before solving (a group with one usable row). */
function withFailure(fits: FitResult[], i: number): FitResult[] {
  const out = [...fits];
  out[i] = { ...out[i], stop: { code: 'failed', message: 'fit cal has 1 usable row for 2 free parameters', converged: false } };
  return out;
}

/** Batch `i` fits poorly (R² 0.5, flagged poor_fit). */
function withPoorFit(fits: FitResult[], i: number): FitResult[] {
  const out = [...fits];
  out[i] = { ...out[i], goodness: { ...out[i].goodness, r2: 0.5 } };
  return out;
}

const headings = (text: string) => text.split('\n').filter((l) => l.startsWith('Fit '));

describe('views/groups', () => {
  it('prints one table row per group with estimates and standard errors to one last digit, then the summary and worst groups', () => {
    const fits = withFailure(batches(12), 4);
    const text = runText(runOf(fits));
    const table = buildGroupTable(fits);
    expect(groupTableHeaders(table)).toEqual(['group', 'n', 'intercept', 'se(intercept)', 'slope', 'se(slope)', 'R²', 'flags']);
    for (const f of fits) {
      const line = text.split('\n').find((l) => l.startsWith(`  ${f.group} `))!;
      expect(line, f.group).toBeDefined();
      if (f.stop.code === 'failed') {
        expect(line).toMatch(/n\/a.*failed$/);
        continue;
      }
      const slope = f.parameters[1];
      const fs = formatEstimate(slope.estimate, slope.stderr, null, null);
      expect(line).toContain(` ${fs.estimate} `);
      expect(line).toContain(` ${fs.stderr} `);
    }
    expect(text).toContain('12 groups: 11 converged, 1 failed, 0 not converged; 1 flagged (1 failed).');
    expect(text).toMatch(/Across converged groups\n.*median +Q1 +Q3 +IQR +groups/);
    const slopes = fits.filter((f) => f.stop.converged).map((f) => f.parameters[1].estimate);
    expect(text).toMatch(new RegExp(`\\n {4}slope +\\S+ +\\S+ +\\S+ +\\S+ +${slopes.length}\\n`));
    expect(text).toContain('Worst groups\n    b04: failed - failed: fit cal has 1 usable row for');
  });

  it('with more than 5 groups prints a full block only for flagged groups, worst first', () => {
    const fits = withPoorFit(withFailure(batches(9), 2), 6);
    const text = runText(runOf(fits));
    expect(headings(text)).toEqual(['Fit cal per group: y against x, 9 groups', 'Fit cal [b02]: y against x (linear least squares, squared loss)', 'Fit cal [b06]: y against x (linear least squares, squared loss)']);
    expect(text).toContain('Full results follow for the 2 flagged groups, worst first');
  });

  it('with at most 5 groups prints every group in full after the table', () => {
    const text = runText(runOf(batches(5)));
    expect(headings(text)).toHaveLength(6);
    expect(text).not.toContain('Full results follow');
  });

  it('without flags prints no group in full and says where to find them', () => {
    const text = runText(runOf(batches(8)));
    expect(headings(text)).toEqual(['Fit cal per group: y against x, 8 groups']);
    expect(text).toContain('No group is flagged, so no group is shown in full (every group in full: --json or --groups).');
  });

  it(`caps the full blocks at ${MAX_DETAIL_GROUPS} flagged groups`, () => {
    let fits = batches(30);
    for (let i = 0; i < 14; i++) fits = withPoorFit(fits, i);
    const s = fitSections(runOf(fits))[0];
    if (s.kind !== 'groups') throw new Error('expected a group section');
    expect(detailIndices(s)).toHaveLength(MAX_DETAIL_GROUPS);
    expect(runText(runOf(fits))).toContain(`the ${MAX_DETAIL_GROUPS} worst of the 14 flagged groups`);
  });

  it('keeps single fits and per-group fits apart, in order', () => {
    const single = lineFit({ ...lineData(10, 7), name: 'blank' });
    const sections = fitSections(runOf([single, ...batches(3)]));
    expect(sections.map((s) => s.kind)).toEqual(['single', 'groups']);
    const g = sections[1];
    expect(g.kind === 'groups' && g.indices).toEqual([1, 2, 3]);
  });

  it('collapses an expectation checked on many groups to one line plus the failing groups', () => {
    const fits = batches(8);
    const expectation = { target: { kind: 'statistic', fit: 'cal', name: 'r2' }, bound: { kind: 'above', value: 0.99 }, text: 'cal.r2 above 0.99', range: { start: { line: 9, column: 1, offset: 0 }, end: { line: 9, column: 18, offset: 17 } } } as unknown as ExpectationResult['expectation'];
    const expectations: ExpectationResult[] = fits.map((f, i) => ({ expectation, group: f.group, actual: i === 3 ? 0.5 : 0.999, passed: i !== 3, message: i === 3 ? 'cal.r2 [b03] = 0.5 is not above 0.99' : '' }));
    const rows = expectationRows(runOf(fits, { expectations }));
    expect(rows.map((r) => `${r.verdict} ${r.text}`)).toEqual(['FAIL cal.r2 above 0.99 [1 of 8 groups fail]', 'FAIL cal.r2 above 0.99 [b03]']);
    const allPass = expectations.map((e) => ({ ...e, passed: true }));
    expect(expectationRows(runOf(fits, { expectations: allPass })).map((r) => r.text)).toEqual(['cal.r2 above 0.99 [all 8 groups]']);
  });
});

describe('views/summary derived quantities of a per-group fit', () => {
  it('names a quantity once in a note shared by its many groups', () => {
    const fits = batches(8);
    const derived: DerivedResult[] = fits.map((f, i) => ({
      name: 'sensitivity', group: f.group, expression: 'cal.slope', value: 0.09 + 0.001 * i, stderr: 0.001, lower: 0.088, upper: 0.092 + 0.001 * i,
      level: 0.95, dof: 10, fits: ['cal'], note: i === 5 ? 'another note' : 'by the delta method',
    }));
    const block = derivedBlock(runOf(fits, { derived }))!;
    expect(block.rows).toHaveLength(8);
    expect(block.notes).toEqual(['sensitivity (7 of 8 groups): by the delta method', 'sensitivity [b05]: another note']);
    const same = derived.map((d) => ({ ...d, note: 'by the delta method' }));
    expect(derivedBlock(runOf(fits, { derived: same }))!.notes).toEqual(['sensitivity (all 8 groups): by the delta method']);
  });
});

describe('views/markdown per-group fits', () => {
  it('carries the group table, the summary across groups and one summary row for the fit', () => {
    const fits = withFailure(batches(9), 2);
    const md = markdownReport(runOf(fits));
    const table = buildGroupTable(fits);
    expect(md).toContain('## Fit cal per group: y against x, 9 groups');
    expect(md).toContain(`| ${groupTableHeaders(table).join(' | ')} |`);
    for (const row of table.rows) expect(md).toContain(`| ${groupRowCells(table, row).join(' | ')} |`);
    expect(md).toContain('### Across converged groups');
    expect(md).toContain('| cal (9 groups) | **8 of 9** | 108 | per group |');
    // full sections only for the failed group
    expect(md.match(/^## Fit cal \[/gm)).toEqual(['## Fit cal [']);
    expect(md).toContain('options of cal (every group)');
  });
});
