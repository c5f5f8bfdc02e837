/**
 * The series palette stays distinguishable under simulated colour-vision
 * deficiencies, and the heat ramp reads by lightness alone.
 *
 * Simulation: the matrices of Machado, Oliveira & Fernandes (2009), "A
 * physiologically-based model for simulation of color vision deficiency",
 * IEEE TVCG 15(6), severity 1.0, applied to linear sRGB (values from memory).
 * sRGB → linear (IEC 61966-2-1), linear → XYZ (D65) → CIELAB, distance
 * ΔE*76 (CIE 15:2004) - handbook formulas.
 */
import { describe, expect, it } from 'vitest';
import { HEAT_RAMP, PALETTE, SERIES, SERIES_SHAPES } from '../../../engine/front/views/palette';

type Vec = [number, number, number];
const SIMULATIONS: Record<string, number[][]> = {
  protanopia: [[0.152286, 1.052583, -0.204868], [0.114503, 0.786281, 0.099216], [-0.003882, -0.048116, 1.051998]],
  deuteranopia: [[0.367322, 0.860646, -0.227968], [0.280085, 0.672501, 0.047413], [-0.01182, 0.04294, 0.968881]],
  tritanopia: [[1.255528, -0.076749, -0.178779], [-0.078411, 0.930809, 0.147602], [0.004733, 0.691367, 0.3039]],
  normal: [[1, 0, 0], [0, 1, 0], [0, 0, 1]],
};

const linear = (hex: string): Vec => [1, 3, 5].map((i) => {
  const c = parseInt(hex.slice(i, i + 2), 16) / 255;
  return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
}) as Vec;
const apply = (m: number[][], v: Vec): Vec => m.map((r) => Math.min(1, Math.max(0, r[0] * v[0] + r[1] * v[1] + r[2] * v[2]))) as Vec;
function lab(rgb: Vec): Vec {
  const [r, g, b] = rgb;
  const xyz = [0.4124 * r + 0.3576 * g + 0.1805 * b, 0.2126 * r + 0.7152 * g + 0.0722 * b, 0.0193 * r + 0.1192 * g + 0.9505 * b];
  const white = [0.95047, 1, 1.08883];
  const f = xyz.map((v, i) => {
    const t = v / white[i];
    return t > 216 / 24389 ? Math.cbrt(t) : ((24389 / 27) * t + 16) / 116;
  });
  return [116 * f[1] - 16, 500 * (f[0] - f[1]), 200 * (f[1] - f[2])];
}
const deltaE = (a: Vec, b: Vec): number => Math.hypot(a[0] - b[0], a[1] - b[1], a[2] - b[2]);

describe('views/palette (series and heat ramp)', () => {
  it('keeps every pair of series colours at least ΔE*76 12 apart, for normal vision and the three simulated deficiencies', () => {
    expect(new Set(SERIES).size).toBe(SERIES.length);
    for (const [name, m] of Object.entries(SIMULATIONS)) {
      const labs = SERIES.map((c) => lab(apply(m, linear(c))));
      let worst = Infinity;
      for (let i = 0; i < labs.length; i++) for (let j = i + 1; j < labs.length; j++) worst = Math.min(worst, deltaE(labs[i], labs[j]));
      expect(worst, name).toBeGreaterThanOrEqual(12);
    }
  });

  it('sets the series apart from the chart background and the grey of background curves', () => {
    for (const c of SERIES) {
      const L = lab(linear(c))[0];
      expect(L, c).toBeGreaterThanOrEqual(38);
      expect(L, c).toBeLessThanOrEqual(66);
      expect(deltaE(lab(linear(c)), lab(linear(PALETTE.background))), c).toBeGreaterThan(30);
    }
    expect(new Set(SERIES_SHAPES).size).toBe(SERIES.length);
  });

  it('lets the heat ramp fall in lightness at every stop, so order reads without hue', () => {
    const L = HEAT_RAMP.map((c) => lab(linear(c))[0]);
    for (let i = 1; i < L.length; i++) expect(L[i], HEAT_RAMP[i]).toBeLessThan(L[i - 1] - 10);
  });
});
