import { describe, expect, it } from 'vitest';
import { chartFileName, chartSvgs, renderSvg } from '../../../engine/front/views/svg';
import { chartSpecs } from '../../../engine/front/views/charts';
import { lineData, lineFit } from '../../fixtures/line-fit';
import { findAll, markItems, parseXml } from './xml';

describe('views/svg', () => {
  const d = lineData(40, 5);
  const fit = lineFit({ name: 'cal', x: d.x, y: d.y, predictor: 'conc_mgL', response: 'absorbance' });

  it('renders well-formed SVG with one symbol per data point', async () => {
    const charts = await chartSvgs(fit);
    expect(charts).toHaveLength(5);
    for (const c of charts) {
      const root = parseXml(c.svg);
      expect(root.name).toBe('svg');
      expect(root.attrs.xmlns).toBe('http://www.w3.org/2000/svg');
      if (c.id !== 'histogram') expect(markItems(root, 'data_points')).toHaveLength(40);
      // the title is drawn as text (wrapped to the plot's width: its first line), and kept whole as the SVG's <title>
      const firstLine = c.title.split(' ').slice(0, 2).join(' ');
      expect(findAll(root, (e) => e.name === 'text' || e.name === 'tspan').some((t) => t.text.includes(firstLine.replace(/&/g, '&amp;')))).toBe(true);
      expect(c.svg).toContain(`<title>${c.title.replace(/&/g, '&amp;')}</title>`);
    }
  });

  it('draws one bar per histogram bin', async () => {
    const spec = chartSpecs(fit).find((c) => c.id === 'histogram')!.spec;
    const bins = (spec as unknown as { layer: { data: { values: unknown[] } }[] }).layer[0].data.values.length;
    const root = parseXml(await renderSvg(spec));
    expect(markItems(root, 'bars')).toHaveLength(bins);
  });

  it('draws at most maxMarks symbols for a large fit', async () => {
    const big = lineData(9000, 21);
    const bigFit = lineFit({ name: 'big', x: big.x, y: big.y });
    const spec = chartSpecs(bigFit, { maxMarks: 1200 })[0].spec;
    const root = parseXml(await renderSvg(spec));
    const n = markItems(root, 'data_points').length;
    expect(n).toBeLessThanOrEqual(1200);
    expect(n).toBeGreaterThan(300);
  });

  it('names chart files safely', () => {
    expect(chartFileName({ ...fit, name: 'cal', group: 'lot 7/b' }, 'normal-qq')).toMatch(/^cal-lot_7_b~[0-9a-f]{8}-normal-qq\.svg$/);
    expect(chartFileName(fit, 'fit')).toBe('cal-fit.svg');
  });
});

describe('views/xml (test helper)', () => {
  it('rejects malformed documents', () => {
    expect(() => parseXml('<a><b></a></b>')).toThrow(/does not match/);
    expect(() => parseXml('<a x="1" x="2"/>')).toThrow(/duplicate/);
    expect(() => parseXml('<a>fish & chips</a>')).toThrow(/stray/);
    expect(() => parseXml('<a/><b/>')).toThrow(/more than one root/);
    expect(() => parseXml('<a>')).toThrow(/unclosed/);
    expect(parseXml('<?xml version="1.0"?><a k=\'v\'>x &amp; y<b/></a>').children).toHaveLength(1);
  });
});
