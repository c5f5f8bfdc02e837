/**
 * Fits that are not a result, marked everywhere: a fit stopped by its
 * iteration limit (last iterate) and one that could not take a step
 * (non-finite residuals at the starting values), against the same fit
 * converged. Checked in the engine result and its JSON (withheld statistics,
 * schema), the CLI text, the Markdown report, the chart specs and the
 * results panel's model. Data invented (a first-order decay).
 */
import Ajv from 'ajv';
import { describe, expect, it } from 'vitest';
import schema from '../../../engine/result.schema.json';
import type { FitResult, RunResult } from '../../../engine/result';
import { resultToJsonValue } from '../../../engine/run/json';
import { fitTextLines } from '../../../engine/front/views/text';
import { markdownReport } from '../../../engine/front/views/markdown';
import { chartSpecs } from '../../../engine/front/views/charts';
import { fitStatus, goodnessEntries } from '../../../engine/front/views/summary';
import { buildPanelModel } from '../../../extension/logic/panel-model';
import { runSpec, tempDir, writeCsv } from '../../run/helpers';

const validate = new Ajv().compile(schema);

const dir = tempDir();
const xs = Array.from({ length: 15 }, (_, i) => 1 + i * 40);
// decay with noise from a fixed sine hash (common practice for reproducible tests)
writeCsv(dir, 'decay.csv', ['t', 'y'], xs.map((t, i) => [t, (40 * Math.exp(-0.004 * t) + 3 + 0.4 * Math.sin(12.9898 * i)).toFixed(4)]));

const spec = (extra: string, model = 'a * exp(-k * t) + c') => `data d = "decay.csv"
fit decay on d {
  model y = ${model}
  param a = 10
  param k = 1 in [0, inf]
  param c = 0
  ${extra}
}
`;

async function fitOf(text: string): Promise<{ run: RunResult; fit: FitResult }> {
  const { result } = await runSpec(text, dir);
  return { run: result, fit: result.fits[0] };
}

describe('views: fits that are not a result', async () => {
  const good = await fitOf(spec(''));
  const stopped = await fitOf(spec('iterations 2'));
  // ln(t − 700) is not finite for the first rows at the start: no step can be taken
  const none = await fitOf(spec('', 'a * exp(-k * t) + c + ln(t - 700)'));

  it('the three fits have the statuses the test needs', () => {
    expect(fitStatus(good.fit)).toBe('fitted');
    expect(stopped.fit.stop.code).toBe('max_iterations');
    expect(fitStatus(stopped.fit)).toBe('last_iterate');
    expect(none.fit.stop.code).toBe('non_finite');
    expect(fitStatus(none.fit)).toBe('not_fitted');
  });

  it('engine: statistics of a non-converged fit are withheld, the SSR at the last iterate kept; JSON validates', () => {
    const g = stopped.fit.goodness;
    expect(Number.isFinite(g.ssr)).toBe(true);
    for (const v of [g.r2, g.adjR2, g.rmse, g.aic, g.aicc, g.bic, g.condition]) expect(Number.isNaN(v)).toBe(true);
    expect(stopped.fit.parameters.every((p) => p.stderr === null || Number.isNaN(p.stderr))).toBe(true);
    expect(stopped.fit.bands).toBeNull();
    expect(stopped.fit.residuals).toEqual({ durbinWatson: null, runs: null, shapiroWilk: null });
    // only warnings about the input and the stop
    expect(stopped.fit.warnings.map((w) => w.code).filter((c) => !['no_convergence', 'at_bound', 'guessed_start', 'rows_dropped', 'few_dof'].includes(c))).toEqual([]);
    const json = resultToJsonValue<{ fits: { goodness: Record<string, unknown> }[] }>(stopped.run);
    expect(json.fits[0].goodness.r2).toBeNull();
    for (const r of [good.run, stopped.run, none.run]) expect(validate(resultToJsonValue(r)), JSON.stringify(validate.errors)).toBe(true);
  });

  it('engine: a non-finite start names the data lines and the parameter values', () => {
    const stop = none.fit.stop;
    expect(stop.converged).toBe(false);
    expect(stop.nonFinite?.what).toBe('residuals');
    // t − 700 ≤ 0 for t = 1 … 681: rows 1–18 of the file are lines 2–19; the first five are named
    expect(stop.nonFinite?.lines).toEqual([2, 3, 4, 5, 6]);
    expect(stop.nonFinite?.rows).toBe(15);
    expect(stop.nonFinite?.at).toEqual({ a: 10, k: 1, c: 0 });
    expect(stop.message).toMatch(/not finite at data lines 2, 3, 4, 5, 6 and 10 more with a = 10, k = 1, c = 0/);
  });

  it('text: a marked stop, parameters noted, goodness of fit withheld', () => {
    const text = fitTextLines(stopped.fit).join('\n');
    expect(text).toContain('Stopped: NOT converged (max_iterations');
    expect(text).toContain('! Not a fitted result');
    expect(text).toContain('last iterate, not fitted');
    expect(text).toMatch(/SSR at the last iterate\s+\d/);
    expect(text).toMatch(/R², RMSE, AIC and the rest\s+withheld/);
    expect(text).not.toMatch(/^\s+R²\s/m);
    expect(text).not.toContain('AICc');
    const start = fitTextLines(none.fit).join('\n');
    expect(start).toContain('! Nothing was fitted: the values shown are the starting values');
    expect(start).toContain('starting value, not fitted');
    expect(start).not.toContain('SSR at the last iterate');
    // the converged fit is untouched
    const ok = fitTextLines(good.fit).join('\n');
    expect(ok).not.toContain('Not a fitted result');
    expect(goodnessEntries(good.fit).map((e) => e.label)).toContain('R²');
  });

  it('Markdown: the report marks the fit and leaves out the confidence sentence', () => {
    const md = markdownReport(stopped.run);
    expect(md).toContain('> **Not a fitted result');
    expect(md).not.toContain('intervals use Student');
    expect(md).toMatch(/did not converge \(max_iterations/);
    expect(markdownReport(good.run)).toContain('intervals use Student');
  });

  it('charts: no curve for a fit that is not a result, titles say so, and the axes are those of the fitted chart', () => {
    const ids = (f: FitResult) => chartSpecs(f).map((c) => c.id);
    expect(ids(good.fit)).toEqual(['fit', 'residuals-predictor', 'residuals-fitted', 'normal-qq', 'histogram']);
    expect(ids(stopped.fit)).toEqual(['fit', 'residuals-predictor', 'residuals-fitted']);
    expect(ids(none.fit)).toEqual(['fit']);
    const main = (f: FitResult) => chartSpecs(f)[0];
    for (const f of [stopped.fit, none.fit]) {
      const c = main(f);
      expect(c.title).toContain('data (not fitted)');
      const layers = (c.spec as unknown as { layer: { name?: string }[] }).layer.map((l) => l.name);
      expect(layers).toEqual(['data_points']);
      expect(JSON.stringify(c.spec)).toContain('No curve: the fit did not converge');
    }
    expect(chartSpecs(stopped.fit)[1].title).toContain('at the last iterate (not a fitted result)');
    // same x axis type with and without a fitted curve
    const xScale = (f: FitResult) => JSON.stringify((main(f).spec as unknown as { layer: { encoding: { x: { scale: unknown } } }[] }).layer.at(-1)!.encoding.x.scale);
    expect(xScale(stopped.fit)).toBe(xScale(good.fit));
    expect(xScale(none.fit)).toBe(xScale(good.fit));
  });

  it('panel: a banner, no goodness-of-fit figures among the headline numbers', () => {
    const m = buildPanelModel(stopped.run, { specUri: 'file:///x.lsq', specName: 'x.lsq' });
    const f = m.fits[0];
    expect(f.converged).toBe(false);
    expect(f.notFitted).toMatch(/^Not a fitted result/);
    expect(f.keyStats.map((k) => k.label)).toEqual(['n', 'dof', 'fit']);
    expect(f.keyStats[2].value).toBe('not fitted');
    expect(f.charts?.map((c) => c.id)).toEqual(['fit', 'residuals-predictor', 'residuals-fitted']);
    const ok = buildPanelModel(good.run, { specUri: 'file:///x.lsq', specName: 'x.lsq' }).fits[0];
    expect(ok.notFitted).toBeNull();
    expect(ok.keyStats.map((k) => k.label)).toEqual(['n', 'dof', 'RMSE', 'R²', 'AICc']);
  });
});
