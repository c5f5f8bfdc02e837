/**
 * Hostile names through the results panel's model and chart code: every
 * chart compiles and draws the way the page draws it (tooltips deferred,
 * Vega-Lite compile, Vega view), names reach the charts only as label text,
 * and tooltips show them as written.
 */
import { describe, expect, it } from 'vitest';
import * as vega from 'vega';
import * as vegaLite from 'vega-lite';
import { buildPanelModel } from '../../extension/logic/panel-model';
import { deferTooltips, formatTip } from '../../extension/panel/view/tooltips';
import { HOSTILE_COLUMNS, HOSTILE_LABELS } from '../fixtures/hostile-names';
import { fitNamed, runWith } from './helpers';
import { lineData, lineFit } from '../fixtures/line-fit';

type Json = Record<string, unknown>;

/** What the page does with a chart spec before drawing it (view/charts.ts): defer tooltips, compile, build the view. */
async function drawLikeThePage(spec: Json): Promise<Map<string, { field: string; title?: string; format?: string }[]>> {
  const copy = structuredClone(spec);
  const tips = deferTooltips(copy);
  const compiled = vegaLite.compile(copy as never).spec;
  const view = new vega.View(vega.parse(compiled), { renderer: 'none' });
  await view.runAsync();
  view.finalize();
  return tips;
}

/** Field names the spec reads from its data (encodings' `field`). */
function fieldsOf(spec: unknown, out = new Set<string>()): Set<string> {
  if (Array.isArray(spec)) spec.forEach((s) => fieldsOf(s, out));
  else if (spec && typeof spec === 'object') {
    for (const [k, v] of Object.entries(spec as Json)) {
      if (k === 'field' && typeof v === 'string') out.add(v);
      else if (k !== 'data') fieldsOf(v, out);
    }
  }
  return out;
}

describe('extension/panel with hostile names', () => {
  it('fit charts: drawn, data read through fixed field names, tooltips titled with the names as written', async () => {
    const d = lineData(10, 4);
    for (const [k, name] of HOSTILE_COLUMNS.entries()) {
      const fit = lineFit({ name: 'cal', x: d.x, y: d.y, predictor: name, response: name === 'x' ? 'y' : `${name} out` });
      const model = buildPanelModel(runWith([fit]), { specUri: 'file:///s.lsq', specName: 's.lsq' });
      const charts = model.fits[0].charts!;
      expect(charts.length).toBe(5);
      // every chart drawn for a few names; for the others the two that carry the name on an axis
      for (const c of k < 4 ? charts : charts.filter((x) => x.id === 'fit' || x.id === 'residuals-predictor')) {
        for (const f of fieldsOf(c.spec)) expect(['row', 'x', 'y', 'fitted', 'residual', 'standardized', 'theoretical', 'predictionLower', 'predictionUpper', 'confidenceLower', 'confidenceUpper', 'a', 'b', 'zero', 'start', 'end', 'count', 'z'], `${name}: ${f}`).toContain(f);
        const tips = await drawLikeThePage(c.spec);
        if (c.id === 'fit') {
          const pointTips = tips.get('data_points_marks')!;
          const shown = formatTip(pointTips, { row: 2, x: 1.5, y: 2.5, fitted: 2.4, residual: 0.1 });
          const keys = Object.keys(shown).map((k) => k.replace(/\u2060/g, ''));
          expect(keys, name).toContain(name);
          expect(Object.getPrototypeOf(shown)).toBeNull();
          expect(shown[Object.keys(shown).find((k) => k.replace(/\u2060/g, '') === name)!]).toBe('1.5');
          if (name === 'title' || name === 'image') expect(Object.keys(shown)).not.toContain(name); // vega-tooltip's own keys
        }
      }
    }
  }, 60_000);

  it('group tables and group charts: hostile labels and parameter names, every chart drawn', async () => {
    const fits = HOSTILE_LABELS.map((g, i) => fitNamed('constructor', ['toString', '__proto__'], { group: g, seed: i + 1, n: 8 }));
    const model = buildPanelModel(runWith(fits), { specUri: 'file:///s.lsq', specName: 's.lsq', eagerGroupCharts: 2 });
    const table = model.groups[0];
    expect(table.rows.map((r) => r.group).sort()).toEqual([...HOSTILE_LABELS].sort());
    expect(new Set(table.rows.map((r) => r.key)).size).toBe(HOSTILE_LABELS.length);
    // the parameter charts across groups; the other views across groups (overlay, residuals by group) drawn below
    const parameterCharts = table.charts.filter((c) => c.id.startsWith('group-'));
    expect(parameterCharts.length).toBe(2);
    expect(table.charts.filter((c) => !c.id.startsWith('group-')).map((c) => c.id)).toEqual(['overlay', 'residuals-by-group']);
    for (const c of table.charts.filter((x) => !x.id.startsWith('group-'))) await drawLikeThePage(c.spec);
    for (const c of parameterCharts) {
      for (const f of fieldsOf(c.spec)) expect(['estimate', 'flagged', 'flags', 'group', 'high', 'low', 'order', 'se']).toContain(f);
      expect(fieldsOf(c.spec).has('group')).toBe(true);
      const tips = await drawLikeThePage(c.spec);
      const shown = formatTip(tips.get('group_points_marks')!, { group: HOSTILE_LABELS[0], estimate: 1.25, se: 0.5, flags: 'none' });
      expect(Object.values(shown)).toContain(HOSTILE_LABELS[0]);
    }
    for (const f of model.fits.filter((x) => x.charts)) for (const c of f.charts!) await drawLikeThePage(c.spec);
  }, 60_000);

  it('a tooltip that cannot be deferred is dropped, never compiled with user titles', () => {
    const spec: Json = { mark: 'point', encoding: { x: { field: 'x', type: 'quantitative' }, tooltip: [{ field: 'x', type: 'quantitative', title: 'constructor', aggregate: 'mean' }] } };
    deferTooltips(spec);
    expect((spec.encoding as Json).tooltip).toBeUndefined();
  });
});
