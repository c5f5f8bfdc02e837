/**
 * Chart subtitles wrapped to the chart's width (engine/front/views/wrap.ts):
 * the CLI's headless SVG of a fit chart is as wide as its plot and axes, not
 * as wide as its longest subtitle line (before: 890 px for a 560 px plot).
 */
import { describe, expect, it } from 'vitest';
import { HEADLESS_CHAR_PX, wrapSubtitle } from '../../../engine/front/views/wrap';
import { chartSvgs } from '../../../engine/front/views/svg';
import { lineData, lineFit } from '../../fixtures/line-fit';

describe('engine/front/views/wrap', () => {
  it('wraps at word boundaries within the width', () => {
    const out = wrapSubtitle(['Points: data. Line: fitted curve. Dark shade: 95% confidence band; light shade: 95% prediction band.'], 300, 6);
    expect(out.join(' ')).toBe('Points: data. Line: fitted curve. Dark shade: 95% confidence band; light shade: 95% prediction band.');
    for (const l of out) expect(l.length).toBeLessThanOrEqual(50);
    expect(out.length).toBeGreaterThan(1);
  });

  it('keeps exported SVGs as wide as the chart: no blank strip on the right', async () => {
    const d = lineData(25, 7);
    const fit = lineFit({ name: 'calibration', x: d.x, y: d.y, predictor: 'concentration', response: 'absorbance' });
    for (const c of await chartSvgs(fit)) {
      const width = Number(/<svg[^>]* width="(\d+(?:\.\d+)?)"/.exec(c.svg)?.[1]);
      // plot 560 px (default) or the square Q-Q plot, plus the y axis and padding (under 90 px)
      expect(width, c.id).toBeLessThanOrEqual(560 + 90);
      expect(HEADLESS_CHAR_PX).toBe(0.8 * 11);
    }
  });
});
