import { describe, expect, it } from 'vitest';
import { specDiagnostics } from '../../extension/logic/diagnostics';
import { analysisOf, COOLING, fitNamed, lineContaining, lineOf, runWith } from './helpers';

describe('extension/logic/diagnostics', () => {
  it('reports a syntax error on the line where it is', () => {
    const text = COOLING.replace('model temp_C = ambient + rise * exp(-time_min / tau)', 'model temp_C = ambient + rise * ');
    const ds = specDiagnostics(analysisOf(text)).filter((d) => d.severity === 'error');
    expect(ds.length).toBeGreaterThan(0);
    expect(ds[0].source).toBe('syntax');
    // the error is at or just after the broken model line, never above it
    expect(lineOf(text, ds[0].start)).toBeGreaterThanOrEqual(lineContaining(text, 'model temp_C'));
  });

  it('flags an unknown column against the CSV header, with the close name as a suggestion', () => {
    const text = COOLING.replace('sigma temp_sd', 'sigma temp_sdd');
    const ds = specDiagnostics(analysisOf(text));
    const unknown = ds.find((d) => d.suggestions?.includes('temp_sd'));
    expect(unknown, JSON.stringify(ds)).toBeDefined();
    expect(unknown!.severity).toBe('error');
    expect(text.slice(unknown!.start, unknown!.end)).toBe('temp_sdd');
  });

  it('takes unknown names as columns when the header could not be read', () => {
    const text = COOLING.replace('sigma temp_sd', 'sigma temp_sdd');
    const ds = specDiagnostics(analysisOf(text, 'unknown'));
    expect(ds.filter((d) => d.severity === 'error')).toEqual([]);
  });

  it('puts "file not found" on the quoted path of the data statement', () => {
    const ds = specDiagnostics(analysisOf(COOLING, 'missing'));
    const nf = ds.find((d) => d.code === 'data.file_not_found');
    expect(nf).toBeDefined();
    expect(COOLING.slice(nf!.start, nf!.end)).toBe('"cooling.csv"');
    expect(nf!.severity).toBe('error');
  });

  it('places a parameter-at-bound warning on that parameter\'s param line', () => {
    const fit = fitNamed('newton', ['rise', 'tau']);
    fit.warnings.push({ code: 'at_bound', message: 'tau is at its upper bound 1000', parameters: ['tau'] });
    const ds = specDiagnostics(analysisOf(COOLING), runWith([fit]));
    const d = ds.find((x) => x.code === 'fit.at_bound');
    expect(d).toBeDefined();
    expect(lineOf(COOLING, d!.start)).toBe(lineContaining(COOLING, 'param tau'));
    expect(d!.message).toContain('tau is at its upper bound 1000');
  });

  it('derives an at-bound diagnostic from the parameter result when no warning names it', () => {
    const fit = fitNamed('newton', ['rise', 'tau']);
    fit.parameters[0].atBound = 'lower';
    const d = specDiagnostics(analysisOf(COOLING), runWith([fit])).find((x) => x.code === 'fit.at_bound');
    expect(d).toBeDefined();
    expect(lineOf(COOLING, d!.start)).toBe(lineContaining(COOLING, 'param rise'));
    expect(d!.message).toContain('lower');
  });

  it('follows the declaration when lines were inserted after the fit', () => {
    const fit = fitNamed('newton', ['rise', 'tau']);
    fit.warnings.push({ code: 'at_bound', message: 'tau at bound', parameters: ['tau'] });
    const edited = COOLING.replace('fit newton on bench {', '# note\n# another note\nfit newton on bench {');
    const d = specDiagnostics(analysisOf(edited), runWith([fit])).find((x) => x.code === 'fit.at_bound');
    expect(lineOf(edited, d!.start)).toBe(lineContaining(edited, 'param tau'));
  });

  it('puts "did not converge" on the fit line and high correlation on both parameter lines', () => {
    const fit = fitNamed('newton', ['rise', 'tau']);
    fit.stop = { code: 'max_iterations', message: '200 iterations reached', converged: false };
    fit.warnings.push({ code: 'high_correlation', message: 'rise and tau are correlated (r = 0.991)', parameters: ['rise', 'tau'] });
    const ds = specDiagnostics(analysisOf(COOLING), runWith([fit]));
    const stop = ds.find((x) => x.code === 'fit.stop.max_iterations');
    expect(stop).toBeDefined();
    expect(lineOf(COOLING, stop!.start)).toBe(lineContaining(COOLING, 'fit newton'));
    expect(COOLING.slice(stop!.start, stop!.end)).not.toContain('\n');
    const corr = ds.filter((x) => x.code === 'fit.high_correlation').map((x) => lineOf(COOLING, x.start));
    expect(corr.sort()).toEqual([lineContaining(COOLING, 'param rise'), lineContaining(COOLING, 'param tau')].sort());
  });

  it('puts residual warnings on the model line', () => {
    const fit = fitNamed('newton', ['rise', 'tau']);
    fit.warnings.push({ code: 'residual_pattern', message: 'residuals run in long stretches (runs test p = 0.001)' });
    const d = specDiagnostics(analysisOf(COOLING), runWith([fit])).find((x) => x.code === 'fit.residual_pattern');
    expect(lineOf(COOLING, d!.start)).toBe(lineContaining(COOLING, 'model temp_C'));
  });

  it('puts a failed expectation on its expect line and leaves passed ones alone', () => {
    const fit = fitNamed('newton', ['rise', 'tau']);
    const a = analysisOf(COOLING);
    const [tauExp, r2Exp] = a.plan.expectations;
    const run = runWith([fit], {
      expectations: [
        { expectation: tauExp, actual: 13.1, passed: false, message: '13.1 is not within 11.5 .. 12.5' },
        { expectation: r2Exp, actual: 0.995, passed: true, message: 'ok' },
      ],
    });
    const ds = specDiagnostics(a, run).filter((x) => x.code === 'fit.expectation_failed');
    expect(ds).toHaveLength(1);
    expect(lineOf(COOLING, ds[0].start)).toBe(lineContaining(COOLING, 'expect newton.tau'));
    expect(ds[0].message).toContain('13.1 is not within');
  });

  it('merges one finding over the groups of a per-group fit', () => {
    const warn = { code: 'at_bound' as const, message: 'tau at bound', parameters: ['tau'] };
    const fits = ['A', 'B', 'C'].map((g, i) => fitNamed('newton', ['rise', 'tau'], { group: g, seed: i + 1 }));
    fits[0].warnings.push(warn);
    fits[2].warnings.push(warn);
    const ds = specDiagnostics(analysisOf(COOLING), runWith(fits)).filter((x) => x.code === 'fit.at_bound');
    expect(ds).toHaveLength(1);
    expect(ds[0].message).toContain('2 of 3 groups');
    expect(ds[0].message).toContain('A, C');
  });

  it('reports run errors at their range and sorts everything by position', () => {
    const a = analysisOf(COOLING);
    const dataRange = a.plan.data[0].range;
    const run = runWith([], { errors: [{ code: 'non_numeric_cell', message: 'cell is not a number', range: dataRange, file: 'cooling.csv', row: 7, column: 'temp_C' }] });
    const ds = specDiagnostics(a, run);
    const e = ds.find((x) => x.code === 'fit.non_numeric_cell');
    expect(e!.start).toBe(dataRange.start.offset);
    expect(e!.message).toContain('line 7');
    for (let i = 1; i < ds.length; i++) expect(ds[i].start).toBeGreaterThanOrEqual(ds[i - 1].start);
  });
});
