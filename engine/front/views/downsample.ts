/**
 * Downsampling for drawing only. Statistics are always computed on every point
 * (the engine never sees this module); charts of large data sets draw a subset
 * that keeps what the eye looks for.
 *
 * Bucket rule (`keepExtremes`): sort points by x, cut the x range into B equal-
 * width buckets with B = floor(maxMarks / 4), and keep from each bucket the
 * first and the last point in x order and the points with the smallest and the
 * largest value of the `value` array (e.g. the residual). At most 4 points per
 * bucket survive, so at most `maxMarks` in all; every global extreme of
 * `value` and both ends of the x range are kept, so outliers never vanish.
 * Non-finite x or value entries are skipped (they cannot be drawn).
 *
 * Sorted-sample rule (`keepTails`, for Q-Q plots): keep the `tail` smallest and
 * largest entries and an evenly strided subset of the middle.
 */

/** Default cap on drawn marks per layer. */
export const MAX_MARKS = 5000;

/**
 * Indices (ascending) of points to draw; all finite indices when there are at most `maxMarks`.
 * Written as flat loops over typed arrays (no per-point allocation): the panel
 * thins three charts of a 1e6-point result on every show (benchmark 10).
 */
export function keepExtremes(x: ArrayLike<number>, value: ArrayLike<number>, maxMarks = MAX_MARKS): number[] {
  const n = Math.min(x.length, value.length);
  let count = 0;
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < n; i++) {
    const xi = x[i];
    if (!Number.isFinite(xi) || !Number.isFinite(value[i])) continue;
    count++;
    if (xi < lo) lo = xi;
    if (xi > hi) hi = xi;
  }
  if (count <= maxMarks) {
    const all: number[] = [];
    for (let i = 0; i < n; i++) if (Number.isFinite(x[i]) && Number.isFinite(value[i])) all.push(i);
    return all;
  }

  const buckets = Math.max(1, Math.floor(maxMarks / 4));
  const width = (hi - lo) / buckets;
  // first, last, argmin, argmax per bucket; -1 = empty
  const first = new Int32Array(buckets).fill(-1);
  const last = new Int32Array(buckets).fill(-1);
  const argmin = new Int32Array(buckets).fill(-1);
  const argmax = new Int32Array(buckets).fill(-1);
  for (let i = 0; i < n; i++) {
    const xi = x[i];
    const vi = value[i];
    if (!Number.isFinite(xi) || !Number.isFinite(vi)) continue;
    const b = width > 0 ? Math.min(buckets - 1, Math.floor((xi - lo) / width)) : 0;
    if (first[b] < 0 || xi < x[first[b]]) first[b] = i;
    if (last[b] < 0 || xi >= x[last[b]]) last[b] = i;
    if (argmin[b] < 0 || vi < value[argmin[b]]) argmin[b] = i;
    if (argmax[b] < 0 || vi > value[argmax[b]]) argmax[b] = i;
  }
  const picked = new Int32Array(4 * buckets);
  let m = 0;
  for (let b = 0; b < buckets; b++) {
    if (first[b] >= 0) picked[m++] = first[b];
    if (last[b] >= 0) picked[m++] = last[b];
    if (argmin[b] >= 0) picked[m++] = argmin[b];
    if (argmax[b] >= 0) picked[m++] = argmax[b];
  }
  const sorted = picked.subarray(0, m).sort(); // numeric ascending for typed arrays
  const keep: number[] = [];
  for (let k = 0; k < m; k++) if (k === 0 || sorted[k] !== sorted[k - 1]) keep.push(sorted[k]);
  return keep;
}

/**
 * Positions (into an already sorted array of length n) to draw: all when
 * n ≤ maxMarks, else the `tail` lowest and highest and a stride through the
 * middle. `tail` defaults to 5 % of maxMarks.
 */
export function keepTails(n: number, maxMarks = MAX_MARKS, tail = Math.floor(maxMarks * 0.05)): number[] {
  if (n <= maxMarks) return Array.from({ length: n }, (_, i) => i);
  const t = Math.min(tail, Math.floor(maxMarks / 2));
  const middle = maxMarks - 2 * t;
  const out: number[] = [];
  for (let i = 0; i < t; i++) out.push(i);
  const span = n - 2 * t;
  for (let k = 0; k < middle; k++) out.push(t + Math.floor((k * span) / middle));
  for (let i = n - t; i < n; i++) out.push(i);
  return [...new Set(out)].sort((a, b) => a - b);
}

/** Whether a layer of `n` points will be thinned for drawing. */
export function isThinned(n: number, maxMarks = MAX_MARKS): boolean {
  return n > maxMarks;
}
