import { describe, expect, it } from 'vitest';
import { grid, LOG_GRID_RATIO } from '../../engine/stats/bands';

describe('stats/bands grid', () => {
  it('spaces a narrow range evenly and keeps both ends exactly', () => {
    const g = grid(2, 4, 5);
    expect(Array.from(g)).toEqual([2, 2.5, 3, 3.5, 4]);
  });

  it('spaces a positive range over more than LOG_GRID_RATIO in log x (dose series)', () => {
    const g = grid(0.01, 100, 5);
    expect(100 / 0.01).toBeGreaterThan(LOG_GRID_RATIO);
    expect(g[0]).toBe(0.01);
    expect(g[4]).toBe(100);
    // log10 steps of 1: 0.01, 0.1, 1, 10, 100
    expect(g[1]).toBeCloseTo(0.1, 12);
    expect(g[2]).toBeCloseTo(1, 12);
    expect(g[3]).toBeCloseTo(10, 10);
  });

  it('stays linear when the range includes zero', () => {
    const g = grid(0, 1000, 3);
    expect(Array.from(g)).toEqual([0, 500, 1000]);
  });
});
