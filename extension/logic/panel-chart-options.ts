/**
 * What the reader may switch on the charts of a fit in the results panel,
 * applied to the chart specs as JSON (the page calls these before drawing):
 *
 * - the residual kind of the two residual charts: raw (observed − fitted, in
 *   the response's unit), standardized (weighted residual / s, result.ts
 *   `PointTable.standardized`: what a weighted fit should be judged by, so it
 *   is the default of a weighted fit, common practice in calibration) or
 *   percent of the fitted value (100·residual/fitted; a point with fitted
 *   value 0 has none);
 * - the x axis of the fit chart and the residuals-against-predictor chart,
 *   linear or logarithmic (the views choose one from the data,
 *   engine/front/views/chart-data.ts `prefersLogX`; a logarithmic axis is
 *   offered only when every x drawn is positive).
 *
 * Pure: no DOM; the page keeps the choices in its saved state.
 */
import { CHART_FORMAT } from '../../engine/format';

export type ResidualKind = 'raw' | 'standardized' | 'percent';
export const RESIDUAL_KINDS: readonly ResidualKind[] = ['raw', 'standardized', 'percent'];

export const RESIDUAL_KIND_LABEL: Record<ResidualKind, string> = {
  raw: 'raw',
  standardized: 'standardized',
  percent: '% of fitted',
};

/** Axis title of each kind. */
export const RESIDUAL_AXIS: Record<ResidualKind, string> = {
  raw: 'residual (observed − fitted)',
  standardized: 'standardized residual (weighted residual / s)',
  percent: 'residual, % of the fitted value',
};

/** The datum field each kind plots (`percent` is added by `withPercent`). */
const FIELD: Record<ResidualKind, string> = { raw: 'residual', standardized: 'standardized', percent: 'percent' };

export type XScale = 'linear' | 'log';

/** Charts whose y axis is the residual. */
export const RESIDUAL_CHARTS: readonly string[] = ['residuals-predictor', 'residuals-fitted'];
/** Charts whose x axis is the predictor. */
export const PREDICTOR_CHARTS: readonly string[] = ['fit', 'residuals-predictor'];

type Json = Record<string, unknown>;
const isObject = (v: unknown): v is Json => typeof v === 'object' && v !== null && !Array.isArray(v);

/** The default residual kind: standardized for a weighted fit (or one with absolute σ) that converged, raw otherwise. */
export function defaultResidualKind(f: { weighted: boolean; converged: boolean }): ResidualKind {
  return f.weighted && f.converged ? 'standardized' : 'raw';
}

/** Residual kinds a fit can show: standardized residuals are withheld for a fit that did not converge. */
export function residualKinds(converged: boolean): ResidualKind[] {
  return converged ? [...RESIDUAL_KINDS] : ['raw', 'percent'];
}

function layers(spec: Json): Json[] {
  return Array.isArray(spec.layer) ? (spec.layer as unknown[]).filter(isObject) : [];
}

/** Adds `percent` (100·residual/fitted, null where fitted is 0 or not finite) to the point data of a residual chart (mutates the copy). */
export function withPercent(spec: Json): Json {
  for (const l of layers(spec)) {
    if (l.name !== 'data_points' || !isObject(l.data) || !Array.isArray(l.data.values)) continue;
    l.data.values = (l.data.values as unknown[]).map((v) => {
      if (!isObject(v)) return v;
      const r = v.residual;
      const f = v.fitted;
      const pct = typeof r === 'number' && typeof f === 'number' && f !== 0 && Number.isFinite(r / f) ? (100 * r) / f : null;
      return { ...v, percent: pct };
    });
  }
  return spec;
}

/** A copy of residual chart `spec` plotting `kind` (the tooltip lists all three). */
export function withResidualKind(spec: Json, kind: ResidualKind): Json {
  const out = structuredClone(spec) as Json;
  for (const l of layers(out)) {
    if (l.name !== 'data_points' || !isObject(l.encoding) || !isObject(l.encoding.y)) continue;
    const y = l.encoding.y;
    y.field = FIELD[kind];
    y.axis = { ...(isObject(y.axis) ? y.axis : {}), title: RESIDUAL_AXIS[kind] };
    if (Array.isArray(l.encoding.tooltip) && !(l.encoding.tooltip as unknown[]).some((t) => isObject(t) && t.field === 'percent')) {
      l.encoding.tooltip = [...(l.encoding.tooltip as unknown[]), { field: 'percent', type: 'quantitative', title: '% of fitted', format: CHART_FORMAT.standardized }];
    }
  }
  return out;
}

/** Every x-encoding of the chart's layers (the spec's own objects). */
function xEncodings(spec: Json): Json[] {
  const out: Json[] = [];
  for (const l of layers(spec)) if (isObject(l.encoding) && isObject(l.encoding.x)) out.push(l.encoding.x);
  return out;
}

/** The x scale a chart is drawn with. */
export function xScaleOf(spec: Json): XScale {
  return xEncodings(spec).some((x) => isObject(x.scale) && x.scale.type === 'log') ? 'log' : 'linear';
}

/** Whether a logarithmic x axis can draw every point and band of the chart (all x positive). */
export function canLogX(spec: Json): boolean {
  let any = false;
  for (const l of layers(spec)) {
    const x = isObject(l.encoding) && isObject(l.encoding.x) ? l.encoding.x.field : undefined;
    if (typeof x !== 'string' || !isObject(l.data) || !Array.isArray(l.data.values)) continue;
    for (const v of l.data.values as unknown[]) {
      const n = isObject(v) ? v[x] : undefined;
      if (typeof n !== 'number') continue;
      if (!(n > 0)) return false;
      any = true;
    }
  }
  return any;
}

/** A copy of `spec` with its x axis linear or logarithmic. */
export function withXScale(spec: Json, scale: XScale): Json {
  const out = structuredClone(spec) as Json;
  for (const x of xEncodings(out)) {
    const rest = isObject(x.scale) ? { ...x.scale } : {};
    delete rest.type;
    delete rest.zero;
    x.scale = scale === 'log' ? { ...rest, type: 'log' } : { ...rest, zero: false };
  }
  return out;
}
