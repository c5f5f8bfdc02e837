import { describe, expect, it } from 'vitest';
import normalQuantile from '@stdlib/stats-base-dists-normal-quantile';
import { compile } from 'vega-lite';
import { chartSpecs } from '../../../engine/front/views/charts';
import { histogramRows, prefersLogX, qqRows } from '../../../engine/front/views/chart-data';
import { PALETTE } from '../../../engine/front/views/palette';
import { lineData, lineFit } from '../../fixtures/line-fit';

type Layer = { name?: string; data?: { values: Record<string, number>[] }; encoding?: { tooltip?: { field: string }[] } };
const layers = (spec: unknown): Layer[] => (spec as { layer: Layer[] }).layer;
const pointsLayer = (spec: unknown): Layer => layers(spec).find((l) => l.name === 'data_points') as Layer;

describe('views/charts', () => {
  const d = lineData(30, 11);
  const fit = lineFit({ name: 'cal', x: d.x, y: d.y, predictor: 'conc_mgL', response: 'absorbance' });

  it('builds the five charts of a single-predictor fit in order', () => {
    const charts = chartSpecs(fit);
    expect(charts.map((c) => c.id)).toEqual(['fit', 'residuals-predictor', 'residuals-fitted', 'normal-qq', 'histogram']);
    for (const c of charts) {
      expect(c.title.startsWith('cal')).toBe(true);
      expect((c.spec as { $schema: string }).$schema).toContain('vega-lite/v6');
      // every spec compiles to Vega without throwing
      expect(compile(c.spec).spec.marks?.length ?? 0).toBeGreaterThan(0);
    }
  });

  it('draws bands, curve and every point, with the CSV row in tooltips', () => {
    const spec = chartSpecs(fit)[0].spec;
    const names = layers(spec).map((l) => l.name);
    expect(names).toEqual(['prediction_band', 'confidence_band', 'fitted_curve', 'data_points']);
    const pts = pointsLayer(spec);
    expect(pts.data?.values).toHaveLength(30);
    expect(pts.data?.values.map((r) => r.row)).toEqual(fit.points.row);
    expect(pts.encoding?.tooltip?.map((t) => t.field)).toContain('row');
    const band = layers(spec)[0].data?.values ?? [];
    expect(band).toHaveLength(fit.bands?.x.length ?? -1);
    for (const r of band) expect(r.predictionLower).toBeLessThanOrEqual(r.confidenceLower);
  });

  it('uses the palette roles for marks', () => {
    const spec = chartSpecs(fit)[0].spec as unknown as { layer: { mark: { color: string } }[] };
    expect(spec.layer.map((l) => l.mark.color)).toEqual([PALETTE.predictionBand, PALETTE.confidenceBand, PALETTE.curve, PALETTE.points]);
  });

  it('falls back to observed against fitted without a predictor', () => {
    const noX = lineFit({ name: 'multi', x: d.x, y: d.y, predictor: null });
    const ids = chartSpecs(noX).map((c) => c.id);
    expect(ids).toEqual(['observed-fitted', 'residuals-fitted', 'normal-qq', 'histogram']);
  });

  it('thins large fits for drawing and says so', () => {
    const big = lineData(12_000, 3);
    const bigFit = lineFit({ name: 'big', x: big.x, y: big.y });
    const charts = chartSpecs(bigFit, { maxMarks: 2000 });
    for (const c of charts.filter((c) => c.id !== 'histogram')) {
      const pts = pointsLayer(c.spec);
      expect(pts.data?.values.length).toBeLessThanOrEqual(2000);
      expect(JSON.stringify((c.spec as { title: unknown }).title)).toContain('of 12000 points');
    }
  });

  it('places Q-Q points at Blom positions (normal quantiles from @stdlib, a general-purpose library)', () => {
    const q = qqRows(fit);
    const n = q.total;
    expect(n).toBe(30);
    const sorted = [...fit.points.standardized].sort((a, b) => a - b);
    q.rows.forEach((r, i) => {
      expect(r.standardized).toBe(sorted[i]);
      expect(r.theoretical).toBeCloseTo(normalQuantile((i + 1 - 0.375) / (n + 0.25), 0, 1), 12);
    });
    // symmetric positions: first and last are mirror images
    expect(q.rows[0].theoretical).toBeCloseTo(-q.rows[n - 1].theoretical, 12);
  });

  it('bins every standardized residual once (Sturges bin count)', () => {
    const h = histogramRows(fit);
    expect(h.bins.reduce((s, b) => s + b.count, 0)).toBe(30);
    expect(h.bins).toHaveLength(Math.ceil(Math.log2(30)) + 1);
    for (let i = 1; i < h.bins.length; i++) expect(h.bins[i].start).toBeCloseTo(h.bins[i - 1].end, 12);
  });
});

describe('views/chart-data prefersLogX', () => {
  const pt = (x: number) => ({ row: 2, x, y: 0, fitted: 0, residual: 0, standardized: 0 });
  const band = (x: number) => ({ x, fitted: 0, confidenceLower: 0, confidenceUpper: 0, predictionLower: 0, predictionUpper: 0 });
  it('uses a log axis for positive data over more than three decades with a log-dense band', () => {
    const xs = Array.from({ length: 101 }, (_, i) => 10 ** (-3 + (5 * i) / 100));
    expect(prefersLogX([pt(0.001), pt(100)], xs.map(band))).toBe(true);
    expect(prefersLogX([pt(0.001), pt(100)], [])).toBe(true);
  });
  it('keeps a linear axis for narrow ranges, non-positive values or a linearly spaced band', () => {
    expect(prefersLogX([pt(1), pt(500)], [])).toBe(false);
    expect(prefersLogX([pt(0), pt(1e6)], [])).toBe(false);
    const linear = Array.from({ length: 200 }, (_, i) => 0.001 + (100 * i) / 199);
    expect(prefersLogX([pt(0.001), pt(100)], linear.map(band))).toBe(false);
  });
});
