/**
 * Every declared fit in the results panel's model with its state, warnings
 * counted as the Problems panel counts them, and comparisons that leave out
 * a fit saying so. Run through the real engine on the invented scenario of
 * test/extension/panel-scenario.ts.
 */
import { describe, expect, it } from 'vitest';
import { fitDiagnostics } from '../../extension/logic/diagnostics';
import { missingFits, NOT_RUN_REASON, fitState } from '../../extension/logic/panel-states';
import { warningFindings, groupsPhrase, flagSummary } from '../../extension/logic/panel-warnings';
import { buildPanelModel } from '../../extension/logic/panel-model';
import { analysisOf } from './helpers';
import { runScenario, SCENARIO_SPEC } from './panel-scenario';

describe('extension/logic/panel-states', async () => {
  const s = await runScenario();

  it('lists every declared fit in declaration order, the one that failed at run time with its reason', () => {
    expect(s.model.fits.map((f) => [f.key, f.state, f.hasResult])).toEqual([
      ['newton', 'converged', true],
      ['line', 'converged', true],
      ['quad', 'converged', true],
      ['slow', 'not_converged', true],
      ['empty', 'failed', false],
    ]);
    const empty = s.model.fits.find((f) => f.key === 'empty')!;
    expect(empty.reasons).toEqual([expect.stringMatching(/^fit empty: the where condition of the data statement leaves none of the 30 usable rows/)]);
    expect(empty.parameterRows).toEqual([]);
    expect(empty.keyStats).toEqual([]);
    expect(s.model.fits.find((f) => f.key === 'slow')!.reasons).toEqual(['reached the iteration limit 2']);
  });

  it('counts the states in the headline: 3 of 5 converged, not "3/3"', () => {
    expect(s.model.headline).toMatchObject({ fits: 5, converged: 3, notConverged: 1, failed: 1, notRun: 0 });
  });

  it('withholds the statistics of the fit that did not converge', () => {
    const slow = s.model.fits.find((f) => f.key === 'slow')!;
    expect(slow.keyStats.map((k) => k.label)).toEqual(['n', 'left out', 'dof', 'fit']);
    expect(slow.notFitted).toMatch(/^Not a fitted result/);
    expect(slow.goodness.map((e) => e.label)).not.toContain('R²');
  });

  it('compares the fits that converged and names the one left out, with the reason (engine result and panel)', () => {
    const cmp = s.run.queries.find((q) => q.kind === 'compare');
    if (cmp?.kind !== 'compare') throw new Error('no comparison');
    expect(cmp.rows.map((r) => r.fit)).toEqual(['line', 'quad']);
    expect(cmp.excluded?.map((e) => [e.fit, e.code])).toEqual([['slow', 'max_iterations']]);
    expect(cmp.fTest).toBeDefined();
    const block = s.model.queries.find((q) => q.heading.startsWith('Which model'))!;
    expect((block.lead ?? []).join(' ')).toMatch(/Left out of the ranking: slow/);
    expect(block.notes.some((n) => n.startsWith('slow left out: the fit did not converge (max_iterations'))).toBe(true);
    expect(block.headers).toEqual(['evidence', 'line', 'quad']);
  });

  it('finds fits named by errors even without the declared list, and marks declared fits the run did not ask for', () => {
    expect(missingFits(s.run).map((m) => [m.name, m.state])).toEqual([['empty', 'failed']]);
    const one = { ...s.run, fits: s.run.fits.filter((f) => f.name === 'line'), errors: [] };
    const m = missingFits(one, s.declared);
    expect(m.map((x) => [x.name, x.state])).toEqual([['newton', 'not_run'], ['quad', 'not_run'], ['slow', 'not_run'], ['empty', 'not_run']]);
    expect(m[0].reasons).toEqual([NOT_RUN_REASON]);
    const model = buildPanelModel(one, { specUri: 'file:///x.lsq', specName: 'x.lsq', declaredFits: s.declared });
    expect(model.fits.map((f) => f.key)).toEqual(s.declared);
    expect(model.headline).toMatchObject({ fits: 5, converged: 1, notRun: 4 });
  });

  it('calls a fit that never took a step failed, one stopped at its iteration limit not converged', () => {
    const slow = s.run.fits.find((f) => f.name === 'slow')!;
    expect(fitState(slow)).toBe('not_converged');
    expect(fitState({ ...slow, iterations: 0, stop: { ...slow.stop, code: 'non_finite' } })).toBe('failed');
  });
});

describe('extension/logic/panel-warnings', async () => {
  const s = await runScenario();

  it('counts warnings as the Problems panel does, for the same run', () => {
    const analysis = analysisOf(SCENARIO_SPEC, 'found', ['time_min', 'temp_C', 'temp_sd', 'w']);
    const problems = fitDiagnostics(analysis, s.run).filter((d) => d.code !== 'fit.expectation_failed' && !s.run.errors.some((e) => `fit.${e.code}` === d.code));
    expect(s.model.findings.length).toBe(problems.length);
    expect(s.model.headline.warnings).toBe(problems.length);
    expect(s.model.findings.length).toBeGreaterThan(3);
  });

  it('merges a warning of many groups into one finding naming them', () => {
    const newton = s.run.fits.find((f) => f.name === 'line')!;
    const groups = ['A1', 'A2', 'A3', 'B1', 'B2', 'B3', 'C1'].map((g) => ({ ...newton, group: g }));
    const findings = warningFindings(groups);
    const codes = newton.warnings.filter((w) => w.code !== 'r2_nonlinear').map((w) => w.code);
    expect(findings.map((f) => f.code)).toEqual(codes.filter((c, i) => codes.indexOf(c) === i || c !== 'rows_dropped'));
    expect(groupsPhrase(findings[0].groups!)).toBe('in 7 of 7 groups: A1, A2, A3, B1, B2, …');
    expect(findings[0].keys).toEqual(groups.map((g) => `line/${g.group}`));
  });

  it('sums up the group table flags in one sentence', () => {
    expect(flagSummary([{ flags: [] }, { flags: ['poor_fit'] }, { flags: ['poor_fit', 'at_bound'] }])).toMatch(/^2 of 3 groups flagged in the group table \(poor fit 2, at bound 1\)/);
    expect(flagSummary([{ flags: [] }])).toBe('No group of 1 is flagged in the group table.');
  });
});

describe('extension/logic/panel-chart-options', async () => {
  const { withResidualKind, withXScale, xScaleOf, canLogX, RESIDUAL_KINDS, defaultResidualKind } = await import('../../extension/logic/panel-chart-options');
  const s = await runScenario();
  const newton = s.model.fits.find((f) => f.key === 'newton')!;
  const line = s.model.fits.find((f) => f.key === 'line')!;
  const slow = s.model.fits.find((f) => f.key === 'slow')!;

  it('starts a weighted fit on standardized residuals, an unweighted one on raw; a fit that did not converge offers no standardized ones', () => {
    expect(newton.residualDefault).toBe('standardized');
    expect(line.residualDefault).toBe('raw');
    expect(slow.residualKinds).toEqual(['raw', 'percent']);
    expect(defaultResidualKind({ weighted: true, converged: false })).toBe('raw');
    expect(RESIDUAL_KINDS).toEqual(['raw', 'standardized', 'percent']);
  });

  it('plots the chosen kind: percent is 100·residual/fitted of each point', () => {
    const chart = line.charts!.find((c) => c.id === 'residuals-fitted')!;
    const pts = (chart.spec.layer as { name?: string; data: { values: { residual: number; fitted: number; percent: number | null }[] } }[]).find((l) => l.name === 'data_points')!.data.values;
    for (const p of pts) expect(p.percent).toBeCloseTo((100 * p.residual) / p.fitted, 12);
    const pct = withResidualKind(chart.spec, 'percent');
    const y = (pct.layer as { name?: string; encoding: { y: { field: string; axis: { title: string } } } }[]).find((l) => l.name === 'data_points')!.encoding.y;
    expect(y).toMatchObject({ field: 'percent', axis: { title: 'residual, % of the fitted value' } });
    // the model's own spec is unchanged
    expect(JSON.stringify(chart.spec)).not.toContain('"field":"percent","type":"quantitative","axis"');
  });

  it('switches the x axis between linear and logarithmic, log only where every x is positive', () => {
    const fit = line.charts!.find((c) => c.id === 'fit')!;
    expect(xScaleOf(fit.spec)).toBe('linear');
    expect(canLogX(fit.spec)).toBe(false); // the readings start at t = 0
    const shifted = structuredClone(fit.spec);
    for (const l of shifted.layer as { data?: { values?: { x?: number }[] } }[]) for (const v of l.data?.values ?? []) if (typeof v.x === 'number') v.x += 1;
    expect(canLogX(shifted)).toBe(true);
    const log = withXScale(shifted, 'log');
    expect(xScaleOf(log)).toBe('log');
    expect(xScaleOf(withXScale(log, 'linear'))).toBe('linear');
  });
});

describe('extension/logic/panel-copy', async () => {
  const { toTsv, chartImageName } = await import('../../extension/logic/panel-copy');
  it('writes a table as TSV, one line per row, a tab or line break inside a cell as a space', () => {
    expect(toTsv(['a', 'b'], [['1', 'x\ty'], ['2', 'two\nlines']])).toBe('a\tb\n1\tx y\n2\ttwo lines\n');
  });
  it('names a chart file after its title', () => {
    expect(chartImageName('newton: data and fitted curve', 'png')).toBe('newton-data-and-fitted-curve.png');
    expect(chartImageName('µ/€', 'svg')).toBe('chart.svg');
  });
});

describe('extension/logic/panel-align', async () => {
  const { decimalPadding, fractionDigits, paddingText } = await import('../../extension/logic/panel-align');
  it('pads each cell of a column so the decimal points line up', () => {
    const col = ['0.9747', '0.400749', '12', 'n/a', '< 0.0001', '1.1e-42'];
    expect(col.map(fractionDigits)).toEqual([4, 6, 0, null, null, null]);
    expect(decimalPadding(col)).toEqual([
      { digits: 2, point: false }, { digits: 0, point: false }, { digits: 6, point: true },
      { digits: 0, point: false }, { digits: 0, point: false }, { digits: 0, point: false },
    ]);
    // monospaced: the cell plus its padding has the same width right of the point in every plain cell
    const widths = col.slice(0, 3).map((c, i) => (c + paddingText(decimalPadding(col)[i])).length - (c.includes('.') ? c.indexOf('.') : c.length));
    expect(new Set(widths).size).toBe(1);
    expect(decimalPadding(['1', '2'])).toEqual([{ digits: 0, point: false }, { digits: 0, point: false }]);
  });
});

describe('extension/logic/panel-checks', async () => {
  const { readFileSync } = await import('node:fs');
  const { join } = await import('node:path');
  const spec = readFileSync(join(__dirname, '..', '..', 'samples', 'plate', 'plate.lsq'), 'utf8');
  const { analyze } = await import('../../parser/index');
  const { headerLookup } = await import('../../engine/data/header');
  const { runPlan } = await import('../../engine/runner/run-plan');
  const dir = join(__dirname, '..', '..', 'samples', 'plate');
  const { plan } = analyze(spec, { headers: headerLookup(dir) });
  const run = await runPlan(plan, { baseDir: dir, specText: spec, threads: 1 });
  const m = buildPanelModel(run, { specUri: 'file:///plate.lsq', specName: 'plate.lsq', declaredFits: ['kinetics'] });

  it('summarises the per-group expectations: each once, passed and failed counts adding up to the checks, failures listed', () => {
    const gc = m.groupChecks!;
    expect(gc.expectations.map((e) => e.text)).toEqual(plan.expectations.map((e) => e.text));
    const groups = run.fits.length;
    for (const e of gc.expectations) {
      expect(e.passed + e.failed).toBe(groups);
      expect(e.failures).toHaveLength(e.failed);
      for (const f of e.failures) expect(run.fits.some((x) => x.group === f.group)).toBe(true);
    }
    expect(gc.expectations.reduce((s, e) => s + e.failed, 0)).toBe(run.expectations.filter((e) => !e.passed).length);
  });

  it('tabulates the derived quantity per group: one row per well, value and standard error', () => {
    const t = m.groupChecks!.derived!;
    expect(t.headers).toEqual(['group', 'initial_rate [AU/min]', 'initial_rate std. error']);
    expect(t.rows).toHaveLength(run.fits.length);
    const a1 = run.derived!.find((d) => d.group === t.rows[0][0])!;
    expect(Number(t.rows[0][1])).toBeCloseTo(a1.value!, 2);
  });
});

describe('extension/logic/panel-fit-chart', async () => {
  const s = await runScenario();
  it('says "legend" once in place of the shade sentence, and keeps the other sentences', () => {
    const fit = s.model.fits.find((f) => f.key === 'newton')!.charts!.find((c) => c.id === 'fit')!;
    const sub = ((fit.spec.title as { subtitle: string[] }).subtitle).join(' ');
    expect(sub).not.toMatch(/shade/);
    expect(sub.match(/Legend below the plot/g)).toHaveLength(1);
    expect(sub).toContain('Hollow points: 2 rows left out of the fit (weight 0).');
  });
});
