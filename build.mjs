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
  { in: 'test/strd/strd-cli.ts', out: 'strd' },
  { in: 'test/bench/bench.ts', out: 'bench' },
  { in: 'test/bench/parse-bench.ts', out: 'parse-bench' },
];
const browser = [{ in: 'extension/panel/page.ts', out: 'panel' }];

const common = { bundle: true, sourcemap: true, logLevel: 'warning', legalComments: 'none', minifyWhitespace: false };
const jobs = [];
for (const e of node.filter((e) => existsSync(e.in))) {
  jobs.push(build({
    ...common,
    entryPoints: { [e.out]: e.in },
    outdir: 'dist',
    platform: 'node',
    target: 'node20',
    format: 'cjs',
    external: ['vscode'],
    banner: e.banner ? { js: e.banner } : undefined,
    mainFields: ['module', 'main'],
  }));
}
for (const e of browser.filter((e) => existsSync(e.in))) {
  jobs.push(build({
    ...common,
    entryPoints: { [e.out]: e.in },
    outdir: 'dist',
    platform: 'browser',
    target: 'es2022',
    format: 'iife',
  }));
}
await Promise.all(jobs);
