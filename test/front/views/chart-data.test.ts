/**
 * The chart tables of engine/front/views/chart-data.ts (flat typed-array loops, for
 * 1e6-point results) against plain reference versions written the obvious
 * way: filter, object arrays, a stable comparator sort. Random tables with
 * ties (values drawn from a few levels), non-finite entries and sizes around
 * the mark cap must give identical rows.
 */
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import normalQuantile from '@stdlib/stats-base-dists-normal-quantile';
import type { FitResult } from '../../../engine/result';
import { histogramRows, pointRows, qqRows } from '../../../engine/front/views/chart-data';
import { keepTails } from '../../../engine/front/views/downsample';

/** Reference bucket rule (downsample.ts module comment), with a Set and a comparator sort. */
function refKeepExtremes(x: number[], value: number[], maxMarks: number): number[] {
  const finite: number[] = [];
  for (let i = 0; i < x.length; i++) if (Number.isFinite(x[i]) && Number.isFinite(value[i])) finite.push(i);
  if (finite.length <= maxMarks) return finite;
  const buckets = Math.max(1, Math.floor(maxMarks / 4));
  const lo = Math.min(...finite.map((i) => x[i]));
  const hi = Math.max(...finite.map((i) => x[i]));
  const width = (hi - lo) / buckets;
  const pick: Record<string, number>[] = Array.from({ length: buckets }, () => ({}));
  for (const i of finite) {
    const b = width > 0 ? Math.min(buckets - 1, Math.floor((x[i] - lo) / width)) : 0;
    const s = pick[b];
    if (s.first === undefined || x[i] < x[s.first]) s.first = i;
    if (s.last === undefined || x[i] >= x[s.last]) s.last = i;
    if (s.min === undefined || value[i] < value[s.min]) s.min = i;
    if (s.max === undefined || value[i] > value[s.max]) s.max = i;
  }
  return [...new Set(pick.flatMap((s) => Object.values(s)))].sort((a, b) => a - b);
}

function refPointRows(p: FitResult['points'], maxMarks: number, by: 'x' | 'fitted') {
  const key = by === 'x' && p.x ? p.x : p.fitted;
  const candidates = p.y.map((_, i) => i).filter((i) => [p.y[i], p.fitted[i], p.residual[i], key[i]].every(Number.isFinite));
  const kept = refKeepExtremes(candidates.map((i) => key[i]), candidates.map((i) => p.residual[i]), maxMarks).map((k) => candidates[k]);
  const rows = kept.map((i) => ({ row: p.row[i], x: p.x ? p.x[i] : null, y: p.y[i], fitted: p.fitted[i], residual: p.residual[i], standardized: p.standardized[i] }));
  return { rows, total: candidates.length, thinned: kept.length < candidates.length };
}

function refQqRows(p: FitResult['points'], maxMarks: number) {
  const items = p.standardized.map((s, i) => ({ row: p.row[i], s })).filter((it) => Number.isFinite(it.s));
  items.sort((a, b) => a.s - b.s); // stable (ECMAScript 2019)
  const n = items.length;
  const rows = keepTails(n, maxMarks).map((k) => ({ row: items[k].row, theoretical: normalQuantile((k + 1 - 0.375) / (n + 0.25), 0, 1), standardized: items[k].s }));
  return { rows, total: n, thinned: rows.length < n };
}

function refHistogramCounts(values: number[]): number[] {
  const v = values.filter(Number.isFinite);
  const k = Math.min(40, Math.max(5, Math.ceil(Math.log2(v.length)) + 1));
  const half = Math.ceil(Math.max(3, ...v.map(Math.abs)) * 2) / 2;
  const width = (2 * half) / k;
  const counts = new Array<number>(k).fill(0);
  for (const z of v) counts[Math.min(k - 1, Math.floor((z + half) / width))]++;
  return counts;
}

/** A value from a few levels (ties), a free double, or a non-finite entry. */
const cell = fc.oneof(
  { weight: 3, arbitrary: fc.constantFrom(-2, -0.5, 0, -0, 0.5, 1.25) },
  { weight: 6, arbitrary: fc.double({ min: -5, max: 5, noNaN: true }) },
  { weight: 1, arbitrary: fc.constantFrom(NaN, Infinity, -Infinity) },
);

const table = fc.integer({ min: 1, max: 700 }).chain((n) =>
  fc.record({
    x: fc.option(fc.array(cell, { minLength: n, maxLength: n }), { nil: null }),
    y: fc.array(cell, { minLength: n, maxLength: n }),
    fitted: fc.array(cell, { minLength: n, maxLength: n }),
    residual: fc.array(cell, { minLength: n, maxLength: n }),
    standardized: fc.array(cell, { minLength: n, maxLength: n }),
  }),
);

function pointsOf(t: { x: number[] | null; y: number[]; fitted: number[]; residual: number[]; standardized: number[] }): FitResult['points'] {
  return { ...t, row: t.y.map((_, i) => i + 2) } as unknown as FitResult['points'];
}
const fitOf = (points: FitResult['points']) => ({ points }) as unknown as FitResult;

describe('views/chart-data against reference versions', () => {
  it('pointRows: the same rows by x and by fitted value (property)', () => {
    fc.assert(
      fc.property(table, fc.integer({ min: 4, max: 300 }), (t, maxMarks) => {
        const p = pointsOf(t);
        for (const by of ['x', 'fitted'] as const) expect(pointRows(fitOf(p), maxMarks, by)).toEqual(refPointRows(p, maxMarks, by));
      }),
      { numRuns: 150 },
    );
  });

  it('qqRows: the same rows as a stable sort of {row, value} objects, ties included (property)', () => {
    fc.assert(
      fc.property(table, fc.integer({ min: 4, max: 300 }), (t, maxMarks) => {
        const p = pointsOf(t);
        expect(qqRows(fitOf(p), maxMarks)).toEqual(refQqRows(p, maxMarks));
      }),
      { numRuns: 150 },
    );
  });

  it('histogramRows: the same bin counts (property)', () => {
    fc.assert(
      fc.property(table, (t) => {
        const h = histogramRows(fitOf(pointsOf(t)));
        const finite = t.standardized.filter(Number.isFinite).length;
        expect(h.total).toBe(finite);
        if (finite > 0) expect(h.bins.map((b) => b.count)).toEqual(refHistogramCounts(t.standardized));
      }),
      { numRuns: 150 },
    );
  });

  it('qqRows on 200,000 tied values keeps data order among equal values', () => {
    // five levels, 40,000 each: position k of level L holds the k-th point of that level in data order
    const n = 200_000;
    const s = Array.from({ length: n }, (_, i) => [-1, 0, 1, 2, 3][(i * 7) % 5]);
    const p = pointsOf({ x: null, y: s, fitted: s, residual: s, standardized: s });
    expect(qqRows(fitOf(p))).toEqual(refQqRows(p, 5000));
  });
});
