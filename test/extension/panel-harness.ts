/**
 * Harness for the results page in a real headless Chromium: bundles
 * extension/panel/view/page.ts like build.mjs does; serving it and the theme
 * stand-ins live in panel-server.ts.
 */
import { build } from 'esbuild';
import { mkdirSync } from 'node:fs';
import { join, resolve } from 'node:path';

export { CHROMIUM_ARGS, servePanel, THEMES, type PanelServer, type ThemeName } from './panel-server';

export const ROOT = resolve(__dirname, '..', '..');
export const ARTIFACTS = join(ROOT, 'test', 'artifacts', 'extension');

/** Bundles the page into `outDir` (panel.js + panel.css), as build.mjs does for dist/. */
export async function bundlePage(outDir: string): Promise<void> {
  mkdirSync(outDir, { recursive: true });
  await build({
    entryPoints: { panel: join(ROOT, 'extension', 'panel', 'view', 'page.ts') },
    outdir: outDir, bundle: true, platform: 'browser', target: 'es2022', format: 'iife', minify: true, logLevel: 'warning', legalComments: 'none',
  });
}
