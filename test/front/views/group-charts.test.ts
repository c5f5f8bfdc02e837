/**
 * Charts across curves (curves.ts, group-charts.ts, plate-charts.ts,
 * across.ts): what the specs hold and what the SVG draws, on invented
 * straight-line groups (fixtures/line-fit.ts).
 */
import { describe, expect, it } from 'vitest';
import type { FitResult } from '../../../engine/result';
import { buildGroupTable } from '../../../engine/groups/table';
import { groupCurveSet, MAX_OVERLAY_CURVES, overlayChoice, sameDataFitSets, thinLine } from '../../../engine/front/views/curves';
import { curveAxis, groupParameterSpecs, LEGEND_SELECTION, overlayChart, residualsByCurveChart, wrapLines } from '../../../engine/front/views/group-charts';
import { FLAG_COLOURS, plateData, plateMapSpecs } from '../../../engine/front/views/plate-charts';
import { acrossCharts, acrossFileName } from '../../../engine/front/views/across';
import { detectPlates, wellName } from '../../../engine/front/views/wells';
import { renderSvg } from '../../../engine/front/views/svg';
import { HEAT_RAMP, SERIES } from '../../../engine/front/views/palette';
import { lineData, lineFit, runOf } from '../../fixtures/line-fit';
import * as vegaLite from 'vega-lite';
import { findAll, markItems, parseXml } from './xml';
import { HOSTILE_COLUMNS, HOSTILE_LABELS } from '../../fixtures/hostile-names';

type Json = Record<string, any>; // eslint-disable-line @typescript-eslint/no-explicit-any

/** Straight-line groups named `labels`, slopes rising with the index. */
function groups(labels: readonly string[], n = 8): FitResult[] {
  return labels.map((g, i) => lineFit({ ...lineData(n, 300 + i, { b: 0.05 + 0.002 * i }), name: 'cal', group: g, predictor: 'conc', response: 'signal' }));
}
/** Group `i` did not converge (stopped at the iteration limit after moving). */
function notConverged(fits: FitResult[], i: number): FitResult[] {
  const out = [...fits];
  out[i] = { ...out[i], iterations: 50, stop: { code: 'max_iterations', message: 'iteration limit 50 reached', converged: false } } as FitResult;
  return out;
}
const setOf = (fits: FitResult[]) => {
  const table = buildGroupTable(fits);
  return { table, set: groupCurveSet('cal', fits, new Map(table.rows.map((r) => [r.group, r.flags])))! };
};
const layer = (spec: unknown, name: string): Json => ((spec as Json).layer as Json[]).find((l) => l.name === name)!;

describe('views/curves', () => {
  it('makes one curve per group with its points, its fitted line from the band grid and its flags', () => {
    const fits = notConverged(groups(['b1', 'b2', 'b3']), 1);
    const { set } = setOf(fits);
    expect(set.curves.map((c) => [c.label, c.key, c.fitted, c.flags])).toEqual([
      ['b1', 'cal/b1', true, []], ['b2', 'cal/b2', false, ['not_converged']], ['b3', 'cal/b3', true, []],
    ]);
    expect(set.curves[0].points).toHaveLength(8);
    expect(set.curves[0].line).toHaveLength(101); // the band grid of fixtures/line-fit.ts
    expect(set.curves[0].line[0]).toEqual({ x: fits[0].bands!.x[0], fitted: fits[0].bands!.fitted[0] });
    expect(set.curves[1].line).toEqual([]); // not fitted: no curve
    expect(set.curves[1].points.every((p) => p.standardized === null)).toBe(true);
  });

  it('shows every curve up to 8; beyond, the flagged ones first, then the first others, and says so', () => {
    expect(overlayChoice(setOf(groups(['a', 'b', 'c'])).set).note).toBeNull();
    const labels = Array.from({ length: 20 }, (_, i) => `g${i}`);
    const c = overlayChoice(setOf(notConverged(notConverged(groups(labels), 15), 17)).set);
    expect(c.shown.map((x) => x.label)).toEqual(['g0', 'g1', 'g2', 'g3', 'g4', 'g5', 'g15', 'g17']);
    expect(c.shown).toHaveLength(MAX_OVERLAY_CURVES);
    expect(c.background).toHaveLength(12);
    expect(c.note).toBe("Showing 8 of 20 groups in colour: the 2 flagged groups and the first 6 other groups. Thin grey lines: the other 12 groups' curves. Every group is in the table.");
  });

  it('finds single fits of the same data (same response, predictor, rows and values) and nothing else', () => {
    const d = lineData(10, 5);
    const a = lineFit({ ...d, name: 'straight' });
    const b = { ...lineFit({ ...d, name: 'other' }) };
    const c = lineFit({ ...lineData(10, 6), name: 'elsewhere' });
    const sets = sameDataFitSets([a, c, b, ...groups(['g1', 'g2'])]);
    expect(sets.map((s) => [s.name, s.curves.map((x) => x.label)])).toEqual([['straight, other', ['straight', 'other']]]);
  });

  it('thins a line evenly keeping both ends', () => {
    const line = Array.from({ length: 1000 }, (_, i) => i);
    const t = thinLine(line, 120);
    expect(t).toHaveLength(120);
    expect([t[0], t[119]]).toEqual([0, 999]);
  });
});

describe('views/group-charts', () => {
  it('overlays every group in its own series colour and marker, with a legend-bound point selection that dims the others', async () => {
    const { set } = setOf(groups(['b1', 'b2', 'b3']));
    const c = overlayChart(set)!;
    const points = layer(c.spec, 'curve_points');
    expect(points.params).toEqual([{ name: LEGEND_SELECTION, select: { type: 'point', fields: ['label'] }, bind: 'legend' }]);
    expect(points.encoding.color.scale).toEqual({ range: SERIES.slice(0, 3) });
    expect(points.encoding.color.sort).toEqual({ field: 'order', op: 'min' });
    expect(points.data.values.map((v: Json) => `${v.label}:${v.order}`).filter((v: string, i: number, a: string[]) => a.indexOf(v) === i)).toEqual(['b1:0', 'b2:1', 'b3:2']);
    expect(points.encoding.shape.scale.range).toEqual(['circle', 'square', 'triangle-up']);
    expect(points.encoding.opacity).toEqual({ condition: { param: LEGEND_SELECTION, empty: true, value: 0.9 }, value: 0.1 });
    expect(layer(c.spec, 'curve_lines').encoding.opacity.condition.param).toBe(LEGEND_SELECTION);
    // one legend, and it is the clickable one (vega-lite compiles the binding into the legend's entries)
    const compiled = vegaLite.compile(c.spec).spec as Json;
    expect(compiled.legends).toHaveLength(1);
    expect(compiled.legends[0].encode.symbols.name).toBe('label_legend_symbols');
    expect(compiled.legends[0].encode.symbols.interactive).toBe(true);
    expect(points.data.values).toHaveLength(24);
    const svg = parseXml(await renderSvg(c.spec));
    expect(markItems(svg, 'curve_points')).toHaveLength(24);
    expect(markItems(svg, 'curve_lines')).toHaveLength(3); // one path per group
    const texts = findAll(svg, (e) => e.name === 'text').map((t) => t.text);
    expect(texts.filter((t) => /^b\d$/.test(t))).toEqual(['b1', 'b2', 'b3']); // legend entries, in group order
  });

  it('draws a many-group overlay as 8 coloured curves over thin grey lines, with the note in the subtitle', async () => {
    const labels = Array.from({ length: 30 }, (_, i) => `s${String(i).padStart(2, '0')}`);
    const c = overlayChart(setOf(groups(labels)).set)!;
    expect([...new Set(layer(c.spec, 'curve_points').data.values.map((v: Json) => v.label))]).toEqual(labels.slice(0, 8));
    expect(new Set(layer(c.spec, 'other_curves').data.values.map((v: Json) => v.label)).size).toBe(22);
    expect((c.spec as Json).title.subtitle.join(' ')).toContain('Showing 8 of 30 groups in colour');
    for (const line of (c.spec as Json).title.subtitle) expect(line.length).toBeLessThanOrEqual(96);
    const svg = parseXml(await renderSvg(c.spec));
    expect(markItems(svg, 'other_curves')).toHaveLength(22);
  });

  it('draws fits of the same data with their points once and one line per fit, told apart by colour and dash', () => {
    const d = lineData(12, 8);
    const set = sameDataFitSets([lineFit({ ...d, name: 'm1' }), lineFit({ ...d, name: 'm2' })])[0];
    const c = overlayChart(set)!;
    expect(c.title).toBe('Fits of the same data: m1, m2');
    expect(layer(c.spec, 'curve_points').data.values).toHaveLength(12);
    const lines = layer(c.spec, 'curve_lines');
    expect(lines.params[0].bind).toBe('legend');
    expect(lines.encoding.strokeDash.scale.range).toEqual([[1, 0], [7, 3]]);
    const compiled = vegaLite.compile(c.spec).spec as Json;
    expect(compiled.legends).toHaveLength(1);
    expect(compiled.legends[0].encode.symbols.interactive).toBe(true);
  });

  it('puts standardized residuals by group on a labelled axis, every k-th label beyond 60 groups', async () => {
    const few = curveAxis(['a', 'b'], 'group');
    expect(few.axis.labelExpr).toBeUndefined();
    expect(few.axis.title).toBe('2 groups');
    const many = Array.from({ length: 96 }, (_, i) => wellName(Math.floor(i / 12), (i % 12) + 1));
    const ax = curveAxis(many, 'group');
    expect(ax.every).toBe(3);
    expect(ax.axis.title).toBe('96 groups (every 3rd labelled)');
    expect(ax.axis.labelExpr).toBe('round(datum.index * 95) % 3 === 0 ? datum.label : ""');
    const fits = notConverged(groups(many, 6), 40);
    const c = residualsByCurveChart(setOf(fits).set)!;
    const pts = layer(c.spec, 'residual_points');
    expect(pts.encoding.x.scale.domain).toEqual(many);
    expect(pts.data.values).toHaveLength(95 * 6); // the not-converged group has none
    expect(pts.data.values.filter((v: Json) => v.flagged === 'flagged')).toHaveLength(0);
    expect((c.spec as Json).title.subtitle.join(' ')).toContain('1 group without standardized residuals');
    const svg = parseXml(await renderSvg(c.spec));
    expect(markItems(svg, 'residual_points')).toHaveLength(570);
    const labels = findAll(svg, (e) => e.name === 'text').map((t) => t.text);
    for (const w of ['A01', 'A04', 'B01', 'H10']) expect(labels).toContain(w);
    for (const w of ['A02', 'A03', 'H12']) expect(labels).not.toContain(w);
  });

  it('labels the groups on the parameter charts', async () => {
    const fits = groups(['lot 1', 'lot 2', 'lot 3']);
    const specs = groupParameterSpecs(fits, buildGroupTable(fits));
    expect(specs.map((s) => s.id)).toEqual(['group-intercept', 'group-slope']);
    const svg = parseXml(await renderSvg(specs[1].spec));
    const texts = findAll(svg, (e) => e.name === 'text').map((t) => t.text);
    for (const g of ['lot 1', 'lot 2', 'lot 3', '3 groups']) expect(texts).toContain(g);
    expect(markItems(svg, 'group_points')).toHaveLength(3);
  });
});

describe('views/plate-charts', () => {
  const wells = Array.from({ length: 96 }, (_, i) => wellName(Math.floor(i / 12), (i % 12) + 1)).filter((w) => w !== 'C05' && w !== 'H12');

  it('maps a parameter over every well: empty wells without a group, no value for a group that did not converge', () => {
    const fits = notConverged(groups(wells, 5), 3); // A04
    const table = buildGroupTable(fits);
    const layout = detectPlates(table.rows.map((r) => r.group)).layout!;
    const data = plateData(layout, table, { kind: 'parameter', name: 'slope', index: 1 });
    expect(data).toHaveLength(96);
    const at = (w: string) => data.find((d) => d.well === w)!;
    expect(at('C05')).toMatchObject({ group: null, value: null, flag: null, flagLabel: null });
    expect(at('A04')).toMatchObject({ group: 'A04', value: null, flag: 'not_converged', flagLabel: 'not converged' });
    expect(at('B01').value).toBeCloseTo(fits[12].parameters[1].estimate, 12);
    expect(at('B01')).toMatchObject({ rowLetter: 'B', column: 1, flag: 'none' });
  });

  it('makes a flag map and one map per parameter, clickable by group, drawn with every well', async () => {
    const fits = notConverged(groups(wells, 5), 3);
    const specs = plateMapSpecs(buildGroupTable(fits));
    expect(specs.map((s) => s.id)).toEqual(['plate-flags', 'plate-param-intercept', 'plate-param-slope']);
    const slope = (specs[2].spec as Json).vconcat[0];
    const values = slope.layer.find((l: Json) => l.name === 'well_values');
    expect(values.encoding.color.scale.range).toEqual([...HEAT_RAMP]);
    expect(values.data.values).toHaveLength(93); // 94 groups less the one not converged
    expect(values.data.values.every((v: Json) => typeof v.group === 'string')).toBe(true);
    expect(slope.layer.find((l: Json) => l.name === 'wells_without_value').data.values.map((v: Json) => v.group)).toEqual(['A04']);
    expect(slope.layer.find((l: Json) => l.name === 'flagged_wells')).toBeUndefined(); // the only flagged group has no value to mark
    const flags = (specs[0].spec as Json).vconcat[0].layer.find((l: Json) => l.name === 'well_values');
    expect(flags.encoding.color.scale).toEqual({ domain: ['no flag', 'not converged'], range: [FLAG_COLOURS.none, FLAG_COLOURS.not_converged] });
    const svg = parseXml(await renderSvg(specs[2].spec));
    expect(markItems(svg, 'wells')).toHaveLength(96);
    expect(markItems(svg, 'well_values')).toHaveLength(93);
  });

  it('marks a flagged group that has a value with a dot over its colour', async () => {
    const fits = groups(wells, 5);
    const b03 = wells.indexOf('B03');
    fits[b03] = { ...fits[b03], parameters: fits[b03].parameters.map((p, j) => (j === 1 ? { ...p, atBound: 'lower' } : p)) } as FitResult;
    const slope = (plateMapSpecs(buildGroupTable(fits))[2].spec as Json);
    const dots = slope.vconcat[0].layer.find((l: Json) => l.name === 'flagged_wells');
    expect(dots.data.values.map((v: Json) => [v.group, v.flag])).toEqual([['B03', 'at_bound']]);
    expect(slope.title.subtitle.join(' ')).toContain('Dot: a flagged group');
    expect(markItems(parseXml(await renderSvg(slope as never)), 'flagged_wells')).toHaveLength(1);
  });

  it('draws one map per plate for prefixed labels, and none for labels that are not wells', () => {
    const labels = ['P1-A01', 'P1-A02', 'P1-B01', 'P2-A01', 'P2-B02'];
    const specs = plateMapSpecs(buildGroupTable(groups(labels, 4)));
    const v = (specs[1].spec as Json).vconcat;
    expect(v).toHaveLength(2);
    expect(v.map((p: Json) => p.title.text)).toEqual(['plate P1', 'plate P2']);
    expect(plateMapSpecs(buildGroupTable(groups(['C1', 'C2', 'C3'], 4)))).toEqual([]);
  });
});

describe('views/across', () => {
  it('lists the across-curve charts of a run and names their files apart from the per-fit charts', () => {
    const d = lineData(10, 5);
    const run = runOf([...groups(['A01', 'A02', 'B01', 'B02']), lineFit({ ...d, name: 'm1' }), lineFit({ ...d, name: 'm2' })]);
    const a = acrossCharts(run);
    expect(a.map((x) => [x.key, x.charts.map((c) => c.id)])).toEqual([
      ['cal', ['overlay', 'residuals-by-group', 'group-intercept', 'group-slope', 'plate-flags', 'plate-param-intercept', 'plate-param-slope']],
      ['same-data:m1, m2', ['overlay', 'residuals-by-group']],
    ]);
    expect(acrossFileName(a[0], 'overlay')).toBe('cal~groups-overlay.svg');
    expect(acrossFileName(a[1], 'overlay')).toBe('m1~same-data-overlay.svg');
  });
});

describe('views/across with hostile names', () => {
  it('draws every across-curve chart with hostile group labels, fit and column names, the labels as written in the legend', async () => {
    const labels = [...HOSTILE_LABELS];
    const fits = labels.map((g, i) => lineFit({ ...lineData(6, 500 + i), name: HOSTILE_COLUMNS[0], group: g, predictor: HOSTILE_COLUMNS[1], response: HOSTILE_COLUMNS[2] }));
    const all = acrossCharts(runOf(fits));
    expect(all).toHaveLength(1);
    for (const c of all[0].charts) {
      const svg = parseXml(await renderSvg(c.spec).catch((e: Error) => { throw new Error(`${c.id}: ${e.message}`); }));
      const marks = findAll(svg, (e) => e.name === 'g' && /_marks\b/.test(e.attrs.class ?? ''));
      expect(marks.length, c.id).toBeGreaterThan(0);
    }
  });
});

describe('views/group-charts wrapLines', () => {
  it('wraps subtitle lines at word boundaries within the width, keeping an over-long word whole', () => {
    expect(wrapLines(['one two three four', 'x'], 9)).toEqual(['one two', 'three', 'four', 'x']);
    expect(wrapLines(['abcdefghijkl b'], 5)).toEqual(['abcdefghijkl', 'b']);
    for (const l of wrapLines(['a '.repeat(200).trim()], 64)) expect(l.length).toBeLessThanOrEqual(64);
  });
});

describe('views/group-charts with many groups', () => {
  it('caps the residuals by group at 384 groups, flagged first, and the overlay at 8 coloured and 400 grey', () => {
    const labels = Array.from({ length: 1000 }, (_, i) => `s${i}`);
    let fits = groups(labels, 5);
    fits = notConverged(fits, 900);
    const { set } = setOf(fits);
    const r = residualsByCurveChart(set)!;
    const domain = layer(r.spec, 'residual_points').encoding.x.scale.domain as string[];
    expect(domain).toHaveLength(384);
    expect(domain).toContain('s900');
    expect(domain.slice(0, 3)).toEqual(['s0', 's1', 's2']);
    expect((r.spec as Json).title.subtitle.join(' ')).toContain('Showing 384 of 1000 groups');
    expect(layer(r.spec, 'residual_points').data.values.length).toBeLessThanOrEqual(5000 + 4 * 384);
    const o = overlayChart(set)!;
    expect(new Set(layer(o.spec, 'other_curves').data.values.map((v: Json) => v.label)).size).toBe(400);
  });
});
