/**
 * Data tables behind the charts, derived from a FitResult. Only what is drawn
 * is thinned (see downsample.ts); nothing here feeds back into statistics.
 */
import { normalQuantile } from '../../stats/distributions';
import type { FitResult } from '../../result';
import { keepExtremes, keepTails, MAX_MARKS } from './downsample';

/** One drawn data point; `row` is the CSV row number (header = row 1). */
export interface PointRow {
  row: number;
  x: number | null;
  y: number;
  fitted: number;
  residual: number;
  standardized: number;
}

export interface Thinned<T> {
  rows: T[];
  /** Points available before thinning (finite ones). */
  total: number;
  thinned: boolean;
}

export interface BandRow {
  x: number;
  fitted: number;
  confidenceLower: number;
  confidenceUpper: number;
  predictionLower: number;
  predictionUpper: number;
}

export interface QqRow {
  row: number;
  theoretical: number;
  standardized: number;
}

export interface BinRow {
  start: number;
  end: number;
  count: number;
}

export interface CurveRow {
  z: number;
  count: number;
}

const finite = (...v: number[]): boolean => v.every((n) => Number.isFinite(n));

/** All finite points, thinned by x (or by fitted value when there is no predictor), keeping residual extremes. */
export function pointRows(fit: FitResult, maxMarks = MAX_MARKS, by: 'x' | 'fitted' = 'x'): Thinned<PointRow> {
  const p = fit.points;
  const xs = p.x;
  const key = by === 'x' && xs ? xs : p.fitted;
  const n = p.y.length;
  // candidates: rows whose y, fitted, residual and key are finite (flat loop: 1e6-point results)
  const candidates = new Int32Array(n);
  let count = 0;
  for (let i = 0; i < n; i++) {
    if (Number.isFinite(p.y[i]) && Number.isFinite(p.fitted[i]) && Number.isFinite(p.residual[i]) && Number.isFinite(key[i])) candidates[count++] = i;
  }
  let kept: ArrayLike<number>;
  if (count === n) kept = keepExtremes(key, p.residual, maxMarks); // the usual case: no copies
  else {
    const keyed = new Float64Array(count);
    const values = new Float64Array(count);
    for (let k = 0; k < count; k++) {
      keyed[k] = key[candidates[k]];
      values[k] = p.residual[candidates[k]];
    }
    kept = keepExtremes(keyed, values, maxMarks).map((k) => candidates[k]);
  }
  const rows: PointRow[] = new Array(kept.length);
  for (let k = 0; k < kept.length; k++) {
    const i = kept[k];
    rows[k] = { row: p.row[i], x: xs ? xs[i] : null, y: p.y[i], fitted: p.fitted[i], residual: p.residual[i], standardized: p.standardized[i] };
  }
  return { rows, total: count, thinned: kept.length < count };
}

/** A row left out of the fit (weight 0), drawn apart from the fitted points. */
export interface ExcludedRow {
  row: number;
  x: number;
  y: number;
}

/**
 * The rows a fit left out (`FitResult.excluded`) with finite x and y, for the
 * data chart; at most `maxMarks`, evenly spaced in row order when there are more.
 */
export function excludedRows(fit: FitResult, maxMarks = MAX_MARKS): ExcludedRow[] {
  const e = fit.excluded;
  if (!e || !e.x) return [];
  const all: ExcludedRow[] = [];
  for (let i = 0; i < e.row.length; i++) if (Number.isFinite(e.x[i]) && Number.isFinite(e.y[i])) all.push({ row: e.row[i], x: e.x[i], y: e.y[i] });
  if (all.length <= maxMarks) return all;
  return Array.from({ length: maxMarks }, (_, k) => all[Math.floor((k * all.length) / maxMarks)]);
}

/**
 * Band rows with the fitted value and confidence band finite (ends that could
 * not be computed are dropped). The prediction band may be NaN throughout: a
 * fit whose sigma or weight reads a column other than the predictor has no
 * spread for a new point between the rows (engine/run/curve.ts).
 */
export function bandRows(fit: FitResult): BandRow[] {
  const b = fit.bands;
  if (!b) return [];
  const rows: BandRow[] = [];
  for (let i = 0; i < b.x.length; i++) {
    const r = {
      x: b.x[i],
      fitted: b.fitted[i],
      confidenceLower: b.confidenceLower[i],
      confidenceUpper: b.confidenceUpper[i],
      predictionLower: b.predictionLower[i],
      predictionUpper: b.predictionUpper[i],
    };
    if (finite(r.x, r.fitted, r.confidenceLower, r.confidenceUpper)) rows.push(r);
  }
  return rows;
}

/**
 * Normal Q-Q rows: sorted standardized residuals against standard normal
 * quantiles at Blom's plotting positions (i − 0.375)/(n + 0.25), i = 1..n
 * (G. Blom, Statistical Estimates and Transformed Beta-Variables, Wiley 1958).
 * n counts finite residuals; thinning keeps both tails (keepTails).
 */
export function qqRows(fit: FitResult, maxMarks = MAX_MARKS): Thinned<QqRow> {
  const p = fit.points;
  const std = p.standardized;
  let n = 0;
  for (let i = 0; i < std.length; i++) if (Number.isFinite(std[i])) n++;
  const sorted = new Float64Array(n);
  for (let i = 0, k = 0; i < std.length; i++) if (Number.isFinite(std[i])) sorted[k++] = std[i];
  sorted.sort(); // numeric ascending; a typed-array sort, ~20× faster than sorting {row, s} objects at 1e6
  const positions = keepTails(n, maxMarks);
  const at = pointsAtSortedPositions(std, sorted, positions);
  const rows = positions.map((k, j) => ({
    row: p.row[at[j]],
    theoretical: normalQuantile((k + 1 - 0.375) / (n + 0.25), 0, 1),
    standardized: std[at[j]], // the point's own value (a typed sort puts -0 before 0; a comparator sort keeps them tied)
  }));
  return { rows, total: n, thinned: rows.length < n };
}

/**
 * The data index of the point at each sorted position in `positions`, as a
 * stable sort of the finite points by value would place them: among equal
 * values (=== , so -0 ties with 0) the j-th in data order takes the j-th
 * position of that value. One pass over the data, touching only the values at
 * the wanted positions.
 */
function pointsAtSortedPositions(values: ArrayLike<number>, sorted: Float64Array, positions: readonly number[]): number[] {
  // value -> (occurrence index among equal values, in data order) -> slot in `positions`
  const wanted = new Map<number, Map<number, number>>();
  positions.forEach((k, slot) => {
    const v = sorted[k];
    let firstOfValue = k;
    while (firstOfValue > 0 && sorted[firstOfValue - 1] === v) firstOfValue--;
    let byOccurrence = wanted.get(v);
    if (!byOccurrence) wanted.set(v, (byOccurrence = new Map()));
    byOccurrence.set(k - firstOfValue, slot);
  });
  // Pre-filter: a bitmap over a 16-bit hash of each wanted value's bits, so most points
  // (a few thousand wanted values among a million) skip the Map lookup.
  const bitmap = new Uint8Array(1 << 16);
  for (const v of wanted.keys()) bitmap[valueHash16(v)] = 1;
  const out = new Array<number>(positions.length);
  const seen = new Map<number, number>();
  for (let i = 0; i < values.length; i++) {
    if (bitmap[valueHash16(values[i])] === 0) continue;
    const byOccurrence = wanted.get(values[i]);
    if (!byOccurrence) continue; // also skips NaN: never a wanted value
    const occurrence = seen.get(values[i]) ?? 0;
    seen.set(values[i], occurrence + 1);
    const slot = byOccurrence.get(occurrence);
    if (slot !== undefined) out[slot] = i;
  }
  return out;
}

const HASH_F64 = new Float64Array(1);
const HASH_U32 = new Uint32Array(HASH_F64.buffer);

/** 16-bit hash of a double's bits (Fibonacci hashing); -0 and 0 hash alike, as a Map treats them. */
function valueHash16(v: number): number {
  HASH_F64[0] = v === 0 ? 0 : v;
  return Math.imul(HASH_U32[0] ^ Math.imul(HASH_U32[1], 0x85ebca6b), 0x9e3779b1) >>> 16;
}

/**
 * Histogram of standardized residuals with Sturges' bin count
 * k = ⌈log2 n⌉ + 1 (H. A. Sturges, J. Amer. Statist. Assoc. 21, 1926), clamped to
 * [5, 40], over a symmetric range covering every value; plus the standard
 * normal density scaled to counts (n · bin width · φ(z)) for comparison.
 */
export function histogramRows(fit: FitResult): { bins: BinRow[]; curve: CurveRow[]; total: number } {
  const values = fit.points.standardized;
  let n = 0;
  let maxAbs = 3;
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (!Number.isFinite(v)) continue;
    n++;
    if (Math.abs(v) > maxAbs) maxAbs = Math.abs(v);
  }
  if (n === 0) return { bins: [], curve: [], total: 0 };
  const k = Math.min(40, Math.max(5, Math.ceil(Math.log2(n)) + 1));
  const half = Math.ceil(maxAbs * 2) / 2; // symmetric range, a multiple of 0.5
  const width = (2 * half) / k;
  const counts = new Array<number>(k).fill(0);
  for (let i = 0; i < values.length; i++) {
    const v = values[i];
    if (Number.isFinite(v)) counts[Math.min(k - 1, Math.floor((v + half) / width))] += 1;
  }
  const bins = counts.map((count, i) => ({ start: -half + i * width, end: -half + (i + 1) * width, count }));
  const curve: CurveRow[] = [];
  const steps = 120;
  for (let i = 0; i <= steps; i++) {
    const z = -half + (2 * half * i) / steps;
    curve.push({ z, count: (n * width * Math.exp(-0.5 * z * z)) / Math.sqrt(2 * Math.PI) });
  }
  return { bins, curve, total: n };
}

/**
 * Whether the predictor axis reads better on a log scale: all drawn x values
 * (data and band) positive and spanning more than three decades (max/min > 1000),
 * and the band grid (when there is one) dense on that scale - no gap between
 * neighbouring band points wider than 1/50 of the log range - so a curve
 * computed on an evenly spaced linear grid is never drawn as long chords.
 */
export function prefersLogX(points: readonly PointRow[], bands: readonly BandRow[]): boolean {
  let lo = Infinity;
  let hi = -Infinity;
  let count = 0;
  for (const v of [...points.map((r) => r.x), ...bands.map((r) => r.x)]) {
    if (v === null) continue;
    if (!(v > 0)) return false;
    lo = Math.min(lo, v);
    hi = Math.max(hi, v);
    count++;
  }
  if (count < 2 || hi / lo <= 1000) return false;
  const maxGap = Math.log10(hi / lo) / 50;
  for (let i = 1; i < bands.length; i++) {
    if (Math.log10(bands[i].x / bands[i - 1].x) > maxGap) return false;
  }
  return true;
}
