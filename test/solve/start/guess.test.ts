import { Matrix, QrDecomposition } from 'ml-matrix';
import { describe, expect, it } from 'vitest';
import { candidates, guessStart, type StartParameter } from '../../../engine/solve/start';
import { setup } from './helpers';

const free = (name: string, extra: Partial<StartParameter> = {}): StartParameter => ({ name, lower: -Infinity, upper: Infinity, ...extra });
const xs = Array.from({ length: 30 }, (_, i) => i * 0.2);

describe('solve/start guessStart', () => {
  it('solves a model linear in all parameters exactly (reference: ml-matrix QR least squares)', () => {
    const ys = xs.map((x) => 1.5 - 2 * x + 0.3 * x * x + 0.01 * Math.sin(9 * x));
    const { input } = setup('a + b * x + c * x^2', [free('a'), free('b'), free('c')], xs, ys);
    const g = guessStart(input);
    const ref = new QrDecomposition(new Matrix(xs.map((x) => [1, x, x * x]))).solve(Matrix.columnVector(ys)).getColumn(0);
    Array.from(g.theta).forEach((v, j) => expect(v).toBeCloseTo(ref[j], 8));
    expect(g.guessed).toEqual(['a', 'b', 'c']);
    expect(g.how).toBe('linear least squares for a, b, c');
  });

  it('finds the decade of a rate and solves the amplitude (general fallback, no structure)', () => {
    for (const k of [0.03, 0.8, 25]) {
      const ys = xs.map((x) => 4 * Math.exp(-k * x) + 0.5 + 0.01 * Math.sin(7 * x));
      const { input, ssr } = setup('amp * exp(-k * x) + c', [free('amp'), free('k'), free('c')], xs, ys, false);
      const g = guessStart(input);
      // half-decade magnitudes: the chosen k is within a factor √10 of the truth, or does as well
      const ratio = Math.abs(Math.log10(g.theta[1] / k));
      expect(ratio < 0.5 || ssr(g.theta) < 1e-3 * ssr(Float64Array.of(1, 1, 1))).toBe(true);
      expect(g.how).toContain('grid search over k');
      expect(g.how).toContain('linear least squares for amp, c');
    }
  });

  it('keeps given starts, respects bounds and is deterministic', () => {
    const ys = xs.map((x) => 2 / (1 + Math.exp(-(x - 3) / 0.7)));
    const params = [free('top', { initial: 2 }), free('mid', { lower: 0, upper: 6 }), free('w', { lower: 0.01, upper: 10 })];
    const { input, ssr } = setup('top / (1 + exp(-(x - mid) / w))', params, xs, ys);
    const g1 = guessStart(input);
    const g2 = guessStart(input);
    expect(Array.from(g1.theta)).toEqual(Array.from(g2.theta));
    expect(g1.theta[0]).toBe(2);
    expect(g1.guessed).toEqual(['mid', 'w']);
    expect(g1.theta[1]).toBeGreaterThan(0);
    expect(g1.theta[1]).toBeLessThan(6);
    expect(g1.theta[2]).toBeGreaterThan(0.01);
    expect(g1.theta[2]).toBeLessThan(10);
    // the grid's best point beats the centre of the box
    expect(ssr(g1.theta)).toBeLessThan(ssr(Float64Array.of(2, 3, 5)));
  });

  it('uses coordinate search for three or more nonlinear parameters', () => {
    const ys = xs.map((x) => Math.exp(-0.5 * x) * Math.cos(2 * x + 0.3));
    const { input, ssr } = setup('exp(-d * x) * cos(w * x + ph)', [free('d'), free('w'), free('ph')], xs, ys);
    const g = guessStart(input);
    expect(g.theta.every(Number.isFinite)).toBe(true);
    expect(g.how).toMatch(/grid search over d, w, ph \(\d+ candidates\)/);
    expect(ssr(g.theta)).toBeLessThan(ssr(Float64Array.of(1, 1, 1)));
  });

  it('candidates: interior log grid for wide positive bounds, offsets from one bound', () => {
    const c = candidates({ name: 'k', lower: 0.01, upper: 100 }, []);
    expect(c.length).toBe(16);
    expect(c[0]).toBeGreaterThan(0.01);
    expect(c[15]).toBeLessThan(100);
    expect(c[1] / c[0]).toBeCloseTo(c[2] / c[1], 10);
    const lin = candidates({ name: 'm', lower: -1, upper: 1 }, []);
    expect(lin[1] - lin[0]).toBeCloseTo(lin[2] - lin[1], 12);
    expect(candidates({ name: 'q', lower: 5, upper: Infinity }, []).every((v: number) => v > 5)).toBe(true);
    expect(candidates({ name: 'q', lower: -Infinity, upper: 0 }, []).every((v: number) => v < 0)).toBe(true);
    expect(candidates({ name: 'q', lower: -Infinity, upper: Infinity }, [Float64Array.of(0, 50)])).toContain(50);
  });
});

describe('solve/start guessStart on large data', () => {
  it('thins to at most 5000 rows and still finds the rate decade', () => {
    const big = Array.from({ length: 20001 }, (_, i) => i * 0.0005);
    const ys = big.map((x) => 2 * Math.exp(-1.7 * x) + 0.01 * Math.sin(50 * x));
    const { input } = setup('amp * exp(-k * x)', [free('amp'), free('k')], big, ys, false);
    const g = guessStart(input);
    expect(Math.abs(Math.log10(g.theta[1] / 1.7))).toBeLessThan(0.5);
    expect(g.theta[0]).toBeGreaterThan(1);
    expect(g.theta[0]).toBeLessThan(3);
  });
});
