import { describe, expect, it } from 'vitest';
import { buildPanelModel, chartsForKey, fitKey, panelFit } from '../../extension/logic/panel-model';
import { MAX_MARKS } from '../../engine/front/views/downsample';
import { parameterRows } from '../../engine/front/views/summary';
import { fitNamed, runWith } from './helpers';

type Json = Record<string, unknown>;
/** Every `data.values` array in a Vega-Lite spec (top level and layers). */
function dataArrays(spec: Json): unknown[][] {
  const out: unknown[][] = [];
  const walk = (v: unknown): void => {
    if (Array.isArray(v)) v.forEach(walk);
    else if (v && typeof v === 'object') {
      const o = v as Json;
      const d = o.data as Json | undefined;
      if (d && Array.isArray(d.values)) out.push(d.values);
      Object.values(o).forEach(walk);
    }
  };
  walk(spec);
  return out;
}

describe('extension/logic/panel-model (downsampling, groups)', () => {
  it('draws at most MAX_MARKS points per layer for a large fit and keeps the largest residual', () => {
    const fit = fitNamed('big', ['a', 'b'], { n: 3 * MAX_MARKS + 123 });
    // one clear outlier that must stay visible
    const k = 777;
    fit.points.y[k] += 50;
    fit.points.residual[k] += 50;
    fit.points.standardized[k] += 50;
    const pf = panelFit(fit, true);
    expect(pf.charts!.length).toBeGreaterThan(0);
    let biggest = 0;
    for (const c of pf.charts!) {
      for (const values of dataArrays(c.spec)) {
        expect(values.length, c.id).toBeLessThanOrEqual(MAX_MARKS);
        biggest = Math.max(biggest, values.length);
      }
    }
    expect(biggest).toBeGreaterThan(MAX_MARKS / 2); // thinned, not emptied
    const main = pf.charts!.find((c) => c.id === 'fit')!;
    const rows = dataArrays(main.spec).flat() as Json[];
    expect(rows.some((r) => r.row === fit.points.row[k])).toBe(true);
  });

  it('keeps every point of a small fit and carries the CSV row for click-through', () => {
    const fit = fitNamed('small', ['a', 'b'], { n: 40 });
    const main = panelFit(fit, true).charts!.find((c) => c.id === 'fit')!;
    const rows = dataArrays(main.spec).flat().filter((r) => (r as Json).row !== undefined) as Json[];
    expect(rows.map((r) => r.row).sort((a, b) => (a as number) - (b as number))).toEqual(fit.points.row);
  });

  it('formats the parameter table with the CLI view functions', () => {
    const fit = fitNamed('newton', ['rise', 'tau']);
    expect(panelFit(fit, false).parameterRows).toEqual(parameterRows(fit));
  });

  it('builds a group table worst first, charts for the worst groups, the rest on request', () => {
    const fits = Array.from({ length: 9 }, (_, i) => fitNamed('newton', ['rise', 'tau'], { group: `g${i}`, seed: 100 + i }));
    fits[5].stop = { code: 'failed', message: 'fewer rows than parameters', converged: false };
    fits[3].parameters[1].atBound = 'upper';
    const m = buildPanelModel(runWith(fits), { specUri: 'file:///w/s.lsq', specName: 's.lsq', eagerGroupCharts: 3 });
    expect(m.groups).toHaveLength(1);
    const g = m.groups[0];
    expect(g.rows.map((r) => r.group).slice(0, 2)).toEqual(['g5', 'g3']);
    expect(g.rows).toHaveLength(9);
    expect(g.charts.map((c) => c.id)).toEqual(['overlay', 'residuals-by-group', 'group-rise', 'group-tau']);
    const withCharts = m.fits.filter((f) => f.charts !== null).map((f) => f.group);
    expect(withCharts).toHaveLength(3);
    expect(withCharts).toContain('g5');
    const later = m.fits.find((f) => f.charts === null)!;
    expect(chartsForKey(runWith(fits), later.key)?.length).toBeGreaterThan(0);
    expect(later.key).toBe(fitKey({ name: 'newton', group: later.group }));
  });

  it('summarises the run in the headline', () => {
    const a = fitNamed('one', ['a', 'b']);
    const b = fitNamed('two', ['a', 'b']);
    b.stop = { code: 'max_iterations', message: 'limit', converged: false };
    b.warnings.push({ code: 'no_convergence', message: 'did not converge' });
    const m = buildPanelModel(runWith([a, b]), { specUri: 'file:///w/s.lsq', specName: 's.lsq' });
    expect(m.headline).toMatchObject({ fits: 2, converged: 1, warnings: 1, expectations: 0, errors: 0 });
  });
});
