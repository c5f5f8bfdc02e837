/**
 * Worker (bundled to dist/svg-worker.js) that renders Vega-Lite chart specs
 * to SVG documents for "Export Report → SVG", off the extension host's main
 * thread. Same steps as engine/views/svg.ts (compile, headless view with the
 * `none` renderer, toSVG) but with static imports, so the bundle carries
 * vega and needs no node_modules at run time (build.mjs aliases
 * `vega-canvas` to its browser build: no native canvas; text widths are
 * estimated).
 */
import { parentPort } from 'node:worker_threads';
import * as vega from 'vega';
import * as vegaLite from 'vega-lite';
import { isSvgRequest, type SvgResponse } from './svgProtocol';

async function render(spec: Record<string, unknown>): Promise<string> {
  const compiled = vegaLite.compile(spec as never).spec;
  const view = new vega.View(vega.parse(compiled), { renderer: 'none', logLevel: vega.Error });
  try {
    const svg = await view.toSVG();
    return svg.startsWith('<?xml') ? svg : `<?xml version="1.0" encoding="UTF-8"?>\n${svg}\n`;
  } finally {
    view.finalize();
  }
}

parentPort?.on('message', async (msg: unknown) => {
  if (!isSvgRequest(msg)) return;
  const files: SvgResponse['files'] = [];
  for (const c of msg.charts) {
    try {
      files.push({ file: c.file, svg: await render(c.spec) });
    } catch (e) {
      files.push({ file: c.file, error: e instanceof Error ? e.message : String(e) });
    }
  }
  const answer: SvgResponse = { id: msg.id, files };
  parentPort?.postMessage(answer);
});
