// Bundles the TypeScript sources with esbuild: ESM dependencies become
// one CommonJS file per entry for Node (CLI, extension host, worker, scripts)
// and one browser script for the results panel. Entries that do not exist
// yet are skipped so the build works while the tree grows.
import { build } from 'esbuild';
import { existsSync } from 'node:fs';

const node = [
  { in: 'cli.ts', out: 'cli', banner: '#!/usr/bin/env node' },
  { in: 'extension/extension.ts', out: 'extension' },
  { in: 'engine/worker.ts', out: 'worker' },
  // SVG export for the editor: carries vega itself (no node_modules in the .vsix);
  // vega-canvas's browser build returns no canvas in Node, so text widths are estimated.
  { in: 'extension/export/svg-worker.ts', out: 'svg-worker' },
  { in: 'test/strd/strd-cli.ts', out: 'strd' },
  // the bench drives Chromium for the panel's first paint (case 10): playwright-core stays in node_modules
  { in: 'test/bench/bench.ts', out: 'bench', external: ['playwright-core'] },
  { in: 'test/bench/parse-bench.ts', out: 'parse-bench' },
  // fuzz campaigns (`npm run fuzz`); runs its cases in worker threads of itself
  { in: 'test/fuzz/fuzz-cli.ts', out: 'fuzz' },
];
// The results panel page (+ panel.css from its CSS import), minified: it carries vega, vega-lite and vega-embed.
const browser = [{ in: 'extension/panel/view/page.ts', out: 'panel', minify: true }];

// `node build.mjs extension worker panel` builds only those outputs (the editor's
// packaging and end-to-end test use this); no arguments builds everything.
const only = new Set(process.argv.slice(2));
const wanted = (e) => existsSync(e.in) && (only.size === 0 || only.has(e.out));

// vega's Node entry pulls vega-canvas, whose module body runs a top-level
// `await import('canvas')` that CommonJS bundles cannot hold. Its browser build
// returns no canvas in Node, which is all we need: SVG output with estimated
// text widths. So every Node bundle carries vega and needs no node_modules.
const nodeAlias = { 'vega-canvas': './node_modules/vega-canvas/build/vega-canvas.browser.js' };

// import.meta is empty in the CommonJS bundles; modules that read it (test/robustness/suite.ts) fall back to the working directory, so that warning is silenced.
const common = { bundle: true, sourcemap: true, logLevel: 'warning', logOverride: { 'empty-import-meta': 'silent' }, legalComments: 'none', minifyWhitespace: false };
const jobs = [];
for (const e of node.filter(wanted)) {
  jobs.push(build({
    ...common,
    entryPoints: { [e.out]: e.in },
    outdir: 'dist',
    platform: 'node',
    target: 'node20',
    format: 'cjs',
    external: ['vscode', ...(e.external ?? [])],
    banner: e.banner ? { js: e.banner } : undefined,
    mainFields: ['module', 'main'],
    alias: nodeAlias,
  }));
}
for (const e of browser.filter(wanted)) {
  jobs.push(build({
    ...common,
    entryPoints: { [e.out]: e.in },
    outdir: 'dist',
    platform: 'browser',
    target: 'es2022',
    format: 'iife',
    minify: e.minify === true,
  }));
}
await Promise.all(jobs);
