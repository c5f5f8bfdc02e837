/**
 * Several curves drawn together: the groups of a per-group fit (`per COLUMN`),
 * several fits of the same data, and later the groups of a joint fit. The
 * overlay, the residuals-by-group chart and the plate map (group-charts.ts,
 * plate-charts.ts) read only this shape, so any source of curves plugs in by
 * building a `CurveSet`.
 *
 * Which curves an overlay draws (`overlayChoice`): all when there are at most
 * MAX_OVERLAY_CURVES (8, one per colour of palette.ts SERIES); with more, the
 * flagged curves first (in set order, at most 8), then the first unflagged
 * ones up to 8; the others are drawn as thin lines without points or legend
 * entry (at most MAX_BACKGROUND_CURVES of them), and a note says so.
 */
import type { FitResult, FitUnits } from '../../result';
import { fitStatus } from './summary';
import { keepExtremes, MAX_MARKS } from './downsample';

/** One drawn point of a curve; `row` is the CSV row number. */
export interface CurvePoint {
  row: number;
  x: number;
  y: number;
  fitted: number;
  residual: number;
  /** Standardized residual; null when the fit withholds it (not fitted). */
  standardized: number | null;
}

export interface CurveLinePoint {
  x: number;
  fitted: number;
}

export interface Curve {
  /** Group label, or the fit's name in a set of fits. */
  label: string;
  /** Panel key of the fit behind the curve: `name/group` or `name`. */
  key: string;
  /** The fit converged, so the curve is a fitted result (summary.ts `fitStatus`). */
  fitted: boolean;
  /** Flags of the curve (engine/groups/flags.ts codes); empty when none. */
  flags: string[];
  points: CurvePoint[];
  /** The fitted curve, ascending in x (the band grid when there is one, else the fitted values at the points); empty when not fitted. */
  line: CurveLinePoint[];
}

export interface CurveSet {
  /** `groups`: one fit's groups; `fits`: several fits of the same data. */
  kind: 'groups' | 'fits';
  /** Fit name (groups) or the fit names joined (fits). */
  name: string;
  response: string;
  predictor: string;
  /** Declared units of the response and predictor (the first fit's `units`; additive, optional). */
  units?: FitUnits;
  /** What a curve is called in notes: `group` or `fit`. */
  noun: 'group' | 'fit';
  curves: Curve[];
}

/** Curves drawn in colour with points and a legend entry. */
export const MAX_OVERLAY_CURVES = 8;
/** Further curves drawn as thin lines behind them. */
export const MAX_BACKGROUND_CURVES = 400;
/** Points kept per drawn line (an even stride through it). */
export const LINE_POINTS = 120;

const key = (f: FitResult): string => (f.group === undefined ? f.name : `${f.name}/${f.group}`);

/** A curve from one fit with a single predictor (null without one). */
export function curveOf(fit: FitResult, label: string, flags: readonly string[]): Curve | null {
  const p = fit.points;
  if (!p.x || !fit.predictor) return null;
  const fitted = fitStatus(fit) === 'fitted';
  const points: CurvePoint[] = [];
  for (let i = 0; i < p.y.length; i++) {
    if (!Number.isFinite(p.x[i]) || !Number.isFinite(p.y[i])) continue;
    const s = p.standardized[i];
    points.push({ row: p.row[i], x: p.x[i], y: p.y[i], fitted: p.fitted[i], residual: p.residual[i], standardized: fitted && Number.isFinite(s) ? s : null });
  }
  let line: CurveLinePoint[] = [];
  if (fitted) {
    const b = fit.bands;
    if (b && b.x.length > 1) line = b.x.map((x, i) => ({ x, fitted: b.fitted[i] }));
    else line = points.map((q) => ({ x: q.x, fitted: q.fitted }));
    line = line.filter((q) => Number.isFinite(q.x) && Number.isFinite(q.fitted)).sort((a, b2) => a.x - b2.x);
  }
  return { label, key: key(fit), fitted, flags: [...flags], points, line };
}

/** The curves of a per-group fit, in group order; `flags` by group label (the group table's). */
export function groupCurveSet(name: string, fits: readonly FitResult[], flags: ReadonlyMap<string, readonly string[]>): CurveSet | null {
  const first = fits[0];
  if (!first || !first.predictor || !first.points.x) return null;
  const curves = fits.map((f) => curveOf(f, f.group ?? f.name, flags.get(f.group ?? '') ?? [])).filter((c): c is Curve => c !== null);
  return curves.length ? { kind: 'groups', name, response: first.response, predictor: first.predictor, ...(first.units ? { units: first.units } : {}), noun: 'group', curves } : null;
}

/**
 * Single fits of the same data: same response, same predictor, the same CSV
 * rows with the same observed values. Each set of two or more such fits
 * becomes a CurveSet (fits in run order).
 */
export function sameDataFitSets(fits: readonly FitResult[]): CurveSet[] {
  const bySignature = new Map<string, FitResult[]>();
  for (const f of fits) {
    if (f.group !== undefined || !f.predictor || !f.points.x) continue;
    const sig = JSON.stringify([f.response, f.predictor, f.points.row, f.points.y]);
    const list = bySignature.get(sig);
    if (list) list.push(f);
    else bySignature.set(sig, [f]);
  }
  const out: CurveSet[] = [];
  for (const list of bySignature.values()) {
    if (list.length < 2) continue;
    const curves = list.map((f) => curveOf(f, f.name, f.stop.converged ? [] : ['not_converged'])).filter((c): c is Curve => c !== null);
    out.push({ kind: 'fits', name: list.map((f) => f.name).join(', '), response: list[0].response, predictor: list[0].predictor as string, ...(list[0].units ? { units: list[0].units } : {}), noun: 'fit', curves });
  }
  return out;
}

export interface OverlayChoice {
  /** Drawn in colour, in legend order. */
  shown: Curve[];
  /** Drawn as thin lines behind (only their line). */
  background: Curve[];
  /** Curves drawn neither way (beyond MAX_BACKGROUND_CURVES). */
  hidden: number;
  /** What is shown, for the chart's subtitle; null when every curve is shown. */
  note: string | null;
}

/** Which curves an overlay draws (rule in the module comment). */
export function overlayChoice(set: CurveSet, max = MAX_OVERLAY_CURVES, maxBackground = MAX_BACKGROUND_CURVES): OverlayChoice {
  const all = set.curves;
  if (all.length <= max) return { shown: [...all], background: [], hidden: 0, note: null };
  const flagged = all.filter((c) => c.flags.length > 0).slice(0, max);
  const rest = all.filter((c) => c.flags.length === 0).slice(0, max - flagged.length);
  const picked = new Set([...flagged, ...rest]);
  const shown = all.filter((c) => picked.has(c)); // set order
  const others = all.filter((c) => !picked.has(c));
  const background = others.filter((c) => c.line.length > 0).slice(0, maxBackground);
  const hidden = others.length - background.length;
  const n = set.noun;
  const parts = flagged.length ? [`the ${flagged.length} flagged ${n}${flagged.length === 1 ? '' : 's'}`] : [];
  if (rest.length) parts.push(`the first ${rest.length} ${flagged.length ? 'other ' : ''}${n}${rest.length === 1 ? '' : 's'}`);
  const behind = background.length ? ` Thin grey lines: the other ${background.length} ${n}s' curves.` : '';
  const missing = hidden ? ` ${hidden} ${n}${hidden === 1 ? '' : 's'} not drawn.` : '';
  return { shown, background, hidden, note: `Showing ${shown.length} of ${all.length} ${n}s in colour: ${parts.join(' and ')}.${behind}${missing} Every ${n} is in the table.` };
}

/** At most `max` entries of a line, evenly strided, both ends kept. */
export function thinLine<T>(line: readonly T[], max = LINE_POINTS): T[] {
  if (line.length <= max) return [...line];
  const out: T[] = [];
  for (let k = 0; k < max; k++) out.push(line[Math.round((k * (line.length - 1)) / (max - 1))]);
  return out;
}

/** At most `max` points of a curve, keeping each x bucket's ends and residual extremes (downsample.ts keepExtremes). */
export function thinPoints(points: readonly CurvePoint[], max: number): CurvePoint[] {
  if (points.length <= max) return [...points];
  const kept = keepExtremes(points.map((p) => p.x), points.map((p) => p.residual), Math.max(4, max));
  return kept.map((i) => points[i]);
}

/** Points allowed per curve so that a chart of `curves` stays within MAX_MARKS. */
export function pointsPerCurve(curves: number, maxMarks = MAX_MARKS): number {
  // at least 4 (keepExtremes keeps an x bucket's ends and residual extremes); with at most 384 curves drawn, ≤ 5000 + 1536 marks
  return Math.max(4, Math.floor(maxMarks / Math.max(1, curves)));
}
