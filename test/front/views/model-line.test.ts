import { describe, expect, it } from 'vitest';
import { normals, runSpec, tempDir, writeCsv } from '../../run/helpers';
import { fitTextLines } from '../../../engine/front/views/text';
import { markdownReport } from '../../../engine/front/views/markdown';
import { goodnessEntries, modelLine } from '../../../engine/front/views/summary';
import { panelFit } from '../../../extension/logic/panel-model';

describe('views: the model equation, the weighting and the AIC convention in every output', () => {
  it('text, Markdown and panel header state the equation and weighting; weighted SSR/RMSE/R² and AIC are labelled', async () => {
    const dir = tempDir();
    const z = normals(5, 12);
    writeCsv(dir, 'c.csv', ['x', 'y', 'sd'], Array.from({ length: 12 }, (_, i) => [i + 1, (0.2 + 0.5 * (i + 1) + 0.01 * (i + 1) * z[i]).toFixed(5), (0.01 * (i + 1)).toFixed(3)]));
    const fits = (w: string) => `data d = "c.csv"\nfit cal on d {\n  model y = b0 + b1 * x\n  param b0\n  param b1\n${w}\n}`;
    for (const [w, expected, rmseNote] of [
      ['', 'weighting: none (every point counts alike)', undefined],
      ['  weight 1 / x', 'weighting: relative weights w = 1 / x (residual variance estimated; SSR, R² and RMSE are weighted)', /^weighted: /],
      ['  sigma sd', 'weighting: absolute σ = sd (weights 1/σ²; SSR is χ², RMSE in σ units)', /^in σ units, not response units/],
    ] as const) {
      const { result } = await runSpec(fits(w), dir);
      const fit = result.fits[0];
      const line = modelLine(fit)!;
      expect(line).toBe(`Model: y = b0 + b1 * x; ${expected}`);
      expect(fitTextLines(fit)[1]).toBe(`  ${line}`);
      expect(markdownReport(result).replace(/\\/g, '')).toContain(line); // (Markdown escapes the * of the equation)
      expect(panelFit(fit, false).model).toBe(line);
      const entries = goodnessEntries(fit);
      const note = (label: string) => entries.find((e) => e.label === label)?.note;
      if (rmseNote) expect(note('residual standard deviation (RMSE)')).toMatch(rmseNote);
      else expect(note('residual standard deviation (RMSE)')).toBeUndefined();
      // engine/stats/goodness.ts: k = p + 1 when σ is estimated, k = p with absolute σ
      expect(note('AIC')).toBe(w.includes('sigma') ? 'k = p = 2: σ given, not estimated; Gaussian log-likelihood with its constants' : 'k = p + 1 = 3: σ counted as an estimated parameter; Gaussian log-likelihood with its constants');
      if (w) expect(note('R²')).toMatch(/^weighted, about the weighted mean/);
    }
  });
});
