import { describe, expect, it } from 'vitest';
import { hoverAt } from '../../extension/logic/hover';
import { formatEstimate, formatNumber } from '../../engine/format';
import { FUNCTION_SPECS, STATISTICS } from '../../parser/registry';
import { analysisOf, COOLING, fitNamed, runWith } from './helpers';

const offsetOf = (needle: string, from = 0) => COOLING.indexOf(needle, from) + 1;

describe('extension/logic/hover', () => {
  it('documents a function from the parser docs', () => {
    const h = hoverAt(analysisOf(COOLING), offsetOf('exp('));
    expect(h?.markdown).toContain(FUNCTION_SPECS.exp.signature);
    expect(h?.markdown).toContain(FUNCTION_SPECS.exp.doc);
    expect(COOLING.slice(h!.span.start, h!.span.end)).toBe('exp');
  });

  it('shows a parameter declaration before any fit', () => {
    const h = hoverAt(analysisOf(COOLING), offsetOf('tau)'));
    expect(h?.markdown).toContain('parameter of fit `newton`');
    expect(h?.markdown).toContain('bounds [0.1, 1000]');
    expect(h?.markdown).not.toContain('estimate');
  });

  it('shows estimate ± standard error and the interval after a fit', () => {
    const fit = fitNamed('newton', ['rise', 'tau']);
    const tau = fit.parameters[1];
    const h = hoverAt(analysisOf(COOLING), offsetOf('tau)'), runWith([fit]));
    const f = formatEstimate(tau.estimate, tau.stderr, tau.lower, tau.upper);
    expect(h?.markdown).toContain(`${f.estimate} ± ${f.stderr}`);
    expect(h?.markdown).toContain(`[${f.lower}, ${f.upper}]`);
    expect(h?.markdown).toContain('95% interval');
  });

  it('shows the same estimate when hovering the name in an expect statement', () => {
    const fit = fitNamed('newton', ['rise', 'tau']);
    const h = hoverAt(analysisOf(COOLING), COOLING.indexOf('newton.tau') + 'newton.'.length + 1, runWith([fit]));
    const p = fit.parameters[1];
    const f = formatEstimate(p.estimate, p.stderr, p.lower, p.upper);
    expect(h?.markdown).toContain(`${f.estimate} ± ${f.stderr}`);
  });

  it('lists every group of a per-group fit', () => {
    const fits = ['north', 'south'].map((g, i) => fitNamed('newton', ['rise', 'tau'], { group: g, seed: 10 + i }));
    const h = hoverAt(analysisOf(COOLING), offsetOf('rise *'), runWith(fits));
    expect(h?.markdown).toContain('| north |');
    expect(h?.markdown).toContain('| south |');
    const p = fits[1].parameters[0];
    const f = formatEstimate(p.estimate, p.stderr, p.lower, p.upper);
    expect(h?.markdown).toContain(`${f.estimate} ± ${f.stderr}`);
  });

  it('shows constants, data sources with their columns, and columns', () => {
    const a = analysisOf(COOLING);
    expect(hoverAt(a, offsetOf('ambient +'))?.markdown).toContain('21.5');
    const data = hoverAt(a, offsetOf('bench {'))?.markdown;
    expect(data).toContain('cooling.csv');
    expect(data).toContain('`temp_sd`');
    expect(hoverAt(a, offsetOf('temp_sd'))?.markdown).toContain('column of `bench`');
  });

  it('does not call a misspelt name a column: it is unknown, with the real column to mean', () => {
    const text = COOLING.replace('exp(-time_min', 'exp(-time_mn');
    const h = hoverAt(analysisOf(text), text.indexOf('time_mn') + 1)?.markdown ?? '';
    expect(h).toContain('unknown name');
    expect(h).not.toContain('column of `bench`');
    expect(h).toContain('`time_min`');
    // the real column, on the predict line, is still a column
    expect(hoverAt(analysisOf(text), text.indexOf('at time_min') + 4)?.markdown ?? '').toMatch(/^\*\*time_min\*\* — column of `bench`/);
  });

  it('says a name is read as a column, unchecked, when the header was not read', () => {
    const h = hoverAt(analysisOf(COOLING, 'unknown'), offsetOf('temp_sd'))?.markdown ?? '';
    expect(h).toContain('read as a column of `bench`');
    expect(h).toContain('not checked');
  });

  it('gives a statistic value in expect after a fit', () => {
    const fit = fitNamed('newton', ['rise', 'tau']);
    const h = hoverAt(analysisOf(COOLING), COOLING.indexOf('newton.r2') + 'newton.'.length + 1, runWith([fit]));
    expect(h?.markdown).toContain('**r2** of `newton`');
    expect(h?.markdown).toContain(`= ${formatNumber(fit.goodness.r2)}`); // the digits of the CLI (engine/format.ts DIGITS.value)
  });

  it('gives the value of every statistic the registry names, each from its own field', () => {
    // distinct values per field, so a getter reading the wrong field shows the wrong number
    const fit = fitNamed('newton', ['rise', 'tau']);
    Object.assign(fit.goodness, { r2: 0.101, adjR2: 0.202, rmse: 0.303, ssr: 0.404, chi2: 0.505, chi2Reduced: 0.606, aic: 0.707, aicc: 0.808, bic: 0.909, n: 17, dof: 15 });
    fit.iterations = 13;
    const expected: Record<string, string> = {
      r2: '0.101', adj_r2: '0.202', rmse: '0.303', ssr: '0.404', chi2: '0.505', chi2_reduced: '0.606',
      aic: '0.707', aicc: '0.808', bic: '0.909', n: '17', dof: '15', iterations: '13',
    };
    expect(Object.keys(expected).sort()).toEqual([...STATISTICS].sort());
    for (const stat of STATISTICS) {
      const spec = `${COOLING}expect newton.${stat} above 0\n`;
      const h = hoverAt(analysisOf(spec), spec.lastIndexOf(`newton.${stat}`) + 'newton.'.length + 1, runWith([fit]));
      expect(h?.markdown, stat).toContain(`**${stat}** of \`newton\` = ${expected[stat]}`);
    }
  });

  it('returns null on blanks and numbers', () => {
    const a = analysisOf(COOLING);
    expect(hoverAt(a, COOLING.indexOf('21.5') + 1)).toBeNull();
  });

  it('explains FIT.NAME in a derive line and shows a derived quantity with its value after a fit', () => {
    const spec = `${COOLING}derive half_life = ln(2) * newton.tau [min]\nexpect half_life below 10\n`;
    const a = analysisOf(spec);
    const fit = fitNamed('newton', ['rise', 'tau']);
    const onTau = hoverAt(a, spec.indexOf('newton.tau [min]') + 'newton.'.length + 1, runWith([fit]));
    const tau = fit.parameters[1];
    const f = formatEstimate(tau.estimate, tau.stderr, tau.lower, tau.upper);
    expect(onTau?.markdown).toContain(`${f.estimate} ± ${f.stderr}`);
    const before = hoverAt(a, spec.indexOf('expect half_life') + 'expect '.length + 1);
    expect(before?.markdown).toContain('**half_life** — derived quantity [min]');
    expect(before?.markdown).toContain('`half_life = ln(2) * newton.tau`');
    const d = { name: 'half_life', expression: 'ln(2) * newton.tau', value: 8.31777, stderr: 0.0303612, lower: 8.25567, upper: 8.37987, level: 0.95, dof: 23, unit: 'min', fits: ['newton'], note: 'standard error by the delta method.' };
    const after = hoverAt(a, spec.indexOf('expect half_life') + 'expect '.length + 1, runWith([fit], { derived: [d] }));
    const g = formatEstimate(d.value, d.stderr, d.lower, d.upper);
    expect(after?.markdown).toContain(`**${g.estimate} ± ${g.stderr}** min, 95% interval [${g.lower}, ${g.upper}]`);
    expect(after?.markdown).toContain('_standard error by the delta method._');
  });
});

