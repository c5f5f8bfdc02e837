/**
 * Small numerical helpers for starting values computed from data. They only
 * need to land the solver in the right basin; the fit itself refines them.
 * Every helper ignores non-finite pairs and returns null when it cannot
 * decide, so templates can fall back to a documented default.
 */

export interface XY {
  x: number[];
  y: number[];
}

/** Finite (x, y) pairs sorted by x. */
export function cleanPairs(x: ArrayLike<number>, y: ArrayLike<number>): XY {
  const idx: number[] = [];
  for (let i = 0; i < Math.min(x.length, y.length); i++) if (Number.isFinite(x[i]) && Number.isFinite(y[i])) idx.push(i);
  idx.sort((a, b) => x[a] - x[b]);
  return { x: idx.map((i) => x[i]), y: idx.map((i) => y[i]) };
}

/** Mean response per distinct x (replicates averaged), sorted by x. */
export function meansByX(d: XY): XY {
  const out: XY = { x: [], y: [] };
  let i = 0;
  while (i < d.x.length) {
    let j = i;
    let s = 0;
    while (j < d.x.length && d.x[j] === d.x[i]) s += d.y[j++];
    out.x.push(d.x[i]);
    out.y.push(s / (j - i));
    i = j;
  }
  return out;
}

/**
 * Ordinary least-squares line y = intercept + slope·x; null with fewer than 2
 * distinct x. Computed on x centred and divided by its largest deviation s
 * (u = (x − mean)/s, |u| ≤ 1), so x near 1e±300 neither under- nor overflows
 * in the sums of squares. Distinct x is decided relative to x's own size:
 * a spread s ≤ 1e-12·|mean x| counts as one x (rounding of a constant column).
 */
export function lineFit(x: readonly number[], y: readonly number[]): { intercept: number; slope: number } | null {
  const n = x.length;
  if (n < 2) return null;
  let mx = 0;
  let my = 0;
  for (let i = 0; i < n; i++) {
    mx += x[i] / n;
    my += y[i] / n;
  }
  let s = 0;
  for (let i = 0; i < n; i++) s = Math.max(s, Math.abs(x[i] - mx));
  if (!(s > 1e-12 * Math.abs(mx)) || !(s > 0) || !Number.isFinite(s)) return null;
  let suu = 0;
  let suy = 0;
  for (let i = 0; i < n; i++) {
    const u = (x[i] - mx) / s;
    suu += u * u;
    suy += u * (y[i] - my);
  }
  const slope = suy / suu / s;
  const r = { intercept: my - slope * mx, slope };
  return Number.isFinite(r.intercept) && Number.isFinite(r.slope) ? r : null;
}

/** Line fitted to transformed pairs (fx(x), fy(y)), keeping pairs where both are finite. */
export function transformedLine(d: XY, fx: (v: number) => number, fy: (v: number) => number): { intercept: number; slope: number } | null {
  const xs: number[] = [];
  const ys: number[] = [];
  for (let i = 0; i < d.x.length; i++) {
    const a = fx(d.x[i]);
    const b = fy(d.y[i]);
    if (Number.isFinite(a) && Number.isFinite(b)) {
      xs.push(a);
      ys.push(b);
    }
  }
  return lineFit(xs, ys);
}

/** Median of a non-empty array; NaN when empty. */
export function median(v: readonly number[]): number {
  if (v.length === 0) return NaN;
  const s = [...v].sort((a, b) => a - b);
  const m = s.length >> 1;
  return s.length % 2 ? s[m] : (s[m - 1] + s[m]) / 2;
}

/** Mean of the first (or last) `k` entries, k = max(1, round(fraction·n)). */
export function endMean(v: readonly number[], fraction: number, end: 'first' | 'last'): number {
  const k = Math.max(1, Math.round(fraction * v.length));
  const part = end === 'first' ? v.slice(0, k) : v.slice(v.length - k);
  return part.reduce((s, a) => s + a, 0) / part.length;
}

/**
 * First x where the piecewise-linear curve through sorted (x, y) crosses
 * `level`, interpolating linearly (in log x when `logX` and both x > 0).
 * Null when the curve never reaches the level.
 */
export function crossing(d: XY, level: number, logX = false): number | null {
  for (let i = 1; i < d.x.length; i++) {
    const a = d.y[i - 1] - level;
    const b = d.y[i] - level;
    if (a === 0) return d.x[i - 1];
    if (a * b <= 0 && a !== b) {
      const t = a / (a - b);
      const x0 = d.x[i - 1];
      const x1 = d.x[i];
      if (logX && x0 > 0 && x1 > 0) return Math.exp(Math.log(x0) + t * (Math.log(x1) - Math.log(x0)));
      return x0 + t * (x1 - x0);
    }
  }
  return null;
}

/**
 * Mean response of the points within `halfWidth` of `at` (the nearest point
 * when none is that close): a cheap local smoother for noisy data.
 */
export function localMean(d: XY, at: number, halfWidth: number): number {
  let s = 0;
  let n = 0;
  let nearest = 0;
  for (let i = 0; i < d.x.length; i++) {
    if (Math.abs(d.x[i] - at) <= halfWidth) {
      s += d.y[i];
      n++;
    }
    if (Math.abs(d.x[i] - at) < Math.abs(d.x[nearest] - at)) nearest = i;
  }
  return n > 0 ? s / n : d.y[nearest];
}
