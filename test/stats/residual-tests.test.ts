import { describe, expect, it } from 'vitest';
import { durbinWatson, orderBy, runsTest } from '../../engine/stats/residual-tests';

describe('stats/residual-tests', () => {
  it('Durbin–Watson matches a hand computation', () => {
    // hand computation: e = (1, -1, 2, 0, -2): Σ(Δe)² = 4 + 9 + 4 + 4 = 21, Σe² = 10, d = 2.1
    expect(durbinWatson([1, -1, 2, 0, -2])).toBeCloseTo(2.1, 12);
    // positively correlated residuals give d < 2: e = (1, 1, 1, -1, -1): Σ(Δe)² = 4, Σe² = 5 → 0.8
    expect(durbinWatson([1, 1, 1, -1, -1])).toBeCloseTo(0.8, 12);
  });

  it('Durbin–Watson uses the given (predictor) order', () => {
    const e = [2, 0, -2, 1, -1];
    const x = [3, 4, 5, 1, 2]; // sorted by x: 1, -1, 2, 0, -2
    expect(durbinWatson(e, orderBy(x))).toBeCloseTo(2.1, 12);
    expect(durbinWatson([1])).toBeNull();
    expect(durbinWatson([0, 0, 0])).toBeNull();
  });

  it('orderBy is stable for ties', () => {
    expect(orderBy([2, 1, 2, 1])).toEqual([1, 3, 0, 2]);
  });

  it('runs test matches a hand computation of the normal approximation', () => {
    // signs + + - - + - + + (zeros dropped): n₊ = 5, n₋ = 3, N = 8, runs = 5
    // E = 2·5·3/8 + 1 = 4.75; Var = 30·(30 − 8)/(64·7) = 660/448; z = 0.25/√(660/448)
    const r = runsTest([1, 2, 0, -1, -3, 4, -1, 2, 5])!;
    expect(r.observed).toBe(5);
    expect(r.expected).toBeCloseTo(4.75, 12);
    const z = 0.25 / Math.sqrt(660 / 448);
    // from memory: Φ(−0.206) ≈ 0.4184, so p ≈ 0.837
    expect(z).toBeCloseTo(0.206, 3);
    expect(r.pValue).toBeCloseTo(0.837, 3);
  });

  it('flags a systematic pattern (few long runs)', () => {
    const e = [...Array(10).fill(1), ...Array(10).fill(-1), ...Array(10).fill(1)];
    const r = runsTest(e)!;
    expect(r.observed).toBe(3);
    expect(r.pValue).toBeLessThan(0.001);
    expect(runsTest([1, 2, 3])).toBeNull();
  });
});
