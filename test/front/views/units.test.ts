/**
 * Declared column units (`data … units COLUMN [UNIT]`) in every label: the result's `units` (and its JSON
 * against the schema), the chart axis titles (specs and the rendered SVG), the predict / invert / backcalc
 * headers, the RMSE and SSR labels of an unweighted fit (not of a σ-weighted one: σ units), the Markdown report
 * and the panel. Data invented (a straight calibration line with a small wobble).
 */
import Ajv from 'ajv';
import { describe, expect, it } from 'vitest';
import schema from '../../../engine/result.schema.json';
import type { FitResult } from '../../../engine/result';
import { resultToJsonValue } from '../../../engine/run/json';
import { chartSpecs } from '../../../engine/front/views/charts';
import { renderSvg } from '../../../engine/front/views/svg';
import { goodnessEntries, queryBlocks } from '../../../engine/front/views/summary';
import { markdownReport } from '../../../engine/front/views/markdown';
import { fitTextLines } from '../../../engine/front/views/text';
import { panelFit } from '../../../extension/logic/panel-model';
import { squaredUnit, withUnit } from '../../../engine/front/views/units';
import { runSpec, tempDir, writeCsv } from '../../run/helpers';

const validate = new Ajv().compile(schema);
const dir = tempDir();
// signal = 0.1 + 2·conc with a fixed wobble; sd grows with conc
writeCsv(dir, 'cal.csv', ['conc', 'signal', 'sd'], Array.from({ length: 10 }, (_, i) => [i + 1, (0.1 + 2 * (i + 1) + 0.05 * Math.sin(7 * i)).toFixed(5), (0.02 * (i + 1)).toFixed(3)]));

const spec = (units: string, extra = '', response = 'signal') =>
  `data cal = "cal.csv"${units}\nfit line on cal {\n  model ${response} = b0 + b1 * conc\n  param b0\n  param b1\n${extra}}\npredict line at conc = 2.5\ninvert line at signal = 7\nbackcalc line\n`;

/** Every axis title in a chart spec (walks the Vega-Lite JSON). */
function axisTitles(node: unknown, out: string[] = []): string[] {
  if (Array.isArray(node)) node.forEach((n) => axisTitles(n, out));
  else if (node && typeof node === 'object') {
    for (const [k, v] of Object.entries(node)) {
      if (k === 'axis' && v && typeof v === 'object' && typeof (v as { title?: unknown }).title === 'string') out.push((v as { title: string }).title);
      axisTitles(v, out);
    }
  }
  return out;
}

const entry = (fit: FitResult, key: string) => goodnessEntries(fit).find((e) => (e.key ?? e.label) === key);

describe('views: declared units in labels', () => {
  it('forms: text (unit); squared units bracket compound units', () => {
    expect(withUnit('conc', 'ng/mL')).toBe('conc (ng/mL)');
    expect(withUnit('conc', undefined)).toBe('conc');
    expect(squaredUnit('mV')).toBe('mV²');
    expect(squaredUnit('ng/mL')).toBe('(ng/mL)²');
    expect(squaredUnit('m/s^2')).toBe('(m/s^2)²');
    expect(squaredUnit(undefined)).toBeUndefined();
  });

  it('the result carries the response and predictor units, and its JSON validates', async () => {
    const { result } = await runSpec(spec(' units conc [ng/mL], signal [AU]'), dir);
    expect(result.fits[0].units).toEqual({ response: 'AU', predictor: 'ng/mL' });
    expect(validate(resultToJsonValue(result)), JSON.stringify(validate.errors)).toBe(true);
    const none = await runSpec(spec(''), dir);
    expect(none.result.fits[0]).not.toHaveProperty('units');
    // a transformed response has no response unit; the predictor keeps its own
    const ln = await runSpec(spec(' units conc [ng/mL], signal [AU]', '', 'ln(signal)'), dir);
    expect(ln.result.fits[0].units).toEqual({ predictor: 'ng/mL' });
  });

  it('axis titles of the charts (specs and the rendered SVG) name the units', async () => {
    const { result } = await runSpec(spec(' units conc [ng/mL], signal [AU]'), dir);
    const fit = result.fits[0];
    const charts = chartSpecs(fit);
    const titles = (id: string) => axisTitles(charts.find((c) => c.id === id)!.spec);
    expect(titles('fit')).toEqual(expect.arrayContaining(['conc (ng/mL)', 'signal (AU)']));
    expect(titles('residuals-fitted')).toEqual(expect.arrayContaining(['fitted value (AU)', 'residual (observed − fitted, AU)']));
    expect(titles('residuals-predictor')).toEqual(expect.arrayContaining(['conc (ng/mL)', 'residual (observed − fitted, AU)']));
    const svg = await renderSvg(charts.find((c) => c.id === 'fit')!.spec);
    expect(svg).toContain('conc (ng/mL)');
    expect(svg).toContain('signal (AU)');
    // two predictors: no fit chart, the observed-against-fitted chart in the response unit
    const two = await runSpec('data cal = "cal.csv" units signal [AU]\nfit plane on cal {\n  model signal = b0 + b1 * conc + b2 * sd\n  param b0\n  param b1\n  param b2\n}\n', dir);
    expect(axisTitles(chartSpecs(two.result.fits[0]).find((c) => c.id === 'observed-fitted')!.spec)).toEqual(['fitted value (AU)', 'observed signal (AU)']);
    // without units: the bare names
    const bare = chartSpecs((await runSpec(spec(''), dir)).result.fits[0]);
    expect(axisTitles(bare.find((c) => c.id === 'fit')!.spec)).toEqual(expect.arrayContaining(['conc', 'signal']));
  });

  it('predict, invert and backcalc headers carry the units', async () => {
    const { result } = await runSpec(spec(' units conc [ng/mL], signal [AU]'), dir);
    const blocks = queryBlocks(result);
    const headers = (start: string) => blocks.find((b) => b.heading.startsWith(start))!.headers;
    expect(headers('Predictions')).toEqual(['conc (ng/mL)', 'fitted (AU)', '95% confidence interval (AU)', '95% prediction interval (AU)']);
    expect(headers('Inverse')).toEqual(['signal (AU)', 'conc (ng/mL)', '95% interval (ng/mL)', 'note']);
    expect(headers('Back-calculated')).toEqual(['row', 'nominal conc (ng/mL)', 'signal (AU)', 'back-calculated conc (ng/mL)', '95% interval (ng/mL)', 'deviation', '95% deviation interval', 'note']);
    const md = markdownReport(result);
    expect(md).toContain('conc (ng/mL)');
    expect(md).toContain('fitted (AU)');
  });

  it('RMSE and SSR labels carry the response unit when unweighted, not with sigma (σ units) or relative weights', async () => {
    const plain = (await runSpec(spec(' units conc [ng/mL], signal [AU]'), dir)).result.fits[0];
    expect(entry(plain, 'residual standard deviation (RMSE)')!.label).toBe('residual standard deviation (RMSE, AU)');
    expect(entry(plain, 'sum of squared residuals (SSR)')!.label).toBe('sum of squared residuals (SSR, AU²)');
    expect(fitTextLines(plain).join('\n')).toContain('residual standard deviation (RMSE, AU)');
    // the panel finds the RMSE by the label without its unit, with the same value
    const rmse = panelFit(plain, false).keyStats.find((k) => k.label === 'RMSE');
    expect(rmse?.value).toBe(entry(plain, 'residual standard deviation (RMSE)')!.value);
    const sigma = (await runSpec(spec(' units conc [ng/mL], signal [AU]', '  sigma 0.02 * conc\n'), dir)).result.fits[0];
    const e = entry(sigma, 'residual standard deviation (RMSE)')!;
    expect(e.label).toBe('residual standard deviation (RMSE)');
    expect(e.note).toMatch(/^in σ units, not response units/);
    expect(entry(sigma, 'sum of squared residuals (SSR)')!.label).toBe('sum of squared residuals (SSR)');
    const weighted = (await runSpec(spec(' units conc [ng/mL], signal [AU]', '  weight 1 / conc\n'), dir)).result.fits[0];
    expect(entry(weighted, 'residual standard deviation (RMSE)')!.label).toBe('residual standard deviation (RMSE)');
    // no unit declared: the labels as before
    const bare = (await runSpec(spec(''), dir)).result.fits[0];
    expect(entry(bare, 'residual standard deviation (RMSE)')!.key).toBeUndefined();
  });
});
