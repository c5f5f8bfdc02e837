/**
 * Worker (bundled to dist/svg-worker.js) that renders Vega-Lite chart specs
 * to SVG documents for "Export Report → SVG", off the extension host's main
 * thread, with the CLI's renderer (engine/front/views/svg.ts `renderSvg`). The
 * bundle carries vega (build.mjs aliases `vega-canvas` to its browser build),
 * so the extension host bundle itself stays free of vega.
 */
import { parentPort } from 'node:worker_threads';
import type { TopLevelSpec } from 'vega-lite';
import { renderSvg } from '../../engine/front/views/svg';
import { isSvgRequest, type SvgResponse } from './svg-protocol';

parentPort?.on('message', async (msg: unknown) => {
  if (!isSvgRequest(msg)) return;
  const files: SvgResponse['files'] = [];
  for (const c of msg.charts) {
    try {
      files.push({ file: c.file, svg: await renderSvg(c.spec as unknown as TopLevelSpec, c.title) });
    } catch (e) {
      files.push({ file: c.file, error: e instanceof Error ? e.message : String(e) });
    }
  }
  const answer: SvgResponse = { id: msg.id, files };
  parentPort?.postMessage(answer);
});
