/**
 * Headless SVG rendering of the Vega-Lite chart specs: compile to Vega, run a
 * view with the `none` renderer and serialise the scenegraph to SVG. No canvas
 * and no fonts are needed: without a canvas Vega estimates text widths, and
 * the SVG names a system font stack (palette.ts) that viewers resolve locally.
 */
import type { TopLevelSpec } from 'vega-lite';
import type { FitResult, RunResult } from '../../result';
import { acrossCharts } from './across';
import type { GroupChartOptions } from './group-charts';
import { chartSpecs, type ChartId, type ChartOptions } from './charts';
export { chartFileName } from './charts';
import { loadVega } from './vega-runtime';
import { svgWithTitle } from './wrap';

/**
 * A copy of `spec` without tooltips: a static SVG shows none, and Vega-Lite
 * compiles tooltip titles (user names) into expression source, where some
 * names are illegal (see charts.ts).
 */
export function withoutTooltips<T>(spec: T): T {
  const walk = (node: unknown): unknown => {
    if (Array.isArray(node)) return node.map(walk);
    if (typeof node !== 'object' || node === null) return node;
    const out: Record<string, unknown> = {};
    for (const [k, v] of Object.entries(node)) {
      if (k === 'tooltip') continue;
      out[k] = walk(v);
    }
    return out;
  };
  return walk(spec) as T;
}

/**
 * Render one Vega-Lite spec to an SVG document string (tooltips left out, see `withoutTooltips`); `title`, the
 * chart's full title, becomes the SVG's <title> (the drawn title may be cut to the plot's width: wrap.ts `wrapTitle`).
 */
export async function renderSvg(spec: TopLevelSpec, title?: string): Promise<string> {
  const { vega, vegaLite } = await loadVega();
  const compiled = vegaLite.compile(withoutTooltips(spec)).spec;
  const view = new vega.View(vega.parse(compiled), { renderer: 'none', logLevel: vega.Error });
  try {
    const svg = await view.toSVG();
    const titled = title === undefined ? svg : svgWithTitle(svg, title);
    return titled.startsWith('<?xml') ? titled : `<?xml version="1.0" encoding="UTF-8"?>\n${titled}\n`;
  } finally {
    view.finalize();
  }
}

export interface RenderedChart {
  id: ChartId;
  title: string;
  svg: string;
}

/** Every chart of a fit as SVG, in chartSpecs order. */
export async function chartSvgs(fit: FitResult, opts?: ChartOptions): Promise<RenderedChart[]> {
  const out: RenderedChart[] = [];
  for (const c of chartSpecs(fit, opts)) out.push({ id: c.id, title: c.title, svg: await renderSvg(c.spec, c.title) });
  return out;
}

/** Every across-curve chart of a run as SVG (across.ts `acrossCharts`), grouped as there. */
export async function acrossChartSvgs(result: RunResult, opts?: GroupChartOptions): Promise<{ key: string; charts: RenderedAcrossChart[] }[]> {
  const out: { key: string; charts: RenderedAcrossChart[] }[] = [];
  for (const a of acrossCharts(result, opts)) {
    const charts: RenderedAcrossChart[] = [];
    for (const c of a.charts) charts.push({ id: c.id, title: c.title, svg: await renderSvg(c.spec, c.title) });
    out.push({ key: a.key, charts });
  }
  return out;
}

export interface RenderedAcrossChart {
  id: string;
  title: string;
  svg: string;
}
