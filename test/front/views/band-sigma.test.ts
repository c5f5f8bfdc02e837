/**
 * The band drawn with a weighted fit: its prediction part needs the spread of
 * one new point at every x. With sigma as an expression of the predictor that
 * is σ(x); with sigma (or weight) read from another column it is unknown
 * between the rows, and the chart draws the confidence band alone and says
 * why, instead of an average over the fitted rows (which made the drawn band
 * twice too wide at the low end of a 1/x² calibration).
 * Invented calibration data.
 */
import { describe, expect, it } from 'vitest';
import { chartSpecs } from '../../../engine/front/views/charts';
import { runSpec, tempDir, writeCsv } from '../../run/helpers';

type Layer = { name?: string };
const layerNames = (spec: unknown): (string | undefined)[] => (spec as { layer: Layer[] }).layer.map((l) => l.name);
const subtitle = (spec: unknown): string => ([] as string[]).concat((spec as { title: { subtitle: string | string[] } }).title.subtitle).join(' ');

describe('views/charts: the prediction band of a weighted fit', () => {
  const dir = tempDir();
  const conc = [0.5, 1, 2, 5, 10, 20, 50, 100];
  const rows = conc.map((c, i) => [c, 0.02 + 0.011 * c * (1 + 0.03 * Math.sin(3 * i)), 0.01 + 0.02 * c]);
  writeCsv(dir, 'cal.csv', ['conc', 'signal', 'sd'], rows);

  it('σ as an expression of the predictor: a prediction band, σ(x) at each x (outside the confidence band)', async () => {
    const { result } = await runSpec(`data d = "cal.csv"\nfit cal on d {\n  model signal = a + b * conc\n  param a\n  param b\n  sigma 0.01 + 0.02 * conc\n}\n`, dir);
    const fit = result.fits[0];
    const b = fit.bands!;
    for (let i = 0; i < b.x.length; i++) {
      expect(b.predictionLower[i]).toBeLessThan(b.confidenceLower[i]);
      expect(b.predictionUpper[i]).toBeGreaterThan(b.confidenceUpper[i]);
    }
    const spec = chartSpecs(fit)[0].spec;
    expect(layerNames(spec)).toContain('prediction_band');
    expect(subtitle(spec)).toMatch(/light shade: 95\s?% prediction band/);
  });

  it('σ read from a column: no prediction band (NaN in the result), the confidence band drawn and the reason in the caption', async () => {
    const { result } = await runSpec(`data d = "cal.csv"\nfit cal on d {\n  model signal = a + b * conc\n  param a\n  param b\n  sigma sd\n}\n`, dir);
    const fit = result.fits[0];
    const b = fit.bands!;
    expect(b.predictionLower.every((v) => Number.isNaN(v))).toBe(true);
    expect(b.confidenceLower.every((v) => Number.isFinite(v))).toBe(true);
    const spec = chartSpecs(fit)[0].spec;
    expect(layerNames(spec)).not.toContain('prediction_band');
    expect(layerNames(spec)).toContain('confidence_band');
    expect(subtitle(spec)).toMatch(/No prediction band: the spread of a new point comes from a column other than conc/);
  });

  it('weight read from a column: the same', async () => {
    const { result } = await runSpec(`data d = "cal.csv"\nfit cal on d {\n  model signal = a + b * conc\n  param a\n  param b\n  weight 1 / sd^2\n}\n`, dir);
    const spec = chartSpecs(result.fits[0])[0].spec;
    expect(layerNames(spec)).not.toContain('prediction_band');
    expect(result.fits[0].bands!.predictionUpper.every((v) => Number.isNaN(v))).toBe(true);
  });
});
