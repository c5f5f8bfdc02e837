/**
 * Loads `vega` and `vega-lite` at run time instead of bundling them.
 *
 * Why: vega's Node entry pulls `vega-canvas`, whose module body runs a
 * top-level `await import('canvas')`; esbuild cannot put top-level await into
 * the CommonJS bundles that build.mjs writes, so a static import here would
 * break `node build.mjs`. A dynamic import with a non-literal specifier is
 * left alone by esbuild and resolved by Node from node_modules (both packages
 * are runtime dependencies). If build.mjs ever aliases `vega-canvas` to its
 * browser build, this can become two static imports.
 */
import type * as VegaModule from 'vega';
import type * as VegaLiteModule from 'vega-lite';

export interface VegaRuntime {
  vega: typeof VegaModule;
  vegaLite: typeof VegaLiteModule;
}

let cached: Promise<VegaRuntime> | null = null;

const load = (specifier: string): Promise<unknown> => import(/* @vite-ignore */ specifier);

/** The two libraries, loaded once per process. */
export function loadVega(): Promise<VegaRuntime> {
  cached ??= Promise.all([load('vega'), load('vega-lite')]).then(([vega, vegaLite]) => ({
    vega: vega as typeof VegaModule,
    vegaLite: vegaLite as typeof VegaLiteModule,
  }));
  return cached;
}
