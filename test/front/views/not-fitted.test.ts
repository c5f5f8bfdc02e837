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
import { fitTextLines, runText } from '../../../engine/front/views/text';
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

  describe('queries, derived quantities and expectations that read it', async () => {
    const queries = `predict decay at t = 100, 300
invert decay at y = 20
compare decay, other
derive life = ln(2) / decay.k
expect decay.k within 0 .. 1
expect decay.n above 3
expect life above 0
`;
    const other = 'fit other on d {\n  model y = a * exp(-k * t)\n  param a = 40\n  param k = 0.004 in [0, inf]\n}\n';
    const bad = (await runSpec(spec('iterations 2') + other + queries, dir)).result;
    const ok = (await runSpec(spec('') + other + queries, dir)).result;

    it('engine: predictions and inverse predictions are withheld, listed with null numbers; the comparison too; JSON validates', () => {
      const [pr, inv, cmp] = bad.queries;
      expect(pr).toMatchObject({ kind: 'predict', withheld: expect.stringMatching(/^Withheld: fit decay did not converge \(max_iterations\)/) });
      if (pr.kind !== 'predict' || inv.kind !== 'invert' || cmp.kind !== 'compare') throw new Error('query kinds');
      expect(pr.predictions.map((p) => p.x)).toEqual([100, 300]);
      for (const p of pr.predictions) expect([p.fitted, ...p.confidence, ...p.prediction].every(Number.isNaN)).toBe(true);
      expect(inv.withheld).toMatch(/inverse predictions/);
      expect(inv.inversions).toEqual([{ response: 20, x: null, interval: [null, null] }]);
      // the comparison leaves the fit out of its ranking, marked with its stop and why (issue: it used to be ranked, then withheld whole)
      expect(cmp.rows.map((r) => r.fit)).toEqual(['other']);
      expect(cmp.excluded).toEqual([{ fit: 'decay', code: 'max_iterations', reason: expect.stringMatching(/^the fit did not converge \(max_iterations: /) }]);
      expect(cmp.fTest).toBeUndefined();
      expect(validate(resultToJsonValue(bad)), JSON.stringify(validate.errors)).toBe(true);
      // the converged fit answers as before
      const [p2, i2, c2] = ok.queries;
      if (p2.kind !== 'predict' || i2.kind !== 'invert' || c2.kind !== 'compare') throw new Error('query kinds');
      expect(p2.withheld).toBeUndefined();
      expect(p2.predictions.every((p) => Number.isFinite(p.fitted) && p.confidence.every(Number.isFinite))).toBe(true);
      expect(i2.inversions[0].x).not.toBeNull();
      expect(c2.rows).toHaveLength(2);
    });

    it('engine: a derived quantity of it has no value; expectations on its values fail, on its counts still hold', () => {
      const life = bad.derived!.find((d) => d.name === 'life')!;
      expect(life).toMatchObject({ value: null, stderr: null, note: 'withheld: fit decay did not converge, so its values are not estimates.' });
      const [k, n, l] = bad.expectations;
      expect(k).toMatchObject({ passed: false, actual: null, message: 'decay.k: not checked, fit decay did not converge (max_iterations); its values are not estimates' });
      expect(n).toMatchObject({ passed: true, actual: 15 });
      expect(l.passed).toBe(false);
      expect(ok.expectations.every((e) => e.passed)).toBe(true);
      expect(ok.derived!.find((d) => d.name === 'life')!.value).toBeCloseTo(Math.log(2) / ok.fits[0].parameters[1].estimate, 12);
    });

    it('text, Markdown and panel: "withheld" in place of the numbers, and the reason under the table', () => {
      const text = runText(bad);
      expect(text).toMatch(/^\s+100\s+withheld\s*$/m);
      expect(text).toMatch(/^\s+20\s+withheld\s*$/m);
      expect(text).toContain('Withheld: fit decay did not converge (max_iterations), so its predictions would come from values that are not estimates.');
      expect(text).toContain('Left out of the ranking: decay (it is not a converged result; see below).');
      expect(text).toContain('Only other is a converged result: there is nothing to compare it with.');
      expect(text).toContain('decay left out: the fit did not converge (max_iterations: ');
      expect(text).not.toMatch(/The data (clearly )?favour|do not tell/);
      const md = markdownReport(bad);
      expect(md).toContain('| 100 | withheld |  |  |');
      expect(md).toContain('Withheld: fit decay did not converge (max_iterations), so its inverse predictions');
      const m = buildPanelModel(bad, { specUri: 'file:///x.lsq', specName: 'x.lsq' });
      const blocks = m.queries.filter((b) => b.heading.startsWith('Predictions') || b.heading.startsWith('Inverse'));
      expect(blocks).toHaveLength(2);
      for (const b of blocks) {
        expect(b.rows.every((r) => r[1] === 'withheld')).toBe(true);
        expect(b.notes[0]).toMatch(/^Withheld: fit decay did not converge/);
      }
      expect(runText(ok)).not.toContain('withheld');
    });
  });
});
