/**
 * SVG export worker (extension/export/svg-worker.ts), bundled as build.mjs
 * bundles it (vega inside, vega-canvas aliased to its browser build): the
 * CLI's chart specs of a saved run come back as SVG documents with marks.
 */
import { build } from 'esbuild';
import { mkdirSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { Worker } from 'node:worker_threads';
import { beforeAll, describe, expect, it } from 'vitest';
import type { RunResult } from '../../engine/result';
import { chartFileName, chartSpecs } from '../../engine/front/views/charts';
import { isSvgResponse, type SvgRequest, type SvgResponse } from '../../extension/export/svg-protocol';

const ROOT = resolve(__dirname, '..', '..');
const OUT = join(ROOT, 'test', 'artifacts', 'extension', 'svg-worker-build');

function render(req: SvgRequest): Promise<SvgResponse> {
  return new Promise((ok, fail) => {
    const w = new Worker(join(OUT, 'svg-worker.js'));
    w.on('message', (m: unknown) => {
      if (isSvgResponse(m)) {
        void w.terminate();
        ok(m);
      }
    });
    w.on('error', fail);
    w.postMessage(req);
  });
}

describe('extension/export/svg-worker', () => {
  beforeAll(async () => {
    mkdirSync(OUT, { recursive: true });
    await build({
      entryPoints: { 'svg-worker': join(ROOT, 'extension', 'export', 'svg-worker.ts') }, outdir: OUT, bundle: true, platform: 'node',
      target: 'node20', format: 'cjs', mainFields: ['module', 'main'], logLevel: 'warning',
      alias: { 'vega-canvas': join(ROOT, 'node_modules', 'vega-canvas', 'build', 'vega-canvas.browser.js') },
    });
  });

  it('renders every chart of a fit to an SVG document with drawn marks', async () => {
    const run = JSON.parse(readFileSync(join(__dirname, 'fixtures', 'cooling-run.json'), 'utf8')) as RunResult;
    const fit = run.fits[0];
    const charts = chartSpecs(fit).map((c) => ({ file: chartFileName(fit, c.id), spec: c.spec as unknown as Record<string, unknown> }));
    const res = await render({ id: 7, charts });
    expect(res.id).toBe(7);
    expect(res.files.map((f) => f.file)).toEqual(charts.map((c) => c.file));
    for (const f of res.files) {
      expect(f.error, f.file).toBeUndefined();
      expect(f.svg).toMatch(/^<\?xml[^]*<svg/);
      expect((f.svg!.match(/<path/g) ?? []).length, f.file).toBeGreaterThan(0);
    }
  });

  it('reports a broken spec as an error value and still renders the others', async () => {
    const res = await render({ id: 1, charts: [{ file: 'bad.svg', spec: { mark: 'no-such-mark' } }, { file: 'ok.svg', spec: { data: { values: [{ a: 1 }] }, mark: 'point', encoding: { x: { field: 'a', type: 'quantitative' } } } }] });
    expect(res.files[0].error).toBeTruthy();
    expect(res.files[1].svg).toContain('<svg');
  });
});
