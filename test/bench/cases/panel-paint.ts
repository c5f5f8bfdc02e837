/**
 * (10) First paint of the results panel for a 1e6-point result: from the
 * engine's RunResult in the extension host to every chart drawn in the page.
 *
 * Timed per run, on a fresh page each time (headless Debian Chromium through
 * playwright-core, the page bundle dist/panel.js served in the webview's HTML
 * shell and CSP by test/extension/panel-server.ts):
 *   host:  buildPanelModel (downsampling to ≤ 5,000 marks per layer, tables)
 *          + JSON.stringify of the `show` message (what a webview postMessage
 *          serialises);
 *   page:  JSON.parse of the message + dispatch + Vega-Lite compile and SVG
 *          render of every chart, until body[data-rendered="true"].
 * The hand-over of the string from Node to the page (CDP) is not timed: in
 * VS Code that step is the webview's own message channel. The fit itself is
 * not part of the figure (see benchmark 4).
 */
import { existsSync, writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import path from 'node:path';
import { performance } from 'node:perf_hooks';
import { analyze, hasErrors } from '../../../parser';
import { readHeaderFile } from '../../../engine/data';
import { runPlan } from '../../../engine/runner';
import { buildPanelModel } from '../../../extension/logic/panel-model';
import { CHROMIUM_ARGS, servePanel } from '../../extension/panel-server';
import { gaussian, rng } from '../../fixtures/random';
import { statsOf } from '../harness';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

const GOAL_MS = 1500;

/** Invented cooling-curve readings: 5·exp(−0.5x) + 1 + N(0, 0.05²), x evenly spaced in [0, 20]. */
function writeData(file: string, n: number): void {
  const g = gaussian(rng(17));
  const lines = new Array<string>(n + 1);
  lines[0] = 'x,y';
  for (let i = 0; i < n; i++) {
    const x = (20 * i) / (n - 1);
    lines[i + 1] = `${x},${(5 * Math.exp(-0.5 * x) + 1 + 0.05 * g()).toFixed(6)}`;
  }
  writeFileSync(file, lines.join('\n') + '\n');
}

const SPEC = `data readings = "paint.csv"
fit decay on readings {
  model y = a * exp(-k * x) + c
  param a = 4
  param k = 1
  param c = 0
}
`;

export async function benchPanelPaint(ctx: BenchContext): Promise<BenchRow> {
  const n = ctx.quick ? 20_000 : 1_000_000;
  const bundleDir = __dirname; // dist/ when run as dist/bench.js
  if (!existsSync(path.join(bundleDir, 'panel.js'))) throw new Error(`no panel bundle in ${bundleDir}: run node build.mjs first`);
  const chromiumPath = process.env.CHROMIUM ?? '/usr/bin/chromium';
  if (!existsSync(chromiumPath)) throw new Error(`Chromium not found at ${chromiumPath} (set CHROMIUM)`);

  writeData(path.join(ctx.tmp, 'paint.csv'), n);
  const a = analyze(SPEC, { headers: (_name, p) => readHeaderFile(path.join(ctx.tmp, p))?.headers });
  if (hasErrors(a.diagnostics)) throw new Error(`bench spec has errors: ${a.diagnostics.map((d) => d.message).join('; ')}`);
  ctx.log(`  (10) fitting ${fmt(n, 1)} points for the panel result`);
  const run = await runPlan(a.plan, { baseDir: ctx.tmp, specText: SPEC });
  if (run.errors.length || !run.fits[0]?.stop.converged) throw new Error(`the bench fit failed: ${run.errors.map((e) => e.message).join('; ') || run.fits[0]?.stop.message}`);

  // CommonJS resolution from this bundle's folder (honours NODE_PATH; an ESM import() would not)
  const { chromium } = createRequire(__filename)('playwright-core') as typeof import('playwright-core');
  const scratch = path.join(ctx.tmp, 'chromium');
  const browser = await chromium.launch({ executablePath: chromiumPath, headless: true, args: CHROMIUM_ARGS, env: { ...process.env, XDG_CONFIG_HOME: scratch, XDG_CACHE_HOME: scratch } });
  const server = await servePanel(bundleDir);
  const host: number[] = [];
  const page: number[] = [];
  const total: number[] = [];
  let marks: number[] = [];
  let messageBytes = 0;
  try {
    const runs = ctx.quick ? 1 : 5;
    for (let r = 0; r < runs + 1; r++) {
      const p = await browser.newPage({ viewport: { width: 1180, height: 860 } });
      await p.goto(server.url('light'));
      await p.waitForFunction(() => (window as unknown as { __posted: { type: string }[] }).__posted.some((m) => m.type === 'ready'));
      const t0 = performance.now();
      const model = buildPanelModel(run, { specUri: `file://${ctx.tmp}/paint.lsq`, specName: 'paint.lsq' });
      const message = JSON.stringify({ type: 'show', model });
      const hostMs = performance.now() - t0;
      await p.evaluate((s) => {
        (window as unknown as { __pending: string }).__pending = s;
      }, message);
      const pageMs = await p.evaluate(
        () =>
          new Promise<number>((resolve) => {
            // window.performance: the page's clock (the bare name is this module's node:perf_hooks import)
            const t = window.performance.now();
            const done = () => document.body.dataset.rendered === 'true';
            const observer = new MutationObserver(() => {
              if (done()) {
                observer.disconnect();
                resolve(window.performance.now() - t);
              }
            });
            observer.observe(document.body, { attributes: true, attributeFilter: ['data-rendered'] });
            window.postMessage(JSON.parse((window as unknown as { __pending: string }).__pending), '*');
          }),
      );
      marks = await p.locator('figure.lw-chart').evaluateAll((figs) => figs.map((f) => Number((f as HTMLElement).dataset.marks)));
      await p.close();
      messageBytes = message.length;
      if (r === 0) continue; // warm-up: first compile of the page's code paths
      host.push(hostMs);
      page.push(pageMs);
      total.push(hostMs + pageMs);
    }
  } finally {
    await browser.close();
    await server.close();
  }
  const t = statsOf(total);
  const drawnOk = marks.length > 0 && marks.every((m) => m > 0 && m <= 3 * 5000);
  return {
    id: 10,
    name: `Results panel first paint, ${fmt(n, 1)}-point result`,
    value: t.median,
    unit: 'ms',
    spread: [t.min, t.max],
    text: `${fmt(t.median)} ms (host: model + message ${fmt(statsOf(host).median)} ms, page: parse + ${marks.length} charts ${fmt(statsOf(page).median)} ms; message ${fmt(messageBytes / 1e6)} MB; marks per chart ${marks.join('/')})`,
    goal: `≤ ${GOAL_MS / 1000} s`,
    met: drawnOk && t.median <= GOAL_MS,
    details: { n, totalMs: t, hostMs: statsOf(host), pageMs: statsOf(page), messageBytes, marks },
  };
}
