/**
 * Vega-Lite (v6) chart specs for one FitResult. The CLI renders them to SVG
 * (svg.ts) and the editor's results panel embeds the very same specs, mapping
 * palette roles to theme colours. Data travels inline, already thinned for
 * drawing (chart-data.ts); tooltips always carry the CSV row number.
 *
 * Charts, in order: data with fitted curve and bands (or observed against
 * fitted when the model has no single predictor), residuals against the
 * predictor, residuals against fitted values, normal Q-Q plot of standardized
 * residuals, histogram of standardized residuals.
 *
 * A fit that did not converge (summary.ts `fitStatus`) gets the data chart
 * without any curve, titled "not fitted", and, when the solver moved, the
 * residual charts titled "at the last iterate (not a fitted result)"; no Q-Q
 * plot or histogram (its standardized residuals are withheld). The x axis
 * (linear or logarithmic) is chosen from the data alone, so a fit and the
 * same fit failed draw the same axes.
 *
 * User text (column, fit and group names) appears only as label text: chart
 * titles and axis titles (`axis.title`, through `chartLabel`), and tooltip
 * titles, which never reach Vega-Lite's compiler (svg.ts drops tooltips, the
 * panel formats them itself). Data is addressed by fixed field names (`x`,
 * `y`, `fitted`, …), and encoding channels carry no `title`: Vega-Lite builds
 * expression source from those (the ARIA descriptions, tooltip objects), where
 * a name such as `then`, `constructor` or one ending in a backslash broke the
 * chart.
 */
import type { TopLevelSpec } from 'vega-lite';
import type { FitResult } from '../../result';
import { bandRows, excludedRows, histogramRows, pointRows, prefersLogX, qqRows, type PointRow, type Thinned } from './chart-data';
import { fitStatus } from './summary';
import { predictorUnit, responseUnit, withUnit } from './units';
import { MAX_MARKS } from './downsample';
import { CHART_FORMAT, formatLevel } from '../../format';
import { FONT, PALETTE, type Palette } from './palette';
import { chartLabel } from './escape';

export type ChartId = 'fit' | 'observed-fitted' | 'residuals-predictor' | 'residuals-fitted' | 'normal-qq' | 'histogram';

export const CHART_IDS: readonly ChartId[] = ['fit', 'observed-fitted', 'residuals-predictor', 'residuals-fitted', 'normal-qq', 'histogram'];
export function isChartId(s: string): s is ChartId {
  return (CHART_IDS as readonly string[]).includes(s);
}

export interface ChartOptions {
  /** Plot width in pixels. Default 560. */
  width?: number;
  /** Plot height of the main chart in pixels; residual charts use 60 % of it. Default 320. */
  height?: number;
  /** Cap on drawn marks per layer. Default 5000 (see downsample.ts). */
  maxMarks?: number;
  /** Colours by role. Default PALETTE. */
  palette?: Palette;
}

export interface ChartSpec {
  id: ChartId;
  title: string;
  spec: TopLevelSpec;
}

import { HEADLESS_CHAR_PX, wrapSubtitle, wrapTitle } from './wrap';

const SCHEMA = 'https://vega.github.io/schema/vega-lite/v6.json';
const NUM = CHART_FORMAT.value;

export type Json = Record<string, unknown>;

/** The chart config of every chart (colours by palette role, font). */
export function config(pal: Palette): Json {
  return {
    background: pal.background,
    font: FONT,
    view: { stroke: null },
    title: { color: pal.foreground, subtitleColor: pal.muted, anchor: 'start', fontSize: 14, fontWeight: 600, subtitleFontSize: 11, offset: 8 },
    axis: {
      labelColor: pal.muted, titleColor: pal.foreground, gridColor: pal.grid, domainColor: pal.reference,
      tickColor: pal.reference, titleFontWeight: 'normal', titleFontSize: 11, labelFontSize: 10,
    },
    legend: { labelColor: pal.muted, titleColor: pal.foreground, titleFontWeight: 'normal' },
  };
}

/** An axis title: user text as a label only. */
export const axisTitle = (text: string): Json => ({ title: chartLabel(text) });

/** A top-level spec: title (user text as a label), subtitle lines, size, config and body. */
export function top(pal: Palette, title: string, subtitle: string[], width: number, height: number, body: Json): TopLevelSpec {
  // the title (anchored at the plot's left edge) wrapped to the plot's width, a long fit name cut with an ellipsis, so the plot sets the
  // chart's width; the full title stays in the chart's `title`, which the SVG carries as its <title> (svg.ts)
  const wrapped = wrapTitle(title, width);
  const t: Json = { text: wrapped.lines.length === 1 ? chartLabel(wrapped.lines[0]) : wrapped.lines.map(chartLabel) };
  // wrapped to the plot and its y axis (about 50 px) as the headless renderer measures text, so a long line
  // does not widen the chart (wrap.ts); the panel wraps again for its own width and fonts
  if (subtitle.length) t.subtitle = wrapSubtitle(subtitle, width + 50, HEADLESS_CHAR_PX);
  return { $schema: SCHEMA, title: t, width, height, config: config(pal), ...body } as unknown as TopLevelSpec;
}

function thinNote(t: Thinned<unknown>, noun = 'points'): string[] {
  if (!t.thinned) return [];
  return [`Drawing ${t.rows.length} of ${t.total} ${noun} (extremes kept); statistics use all of them.`];
}

export function pointSize(n: number): number {
  return n <= 60 ? 48 : n <= 500 ? 28 : n <= 2000 ? 14 : 8;
}

function groupSuffix(fit: FitResult): string {
  return fit.group !== undefined ? ` (${fit.group})` : '';
}

const rowTip = { field: 'row', type: 'quantitative', title: 'CSV row' };

function pointLayer(name: string, pal: Palette, n: number, x: Json, y: Json, tooltip: Json[], color = pal.points): Json {
  return {
    name,
    mark: { type: 'point', filled: true, size: pointSize(n), color, opacity: 0.85 },
    encoding: { x, y, tooltip: [rowTip, ...tooltip] },
  };
}

function zeroRule(pal: Palette): Json {
  return { data: { values: [{ zero: 0 }] }, mark: { type: 'rule', color: pal.reference, strokeDash: [4, 3] }, encoding: { y: { field: 'zero', type: 'quantitative' } } };
}

/** (a) Data, fitted curve, confidence and prediction bands. */
function fitChart(fit: FitResult, o: ChartContext): ChartSpec | null {
  if (!fit.points.x || !fit.predictor) return null;
  const pal = o.palette;
  const pts = o.points('x');
  const fitted = fitStatus(fit) === 'fitted';
  const bands = fitted ? bandRows(fit) : [];
  const xName = fit.predictor;
  const level = formatLevel(fit.level);
  const xScale = prefersLogX(pts.rows, []) ? { type: 'log' } : { zero: false };
  const xEnc = { field: 'x', type: 'quantitative', axis: axisTitle(withUnit(xName, predictorUnit(fit))), scale: xScale };
  const yTitle = withUnit(fit.response, responseUnit(fit));
  const yAxis = axisTitle(yTitle);
  const layers: Json[] = [];
  // No prediction band when the spread of a new point is unknown between the rows (sigma or weight of another column).
  const predictionBand = bands.length > 0 && bands.every((r) => Number.isFinite(r.predictionLower) && Number.isFinite(r.predictionUpper));
  if (bands.length) {
    if (predictionBand) layers.push({
      name: 'prediction_band', data: { values: bands },
      mark: { type: 'area', color: pal.predictionBand, opacity: 0.55 },
      encoding: { x: xEnc, y: { field: 'predictionLower', type: 'quantitative', axis: yAxis, scale: { zero: false } }, y2: { field: 'predictionUpper' } },
    });
    layers.push({
      name: 'confidence_band', data: { values: bands },
      mark: { type: 'area', color: pal.confidenceBand, opacity: 0.55 },
      encoding: { x: xEnc, y: { field: 'confidenceLower', type: 'quantitative', axis: yAxis }, y2: { field: 'confidenceUpper' } },
    });
    layers.push({
      name: 'fitted_curve', data: { values: bands },
      mark: { type: 'line', color: pal.curve, strokeWidth: 2 },
      encoding: { x: xEnc, y: { field: 'fitted', type: 'quantitative', axis: yAxis }, order: { field: 'x', type: 'quantitative' } },
    });
  } else if (fitted) {
    const curve = [...pts.rows].sort((a, b) => (a.x as number) - (b.x as number));
    layers.push({
      name: 'fitted_curve', data: { values: curve },
      mark: { type: 'line', color: pal.curve, strokeWidth: 2 },
      encoding: { x: xEnc, y: { field: 'fitted', type: 'quantitative', axis: yAxis, scale: { zero: false } }, order: { field: 'x', type: 'quantitative' } },
    });
  }
  layers.push({
    data: { values: pts.rows },
    ...pointLayer('data_points', pal, pts.rows.length, xEnc, { field: 'y', type: 'quantitative', axis: yAxis, scale: { zero: false } }, [
      { field: 'x', type: 'quantitative', title: xName, format: NUM },
      { field: 'y', type: 'quantitative', title: yTitle, format: NUM },
      { field: 'fitted', type: 'quantitative', title: 'fitted', format: NUM },
      { field: 'residual', type: 'quantitative', title: 'residual', format: NUM },
    ]),
  });
  const left = excludedRows(fit, o.maxMarks);
  if (left.length) {
    layers.push({
      name: 'excluded_points', data: { values: left },
      mark: { type: 'point', filled: false, size: pointSize(left.length), color: pal.points, opacity: 0.85 },
      encoding: { x: xEnc, y: { field: 'y', type: 'quantitative' }, tooltip: [rowTip, { field: 'x', type: 'quantitative', title: xName, format: NUM }, { field: 'y', type: 'quantitative', title: yTitle, format: NUM }] },
    });
  }
  const subtitle = !fitted
    ? ['Points: data. No curve: the fit did not converge, so there is no fitted curve to draw.']
    : bands.length && predictionBand
      ? [`Points: data. Line: fitted curve. Dark shade: ${level} confidence band; light shade: ${level} prediction band.`]
      : bands.length
        ? [`Points: data. Line: fitted curve. Shade: ${level} confidence band. No prediction band: the spread of a new point comes from a column other than ${xName} (sigma or weight), so it is known only where a query states it.`]
        : ['Points: data. Line: fitted values.'];
  if (left.length) subtitle.push(`Hollow points: ${left.length} row${left.length === 1 ? '' : 's'} left out of the fit (weight 0).`);
  const title = fitted ? `${fit.name}${groupSuffix(fit)}: data and fitted curve` : `${fit.name}${groupSuffix(fit)}: data (not fitted)`;
  return { id: 'fit', title, spec: top(pal, title, [...subtitle, ...thinNote(pts)], o.width, o.height, { layer: layers }) };
}

/** (a') Observed against fitted values, for models without a single predictor. */
function observedFittedChart(fit: FitResult, o: ChartContext): ChartSpec {
  const pal = o.palette;
  const pts = o.points('fitted');
  let lo = Infinity;
  let hi = -Infinity;
  for (const r of pts.rows) {
    lo = Math.min(lo, r.y, r.fitted);
    hi = Math.max(hi, r.y, r.fitted);
  }
  const diagonal = Number.isFinite(lo) ? [{ a: lo, b: lo }, { a: hi, b: hi }] : [];
  const layers: Json[] = [
    { data: { values: diagonal }, mark: { type: 'line', color: pal.reference, strokeDash: [4, 3] }, encoding: { x: { field: 'a', type: 'quantitative' }, y: { field: 'b', type: 'quantitative' } } },
    {
      data: { values: pts.rows },
      ...pointLayer('data_points', pal, pts.rows.length,
        { field: 'fitted', type: 'quantitative', axis: axisTitle(withUnit('fitted value', responseUnit(fit))), scale: { zero: false } },
        { field: 'y', type: 'quantitative', axis: axisTitle(withUnit(`observed ${fit.response}`, responseUnit(fit))), scale: { zero: false } },
        [{ field: 'y', type: 'quantitative', title: 'observed', format: NUM }, { field: 'fitted', type: 'quantitative', title: 'fitted', format: NUM }]),
    },
  ];
  const fitted = fitStatus(fit) === 'fitted';
  const title = fitted ? `${fit.name}${groupSuffix(fit)}: observed against fitted` : `${fit.name}${groupSuffix(fit)}: observed against the last iterate (not a fitted result)`;
  const hint = fitted ? 'Points on the dashed line are fitted exactly.' : 'The fit did not converge: the horizontal axis holds the model where the solver stopped.';
  return { id: 'observed-fitted', title, spec: top(pal, title, [hint, ...thinNote(pts)], o.width, o.height, { layer: layers }) };
}

/** (b) and (c) Residuals against the predictor or against fitted values. */
function residualChart(fit: FitResult, o: ChartContext, against: 'x' | 'fitted'): ChartSpec | null {
  if (against === 'x' && (!fit.points.x || !fit.predictor)) return null;
  const pal = o.palette;
  const pts = o.points(against);
  const xTitle = against === 'x' ? (fit.predictor as string) : 'fitted value';
  const xEnc = { field: against, type: 'quantitative', axis: axisTitle(withUnit(xTitle, against === 'x' ? predictorUnit(fit) : responseUnit(fit))), scale: against === 'x' && prefersLogX(pts.rows, []) ? { type: 'log' } : { zero: false } };
  const layers: Json[] = [
    zeroRule(pal),
    {
      data: { values: pts.rows },
      ...pointLayer('data_points', pal, pts.rows.length, xEnc, { field: 'residual', type: 'quantitative', axis: axisTitle(responseUnit(fit) ? `residual (observed − fitted, ${responseUnit(fit)})` : 'residual (observed − fitted)') }, [
        { field: against, type: 'quantitative', title: xTitle, format: NUM },
        { field: 'residual', type: 'quantitative', title: 'residual', format: NUM },
        { field: 'standardized', type: 'quantitative', title: 'standardized', format: CHART_FORMAT.standardized },
      ]),
    },
  ];
  const id: ChartId = against === 'x' ? 'residuals-predictor' : 'residuals-fitted';
  const fitted = fitStatus(fit) === 'fitted';
  const title = `${fit.name}${groupSuffix(fit)}: residuals against ${xTitle}${fitted ? '' : ' at the last iterate (not a fitted result)'}`;
  const hint = fitted
    ? 'A pattern (curve, funnel, runs) suggests the model or the weights miss something.'
    : 'The fit did not converge: these are the residuals where the solver stopped, not those of a fitted model.';
  return { id, title, spec: top(pal, title, [hint, ...thinNote(pts)], o.width, Math.round(o.height * 0.6), { layer: layers }) };
}

/** (d) Normal Q-Q plot of standardized residuals with the line y = x. */
function qqChart(fit: FitResult, o: ChartContext): ChartSpec {
  const pal = o.palette;
  const qq = qqRows(fit, o.maxMarks);
  let lo = -2;
  let hi = 2;
  for (const r of qq.rows) {
    lo = Math.min(lo, r.theoretical, r.standardized);
    hi = Math.max(hi, r.theoretical, r.standardized);
  }
  const layers: Json[] = [
    { data: { values: [{ a: lo, b: lo }, { a: hi, b: hi }] }, mark: { type: 'line', color: pal.reference, strokeDash: [4, 3] }, encoding: { x: { field: 'a', type: 'quantitative' }, y: { field: 'b', type: 'quantitative' } } },
    {
      data: { values: qq.rows },
      ...pointLayer('data_points', pal, qq.rows.length,
        { field: 'theoretical', type: 'quantitative', axis: axisTitle('normal quantile') },
        { field: 'standardized', type: 'quantitative', axis: axisTitle('standardized residual') },
        [{ field: 'theoretical', type: 'quantitative', title: 'normal quantile', format: CHART_FORMAT.standardized }, { field: 'standardized', type: 'quantitative', title: 'standardized residual', format: CHART_FORMAT.standardized }]),
    },
  ];
  const title = `${fit.name}${groupSuffix(fit)}: residuals against a normal distribution`;
  const hint = "Points near the dashed line: residuals look normal. Plotting positions (i − 0.375)/(n + 0.25) (Blom).";
  return { id: 'normal-qq', title, spec: top(pal, title, [hint, ...thinNote(qq)], Math.round(o.height * 1.1), Math.round(o.height * 1.1), { layer: layers }) };
}

/** (e) Histogram of standardized residuals with the standard normal curve. */
function histogramChart(fit: FitResult, o: ChartContext): ChartSpec {
  const pal = o.palette;
  const h = histogramRows(fit);
  const layers: Json[] = [
    {
      name: 'bars', data: { values: h.bins },
      mark: { type: 'rect', color: pal.bars, opacity: 0.85, stroke: pal.background, strokeWidth: 1 },
      encoding: {
        x: { field: 'start', type: 'quantitative', axis: axisTitle('standardized residual') }, x2: { field: 'end' },
        y: { field: 'count', type: 'quantitative', axis: axisTitle('number of points') },
        tooltip: [{ field: 'start', type: 'quantitative', title: 'from', format: CHART_FORMAT.binEdge }, { field: 'end', type: 'quantitative', title: 'to', format: CHART_FORMAT.binEdge }, { field: 'count', type: 'quantitative', title: 'points' }],
      },
    },
    { name: 'normal_curve', data: { values: h.curve }, mark: { type: 'line', color: pal.curve, strokeWidth: 1.5 }, encoding: { x: { field: 'z', type: 'quantitative' }, y: { field: 'count', type: 'quantitative' } } },
  ];
  const title = `${fit.name}${groupSuffix(fit)}: how the residuals are spread`;
  const hint = `${h.total} standardized residuals; the line is the normal curve they would follow ideally.`;
  return { id: 'histogram', title, spec: top(pal, title, [hint], o.width, Math.round(o.height * 0.6), { layer: layers }) };
}

/** All charts for one fit, in display order. */
/** Chart options with defaults, plus the thinned point rows shared by the charts (by x: the fit and residual charts). */
type ChartContext = Required<ChartOptions> & { points(by: 'x' | 'fitted'): Thinned<PointRow> };

export function chartSpecs(fit: FitResult, opts: ChartOptions = {}): ChartSpec[] {
  const maxMarks = opts.maxMarks ?? MAX_MARKS;
  const thinned = new Map<'x' | 'fitted', Thinned<PointRow>>();
  const o: ChartContext = {
    width: opts.width ?? 560,
    height: opts.height ?? 320,
    maxMarks,
    palette: opts.palette ?? PALETTE,
    points(by) {
      let t = thinned.get(by);
      if (!t) thinned.set(by, (t = pointRows(fit, maxMarks, by)));
      return t;
    },
  };
  const status = fitStatus(fit);
  const out: (ChartSpec | null)[] = status === 'fitted'
    ? [fitChart(fit, o) ?? observedFittedChart(fit, o), residualChart(fit, o, 'x'), residualChart(fit, o, 'fitted'), qqChart(fit, o), histogramChart(fit, o)]
    : status === 'last_iterate'
      ? [fitChart(fit, o) ?? observedFittedChart(fit, o), residualChart(fit, o, 'x'), residualChart(fit, o, 'fitted')]
      : [fitChart(fit, o)];
  return out.filter((c): c is ChartSpec => c !== null);
}

/**
 * Chart file name `<fit>[-<group>]-<chart>.svg`, the same for the same names
 * in every run, and different for different names. A name made only of
 * letters, digits, `_`, `.` and `-` (not starting with `.` or `-`, at most 64
 * characters) is used as it is; any other name is written with other
 * characters as `_`, cut to 64 characters, and followed by `~` and a hash of
 * the exact name. So groups `a b` and `a_b` get `a_b~…` and `a_b`. (Two
 * names that differ only in letter case, `A` and `a`, share a file on a
 * case-insensitive file system.)
 */
export function chartFileName(fit: FitResult, id: ChartId): string {
  const group = fit.group !== undefined ? `-${fileStem(fit.group)}` : '';
  return `${fileStem(fit.name)}${group}-${id}.svg`;
}

const PLAIN_STEM = /^[A-Za-z0-9_][A-Za-z0-9_.-]{0,63}$/;

/** A file-name piece for `name` (see chartFileName). */
export function fileStem(name: string): string {
  if (PLAIN_STEM.test(name)) return name;
  const cleaned = name.replace(/[^A-Za-z0-9_.-]+/g, '_').replace(/^[.-]+/, '_').slice(0, 64);
  return `${cleaned || '_'}~${hash32(name)}`;
}

/** FNV-1a over the UTF-16 code units, 32 bits as 8 hex digits (a file-name tag, not a security measure). */
function hash32(s: string): string {
  let h = 0x811c9dc5;
  for (let i = 0; i < s.length; i++) {
    h ^= s.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return (h >>> 0).toString(16).padStart(8, '0');
}
