/**
 * Charts of several curves at once (curves.ts `CurveSet`): the overlay of
 * every curve (points and fitted line per curve, a legend that selects in
 * the panel), standardized residuals by curve, and the estimates of each
 * parameter across the groups of a per-group fit. Vega-Lite specs, drawn to
 * SVG for the report (svg.ts) and embedded by the results panel. As in
 * charts.ts, user text (fit, column, group names) is only label text or data
 * values, never a field name or expression source.
 *
 * Axes across curves (`curveAxis`): every label is written when there are at
 * most MAX_LABELLED (60) curves, else every k-th one with k = ⌈n / 40⌉, and
 * the axis title says so. Labels reach the spec only as data and scale
 * domains (never as `sort` or `axis.values` lists, which Vega reads as
 * operator names when a label is e.g. `constructor`, measured with vega 6).
 */
import type { TopLevelSpec } from 'vega-lite';
import type { FitResult } from '../../result';
import type { GroupTable } from '../../groups/table';
import type { BandRow, PointRow } from './chart-data';
import { prefersLogX } from './chart-data';
import { axisTitle, pointSize, top, type Json } from './charts';
import { predictorUnit, responseUnit, withUnit } from './units';
import { overlayChoice, pointsPerCurve, thinLine, thinPoints, type Curve, type CurveSet } from './curves';
import { CHART_FORMAT } from '../../format';
import { PALETTE, SERIES, SERIES_SHAPES, type Palette } from './palette';

/** A chart over several curves; `id` is stable for the same set (`overlay`, `residuals-by-group`, `group-<parameter>`, `plate-…`). */
export interface GroupChartSpec {
  id: string;
  title: string;
  spec: TopLevelSpec;
}

export interface GroupChartOptions {
  /** Plot width in pixels. Default 560. */
  width?: number;
  /** Plot height in pixels. Default 320. */
  height?: number;
  palette?: Palette;
}

/** Widest plot of a chart across curves, in pixels (fits the panel beside its navigation rail at 1100 px). */
export const MAX_ACROSS_WIDTH = 760;

/**
 * Subtitle lines word-wrapped to at most `width` characters (Vega draws each
 * subtitle line as given and never wraps it; a long line would run past a
 * narrow panel). A single word longer than `width` stays whole.
 */
export function wrapLines(lines: readonly string[], width: number): string[] {
  const out: string[] = [];
  for (const line of lines) {
    let cur = '';
    for (const word of line.split(' ')) {
      if (cur && cur.length + 1 + word.length > width) {
        out.push(cur);
        cur = word;
      } else cur = cur ? `${cur} ${word}` : word;
    }
    out.push(cur);
  }
  return out;
}

/** Subtitle width (characters) of a chart across curves. */
const SUBTITLE_CHARS = 96;

/** Curves up to this count get every label on an across-curve axis. */
export const MAX_LABELLED = 60;
/** Above MAX_LABELLED, about this many labels are written. */
export const TARGET_LABELS = 40;

const NUM = CHART_FORMAT.value;

/** The nominal axis over curve labels (rule in the module comment); `labels` in drawing order. */
export function curveAxis(labels: readonly string[], noun: string): { axis: Json; every: number } {
  const n = labels.length;
  const every = n <= MAX_LABELLED ? 1 : Math.ceil(n / TARGET_LABELS);
  const title = every === 1 ? `${n} ${noun}s` : `${n} ${noun}s (every ${ordinal(every)} labelled)`;
  const axis: Json = { title, labelAngle: -40, labelLimit: 90, labelOverlap: false };
  // every k-th label by its position: an expression made of numbers only (a label list in `axis.values` or `sort`
  // breaks Vega when a label is an Object.prototype name such as `constructor`; the scale domain takes them)
  if (every > 1) axis.labelExpr = `round(datum.index * ${n - 1}) % ${every} === 0 ? datum.label : ""`;
  return { axis, every };
}

function ordinal(k: number): string {
  const s = k % 100 >= 11 && k % 100 <= 13 ? 'th' : ({ 1: 'st', 2: 'nd', 3: 'rd' } as Record<number, string>)[k % 10] ?? 'th';
  return `${k}${s}`;
}

/**
 * The colour and shape scales over the shown curves (palette.ts SERIES,
 * SERIES_SHAPES), one legend. The domain is the data's labels in curve order
 * (`sort` by the numeric `order` field, minimum): an explicit label list as the
 * domain of both channels breaks Vega's merged legend when a label is an
 * Object.prototype name (measured with vega 6).
 */
function seriesScales(count: number): { color: Json; shape: Json } {
  const range = Array.from({ length: count }, (_, i) => SERIES[i % SERIES.length]);
  const shapes = Array.from({ length: count }, (_, i) => SERIES_SHAPES[i % SERIES_SHAPES.length]);
  const legend = { title: null, orient: 'right', labelLimit: 140, symbolStrokeWidth: 2 };
  const sort = { field: 'order', op: 'min' };
  return {
    color: { field: 'label', type: 'nominal', sort, scale: { range }, legend },
    shape: { field: 'label', type: 'nominal', sort, scale: { range: shapes }, legend },
  };
}

/** Dash patterns of the lines of several fits of the same data, in legend order. */
const DASHES: number[][] = [[1, 0], [7, 3], [2, 2], [9, 3, 2, 3], [4, 4], [12, 4], [2, 5], [6, 2, 2, 2]];

/** Points per thin grey background line (smooth curves; keeps a 400-curve overlay near 8,000 rows). */
const BACKGROUND_LINE_POINTS = 20;

/** Name of the legend selection in the overlay (a fixed name, never user text). */
export const LEGEND_SELECTION = 'picked';

/**
 * The overlay: every shown curve's points and fitted line in its own colour
 * and marker, the other curves as thin grey lines behind (curves.ts
 * `overlayChoice`). Clicking a legend entry keeps that curve bright and dims
 * the others (a point selection bound to the legend; shift-click adds).
 */
export function overlayChart(set: CurveSet, opts: GroupChartOptions = {}): GroupChartSpec | null {
  const pal = opts.palette ?? PALETTE;
  const choice = overlayChoice(set);
  if (!choice.shown.length) return null;
  const labels = choice.shown.map((c) => c.label);
  const perCurve = pointsPerCurve(choice.shown.length);
  const points = choice.shown.flatMap((c, order) => thinPoints(c.points, perCurve).map((p) => ({ label: c.label, order, row: p.row, x: p.x, y: p.y, fitted: p.fitted, residual: p.residual })));
  const lines = choice.shown.flatMap((c, order) => thinLine(c.line).map((q) => ({ label: c.label, order, x: q.x, fitted: q.fitted })));
  const behind = choice.background.flatMap((c) => thinLine(c.line, BACKGROUND_LINE_POINTS).map((q) => ({ label: c.label, x: q.x, fitted: q.fitted })));
  const logX = prefersLogX(points as unknown as PointRow[], [...lines, ...behind] as unknown as BandRow[]);
  const xEnc: Json = { field: 'x', type: 'quantitative', axis: axisTitle(withUnit(set.predictor, predictorUnit(set))), scale: logX ? { type: 'log' } : { zero: false } };
  const yAxis = axisTitle(withUnit(set.response, responseUnit(set)));
  const { color, shape } = seriesScales(labels.length);
  const dim = (on: number, off: number): Json => ({ condition: { param: LEGEND_SELECTION, empty: true, value: on }, value: off });
  const layers: Json[] = [];
  if (behind.length) {
    layers.push({
      name: 'other_curves', data: { values: behind },
      mark: { type: 'line', color: pal.reference, strokeWidth: 0.8, opacity: 0.35 },
      encoding: { x: xEnc, y: { field: 'fitted', type: 'quantitative', axis: yAxis, scale: { zero: false } }, detail: { field: 'label', type: 'nominal' } },
    });
  }
  const pick = { name: LEGEND_SELECTION, select: { type: 'point', fields: ['label'] }, bind: 'legend' };
  // several fits of the same data share their points: drawn once, neutral; the fits differ by line colour and dash
  const sameData = set.kind === 'fits';
  if (lines.length) {
    layers.push({
      name: 'curve_lines', data: { values: lines },
      ...(sameData ? { params: [pick] } : {}),
      mark: { type: 'line', strokeWidth: 2 },
      encoding: {
        // groups: the lines take the same colours through their own `stroke` scale (resolved independent, same range and
        // order) without a legend, so the one legend is the points layer's, which holds the selection (a legend merged
        // from both layers loses its click binding, measured with vega-lite 6)
        x: xEnc, y: { field: 'fitted', type: 'quantitative', axis: yAxis, scale: { zero: false } }, ...(sameData ? { color } : { stroke: { ...color, legend: null } }),
        opacity: dim(1, 0.12), order: { field: 'x', type: 'quantitative' },
        ...(sameData ? { strokeDash: { field: 'label', type: 'nominal', sort: { field: 'order', op: 'min' }, scale: { range: labels.map((_, i) => DASHES[i % DASHES.length]) }, legend: (color as { legend: Json }).legend } } : {}),
      },
    });
  }
  const tooltip = [
    ...(sameData ? [] : [{ field: 'label', type: 'nominal', title: set.noun }]),
    { field: 'row', type: 'quantitative', title: 'CSV row' },
    { field: 'x', type: 'quantitative', title: set.predictor, format: NUM },
    { field: 'y', type: 'quantitative', title: set.response, format: NUM },
    ...(sameData ? [] : [{ field: 'fitted', type: 'quantitative', title: 'fitted', format: NUM }]),
  ];
  if (sameData) {
    const data = points.filter((p) => p.label === labels[0]);
    layers.push({ name: 'curve_points', data: { values: data }, mark: { type: 'point', filled: true, size: pointSize(data.length), color: pal.points, opacity: 0.85 }, encoding: { x: xEnc, y: { field: 'y', type: 'quantitative', axis: yAxis, scale: { zero: false } }, tooltip } });
  } else {
    layers.push({
      name: 'curve_points', data: { values: points },
      params: [pick],
      mark: { type: 'point', filled: true, size: pointSize(points.length) },
      encoding: { x: xEnc, y: { field: 'y', type: 'quantitative', axis: yAxis, scale: { zero: false } }, color, shape, opacity: dim(0.9, 0.1), tooltip },
    });
  }
  const notFitted = choice.shown.filter((c) => !c.fitted).length;
  const subtitle = [sameData
    ? 'Points: the data (the same for every fit); lines: the fitted curves, one colour and dash per fit. In the panel, click a legend entry to pick a fit (shift-click for more).'
    : `Points: data; lines: fitted curves, one colour and marker per ${set.noun}. In the panel, click a legend entry to pick a ${set.noun} (shift-click for more).`];
  if (choice.note) subtitle.push(choice.note);
  if (notFitted) subtitle.push(`${notFitted} ${set.noun}${notFitted === 1 ? '' : 's'} shown did not converge: points only, no curve.`);
  const title = set.kind === 'groups' ? `${set.name}: every ${set.noun}'s curve` : `Fits of the same data: ${set.name}`;
  const resolve = sameData ? {} : { resolve: { scale: { stroke: 'independent' }, legend: { stroke: 'independent' } } };
  return { id: 'overlay', title, spec: top(pal, title, wrapLines(subtitle, SUBTITLE_CHARS), opts.width ?? 560, opts.height ?? 320, { layer: layers, ...resolve }) };
}

/** Standardized residuals by curve: one column of points per curve, flagged curves in the highlight colour. */
export function residualsByCurveChart(set: CurveSet, opts: GroupChartOptions = {}): GroupChartSpec | null {
  const pal = opts.palette ?? PALETTE;
  const with_ = set.curves.filter((c) => c.points.some((p) => p.standardized !== null));
  if (!with_.length) return null;
  const curves = residualCurves(set.curves);
  const labels = curves.map((c) => c.label);
  const perCurve = pointsPerCurve(curves.length);
  const values = curves.flatMap((c: Curve, order) => thinPoints(c.points.filter((p) => p.standardized !== null), perCurve).map((p) => ({
    label: c.label, order, row: p.row, x: p.x, standardized: p.standardized, flagged: c.flags.length ? 'flagged' : 'ok',
  })));
  const { axis } = curveAxis(labels, set.noun);
  const x = { field: 'label', type: 'nominal', scale: { domain: [...labels] }, axis };
  const layers: Json[] = [
    { data: { values: [{ zero: 0 }] }, mark: { type: 'rule', color: pal.reference, strokeDash: [4, 3] }, encoding: { y: { field: 'zero', type: 'quantitative' } } },
    {
      name: 'residual_points', data: { values },
      mark: { type: 'point', filled: true, size: pointSize(values.length), opacity: 0.8 },
      encoding: {
        x, y: { field: 'standardized', type: 'quantitative', axis: axisTitle('standardized residual') },
        color: { field: 'flagged', type: 'nominal', scale: { domain: ['ok', 'flagged'], range: [pal.points, pal.highlight] }, legend: null },
        tooltip: [
          { field: 'label', type: 'nominal', title: set.noun },
          { field: 'row', type: 'quantitative', title: 'CSV row' },
          { field: 'x', type: 'quantitative', title: set.predictor, format: NUM },
          { field: 'standardized', type: 'quantitative', title: 'standardized residual', format: CHART_FORMAT.standardized },
        ],
      },
    },
  ];
  const missing = curves.filter((c) => !c.points.some((p) => p.standardized !== null)).length;
  const subtitle = [`Residual / s per point, by ${set.noun}; highlighted: flagged ${set.noun}s. A ${set.noun} whose column sits off zero or spreads wider than the rest fits worse.`];
  if (curves.length < set.curves.length) subtitle.push(`Showing ${curves.length} of ${set.curves.length} ${set.noun}s: the flagged ones first, then the first others (every ${set.noun} is in the table).`);
  if (missing) subtitle.push(`${missing} ${set.noun}${missing === 1 ? '' : 's'} without standardized residuals (not fitted): empty column.`);
  const title = `${set.kind === 'groups' ? set.name : 'Fits of the same data'}: residuals by ${set.noun}`;
  const width = Math.max(320, Math.min(MAX_ACROSS_WIDTH, labels.length * 14));
  return { id: 'residuals-by-group', title, spec: top(pal, title, wrapLines(subtitle, SUBTITLE_CHARS), width, Math.round((opts.height ?? 320) * 0.6), { layer: layers }) };
}

/** Curves in the residuals-by-group chart: a 384-well plate's worth. */
export const MAX_RESIDUAL_CURVES = 384;

/** The curves of a residuals-by-group chart: all up to MAX_RESIDUAL_CURVES, else the flagged ones first, then the first others, in set order. */
function residualCurves(all: readonly Curve[]): readonly Curve[] {
  if (all.length <= MAX_RESIDUAL_CURVES) return all;
  const flagged = all.filter((c) => c.flags.length > 0).slice(0, MAX_RESIDUAL_CURVES);
  const rest = all.filter((c) => c.flags.length === 0).slice(0, MAX_RESIDUAL_CURVES - flagged.length);
  const keep = new Set([...flagged, ...rest]);
  return all.filter((c) => keep.has(c));
}

/**
 * One chart per free parameter of a per-group fit: estimate ± one standard
 * error per group (group order), flagged groups highlighted, group labels on
 * the axis (`curveAxis`). Each datum carries `group`, so the panel opens that
 * group's fit on a click.
 */
export function groupParameterSpecs(fits: readonly FitResult[], table: GroupTable, opts: GroupChartOptions = {}): GroupChartSpec[] {
  const pal = opts.palette ?? PALETTE;
  const labels = table.rows.map((r) => r.group);
  const { axis } = curveAxis(labels, 'group');
  const width = Math.max(320, Math.min(MAX_ACROSS_WIDTH, labels.length * 16));
  return table.parameters.map((name, j) => {
    const values = table.rows.map((r, i) => {
      const est = r.estimates[j];
      const se = r.stderrs[j];
      return {
        group: r.group, order: i, estimate: est,
        low: est !== null && se !== null ? est - se : null,
        high: est !== null && se !== null ? est + se : null,
        se, flagged: r.flags.length > 0 ? 'flagged' : 'ok', flags: r.flags.join(', ') || 'none',
      };
    }).filter((v) => v.estimate !== null);
    const unit = fits.flatMap((f) => f.parameters).find((p) => p.name === name)?.unit;
    const x = { field: 'group', type: 'nominal', scale: { domain: [...labels] }, axis };
    const yAxis = axisTitle(unit ? `${name} [${unit}]` : name);
    const title = `${table.fit}: ${name} across groups`;
    const body = {
      data: { values },
      layer: [
        { mark: { type: 'rule', color: pal.reference }, encoding: { x, y: { field: 'low', type: 'quantitative', axis: yAxis, scale: { zero: false } }, y2: { field: 'high' } } },
        {
          name: 'group_points',
          mark: { type: 'point', filled: true, size: 46 },
          encoding: {
            x, y: { field: 'estimate', type: 'quantitative', axis: yAxis },
            color: { field: 'flagged', type: 'nominal', scale: { domain: ['ok', 'flagged'], range: [pal.points, pal.highlight] }, legend: null },
            tooltip: [
              { field: 'group', type: 'nominal', title: 'group' },
              { field: 'estimate', type: 'quantitative', title: name, format: CHART_FORMAT.value },
              { field: 'se', type: 'quantitative', title: 'standard error', format: CHART_FORMAT.uncertainty },
              { field: 'flags', type: 'nominal', title: 'flags' },
            ],
          },
        },
      ],
    };
    return { id: `group-${name}`, title, spec: top(pal, title, ['Point: estimate. Bar: ± one standard error. Highlighted: flagged groups.'], width, 180, body) };
  });
}
