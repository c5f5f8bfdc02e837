import { describe, expect, it } from 'vitest';
import { bandsAt, factorCovariance, grid, predictAt, type ModelAt } from '../../engine/stats/bands';
import { inversePrediction } from '../../engine/stats/inverse';
import { brentRoot } from '../../engine/stats/root';

// straight line f = a + b·x with a known covariance C (flat 2×2), s² and t
const a = 1.5;
const b = 2.0;
const C = [0.04, -0.005, -0.005, 0.001];
const s2 = 0.09;
const t = 2.1;
const line: ModelAt = (xs) => {
  const m = xs.length;
  const f = new Float64Array(m);
  const gradient = new Float64Array(2 * m);
  xs.forEach((x, i) => {
    f[i] = a + b * x;
    gradient[i] = 1;
    gradient[m + i] = x;
  });
  return { f, gradient };
};
const newSd = (xs: Float64Array) => new Float64Array(xs.length).fill(Math.sqrt(s2));
const F = factorCovariance(C, 2);
const curve = (xs: Float64Array) => bandsAt(xs, line, F, t, newSd);

describe('stats/bands', () => {
  it('grid spans min..max inclusive with the requested count', () => {
    const g = grid(2, 4, 5);
    expect(Array.from(g)).toEqual([2, 2.5, 3, 3.5, 4]);
  });
  it('predictAt: half-widths t·√(gᵀCg) and t·√(gᵀCg + s²) by hand', () => {
    const [p] = predictAt([3], line, F, t, newSd);
    const q = C[0] + 2 * 3 * C[1] + 9 * C[3]; // gᵀCg with g = (1, 3)
    expect(p.fitted).toBeCloseTo(7.5, 14);
    expect(p.confidence[1] - p.fitted).toBeCloseTo(t * Math.sqrt(q), 12);
    expect(p.prediction[1] - p.fitted).toBeCloseTo(t * Math.sqrt(q + s2), 12);
  });

  it('gives the same relative half-widths for a covariance and s scaled by 1e-300 or 1e+300 (no squares formed)', () => {
    const xs = Float64Array.of(0, 3, 9);
    const ref = bandsAt(xs, line, F, t, newSd);
    for (const k of [1e-300, 1e-150, 1e150, 1e300]) {
      const scaled = { p: 2, se: Array.from(F.se, (v) => v * k), corr: F.corr };
      const b = bandsAt(xs, line, scaled, t, (v) => new Float64Array(v.length).fill(Math.sqrt(s2) * k));
      for (let i = 0; i < xs.length; i++) {
        expect(b.confidence[i] / k / ref.confidence[i]).toBeCloseTo(1, 12);
        expect(b.prediction[i] / k / ref.prediction[i]).toBeCloseTo(1, 12);
      }
    }
  });
});

describe('stats/inverse inversePrediction', () => {
  it('solves the line exactly and inverts the prediction band (Draper & Smith §3.2, by hand)', () => {
    const y0 = 9;
    const r = inversePrediction(y0, 0, 10, curve);
    expect(r.x).toBeCloseTo((y0 - a) / b, 10);
    // interval ends: (a + b x − y0)² = t²(C00 + 2C01 x + C11 x² + s²), a quadratic A x² + B x + K = 0
    const A = b * b - t * t * C[3];
    const B = 2 * b * (a - y0) - 2 * t * t * C[1];
    const K = (a - y0) ** 2 - t * t * (C[0] + s2);
    const disc = Math.sqrt(B * B - 4 * A * K);
    expect(r.interval[0]).toBeCloseTo((-B - disc) / (2 * A), 8);
    expect(r.interval[1]).toBeCloseTo((-B + disc) / (2 * A), 8);
    expect(r.message).toBeUndefined();
  });

  it('returns null when the response is outside the fitted range', () => {
    const r = inversePrediction(100, 0, 10, curve);
    expect(r.x).toBeNull();
    expect(r.interval).toEqual([null, null]);
    expect(r.message).toContain('no predictor value');
  });

  it('follows an interval end beyond the data edge and marks it extrapolated (the lowest standard: once n/a)', () => {
    const r = inversePrediction(1.6, 0, 10, curve);
    expect(r.x).toBeCloseTo(0.05, 10);
    // the same quadratic as above (Draper & Smith §3.2): its lower root lies below the data range
    const y0 = 1.6;
    const A = b * b - t * t * C[3];
    const B = 2 * b * (a - y0) - 2 * t * t * C[1];
    const K = (a - y0) ** 2 - t * t * (C[0] + s2);
    const disc = Math.sqrt(B * B - 4 * A * K);
    expect((-B - disc) / (2 * A)).toBeLessThan(0);
    expect(r.interval[0]).toBeCloseTo((-B - disc) / (2 * A), 8);
    expect(r.interval[1]).toBeCloseTo((-B + disc) / (2 * A), 8);
    expect(r.ends).toEqual(['extrapolated', 'data']);
    expect(r.message).toBe('the lower limit lies beyond the data range (the curve extrapolated)');
  });

  it('reads a response just beyond the data range off the curve, marked extrapolated; farther out it refuses', () => {
    // f(−0.2) = 1.1: 2 % of the range [0, 10] below its lower end, inside the 10 % margin (engine/thresholds.ts INVERSE_REACH)
    const r = inversePrediction(1.1, 0, 10, curve);
    expect(r.x).toBeCloseTo(-0.2, 10);
    expect(r.extrapolated).toBe(true);
    expect(r.message).toContain('extrapolated: the curve reaches this response below the lowest predictor value of the data (0)');
    // f(−2) = −2.5: 20 % beyond, refused as before
    expect(inversePrediction(-2.5, 0, 10, curve).x).toBeNull();
  });

  it('says an end is open where the band still holds the response as far as it is followed, or the model ends', () => {
    // a band far wider than the curve's rise over the range and its reach: open on both sides
    const wide = inversePrediction(9, 0, 10, (xs) => bandsAt(xs, line, F, t, (v) => new Float64Array(v.length).fill(1e3)));
    expect(wide.x).toBeCloseTo(3.75, 10);
    expect(wide.interval).toEqual([null, null]);
    expect(wide.ends).toEqual(['open', 'open']);
    expect(wide.message).toMatch(/^open on both sides/);
    // f = a + b·√x is not defined below 0: the lower end is open at the edge of the model's domain
    const root: ModelAt = (xs) => ({ f: xs.map((x) => a + b * Math.sqrt(x)), gradient: new Float64Array(2 * xs.length) });
    const r = inversePrediction(a + b * Math.sqrt(0.01), 0, 10, (xs) => bandsAt(xs, root, F, t, (v) => new Float64Array(v.length).fill(0.3)));
    expect(r.x).toBeCloseTo(0.01, 9);
    expect(r.ends?.[0]).toBe('open');
    expect(r.interval[0]).toBeNull();
    expect(r.interval[1]).not.toBeNull();
    expect(r.message).toContain('one-sided: open below');
  });

  it('reports the smallest of several solutions', () => {
    const parabola: ModelAt = (xs) => ({ f: xs.map((x) => (x - 5) ** 2), gradient: new Float64Array(xs.length) });
    const r = inversePrediction(4, 0, 10, (xs) => bandsAt(xs, parabola, factorCovariance([0], 1), t, (v) => new Float64Array(v.length).fill(0.1)));
    expect(r.x).toBeCloseTo(3, 9);
    expect(r.message).toContain('2 solutions');
  });
});

describe('stats/root brentRoot', () => {
  it('finds roots to the documented tolerance and refuses non-brackets', () => {
    expect(brentRoot((x) => x * x - 2, 0, 2)).toBeCloseTo(Math.SQRT2, 12);
    expect(brentRoot((x) => Math.cos(x) - x, 0, 1)).toBeCloseTo(0.7390851332151607, 12); // from memory: Dottie number
    expect(brentRoot((x) => x * x + 1, -1, 1)).toBeNull();
    expect(brentRoot((x) => x - 1, 1, 3)).toBe(1);
  });
});
