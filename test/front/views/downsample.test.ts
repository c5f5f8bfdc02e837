import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { keepExtremes, keepTails } from '../../../engine/front/views/downsample';

describe('views/downsample', () => {
  it('keeps every finite point under the cap', () => {
    const x = [3, 1, NaN, 2];
    const v = [0.1, -0.2, 0.3, Infinity];
    expect(keepExtremes(x, v, 10)).toEqual([0, 1]);
  });

  it('caps the count and keeps extremes and both ends (property)', () => {
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.double({ min: -1e3, max: 1e3, noNaN: true }), fc.double({ min: -50, max: 50, noNaN: true })), { minLength: 1, maxLength: 3000 }),
        fc.integer({ min: 4, max: 400 }),
        (pairs, maxMarks) => {
          const x = pairs.map((p) => p[0]);
          const v = pairs.map((p) => p[1]);
          const kept = keepExtremes(x, v, maxMarks);
          expect(kept.length).toBeLessThanOrEqual(Math.max(maxMarks, pairs.length <= maxMarks ? pairs.length : 0));
          const set = new Set(kept);
          const vmin = Math.min(...v);
          const vmax = Math.max(...v);
          const xmin = Math.min(...x);
          const xmax = Math.max(...x);
          expect(kept.some((i) => v[i] === vmin)).toBe(true);
          expect(kept.some((i) => v[i] === vmax)).toBe(true);
          expect(kept.some((i) => x[i] === xmin)).toBe(true);
          expect(kept.some((i) => x[i] === xmax)).toBe(true);
          expect(set.size).toBe(kept.length);
          expect([...kept].sort((a, b) => a - b)).toEqual(kept);
        },
      ),
      { numRuns: 60 },
    );
  });

  it('thins 100000 points to at most 5000', () => {
    const n = 100_000;
    const x = Array.from({ length: n }, (_, i) => i);
    const v = x.map((i) => Math.sin(i / 100) + (i === 77_777 ? 40 : 0));
    const kept = keepExtremes(x, v);
    expect(kept.length).toBeLessThanOrEqual(5000);
    expect(kept.length).toBeGreaterThan(2500);
    expect(kept).toContain(77_777);
  });

  it('keeps both tails of a sorted sample', () => {
    const kept = keepTails(20_000, 1000, 50);
    expect(kept.length).toBeLessThanOrEqual(1000);
    for (let i = 0; i < 50; i++) {
      expect(kept).toContain(i);
      expect(kept).toContain(19_999 - i);
    }
    expect(keepTails(30, 1000)).toHaveLength(30);
  });
});
