/**
 * Deferred tooltips (extension/panel/view/tooltips.ts): the field lists move
 * out of the chart specs unchanged, and formatting on hover gives what the
 * Vega-Lite tooltip encoding gave (the panel test in Chromium compares the
 * drawn tooltip; here the pieces in Node).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { RunResult } from '../../engine/result';
import { chartSpecs } from '../../engine/front/views/charts';
import { deferTooltips, formatTip } from '../../extension/panel/view/tooltips';

const run = JSON.parse(readFileSync(join(__dirname, 'fixtures', 'cooling-run.json'), 'utf8')) as RunResult;

type Layer = { name?: string; mark?: unknown; encoding?: { tooltip?: unknown } };
const layersOf = (spec: unknown): Layer[] => ((spec as { layer?: Layer[] }).layer ?? []);

describe('extension/panel/view/tooltips', () => {
  it('moves the point layers\' tooltip lists out of the specs and gives their marks the datum', () => {
    for (const chart of chartSpecs(run.fits[0])) {
      const before = structuredClone(chart.spec);
      const spec = structuredClone(chart.spec);
      const tips = deferTooltips(spec);
      layersOf(before).forEach((layer, i) => {
        const after = layersOf(spec)[i];
        if (layer.name && Array.isArray(layer.encoding?.tooltip)) {
          expect(tips.get(`${layer.name}_marks`)).toEqual(layer.encoding.tooltip.map((f: Record<string, unknown>) => ({ field: f.field, ...(f.title ? { title: f.title } : {}), ...(f.format ? { format: f.format } : {}) })));
          expect(after.encoding?.tooltip).toBeUndefined();
          expect((after.mark as { tooltip?: unknown }).tooltip).toEqual({ expr: 'datum' });
        } else expect(after).toEqual(layer);
      });
    }
    // the data points of the fit chart carry the CSV row first
    const fitSpec = structuredClone(chartSpecs(run.fits[0])[0].spec);
    expect(deferTooltips(fitSpec).get('data_points_marks')?.[0]).toEqual({ field: 'row', title: 'CSV row' });
  });

  it('formats a hovered datum with the d3-format specifiers (Vega default locale: U+2212 minus)', () => {
    const fields = [{ field: 'row', title: 'CSV row' }, { field: 'residual', title: 'residual', format: '.4~g' }, { field: 'x', format: '.4~g' }, { field: 'note' }];
    expect(formatTip(fields, { row: 5, residual: -1.58632, x: 6, note: null })).toEqual({ 'CSV row': '5', residual: '\u22121.586', x: '6', note: '' });
  });
});
