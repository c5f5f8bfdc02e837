/**
 * Chart subtitles wrapped to the chart's width (engine/front/views/wrap.ts):
 * the CLI's headless SVG of a fit chart is as wide as its plot and axes, not
 * as wide as its longest subtitle line (before: 890 px for a 560 px plot).
 */
import { describe, expect, it } from 'vitest';
import { HEADLESS_CHAR_PX, HEADLESS_TITLE_CHAR_PX, TITLE_LINES, wrapSubtitle, wrapTitle } from '../../../engine/front/views/wrap';
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

  it('wraps a title into at most two lines, a word longer than a line cut with an ellipsis (a closing colon kept)', () => {
    const long = `${'x'.repeat(120)}: data and fitted curve`;
    const w = wrapTitle(long, 560);
    const budget = Math.floor(560 / HEADLESS_TITLE_CHAR_PX);
    expect(w.shortened).toBe(true);
    expect(w.lines.length).toBeLessThanOrEqual(TITLE_LINES);
    for (const l of w.lines) expect(l.length).toBeLessThanOrEqual(budget);
    expect(w.lines[0]).toBe(`${'x'.repeat(budget - 2)}…:`);
    expect(w.lines[1]).toBe('data and fitted curve');
    // a short title stays whole, on one line
    expect(wrapTitle('cal: data and fitted curve', 560)).toEqual({ lines: ['cal: data and fitted curve'], shortened: false });
    // many words: the text past the second line is cut with an ellipsis
    const words = wrapTitle(Array.from({ length: 40 }, (_, i) => `word${i}`).join(' '), 300);
    expect(words.lines).toHaveLength(2);
    expect(words.lines[1].endsWith('…')).toBe(true);
    expect(HEADLESS_TITLE_CHAR_PX).toBeCloseTo(0.8 * 14, 12);
  });

  it('a long fit name does not widen the exported SVG: each chart as wide as with a short name, the full title in <title>', async () => {
    const d = lineData(25, 7);
    const short = await chartSvgs(lineFit({ name: 'cal', x: d.x, y: d.y, predictor: 'concentration', response: 'absorbance' }));
    const longName = 'calibration_of_the_second_photometer_on_bench_three_after_cleaning_the_cuvette_holder_and_lamp';
    const long = await chartSvgs(lineFit({ name: longName, x: d.x, y: d.y, predictor: 'concentration', response: 'absorbance' }));
    const widthOf = (svg: string) => Number(/<svg[^>]* width="(\d+(?:\.\d+)?)"/.exec(svg)?.[1]);
    expect(long.map((c) => c.id)).toEqual(short.map((c) => c.id));
    long.forEach((c, i) => {
      expect(widthOf(c.svg), c.id).toBe(widthOf(short[i].svg));
      expect(c.svg).toContain(`<title>${c.title}</title>`);
      expect(c.title).toContain(longName);
      // the drawn title is cut: the name does not appear whole among the SVG's text
      expect(c.svg.replace(/<title>[^<]*<\/title>/, '')).not.toContain(`>${longName}`);
    });
  });
});

