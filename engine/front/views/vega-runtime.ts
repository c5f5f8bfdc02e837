/**
 * vega and vega-lite for headless rendering. Kept behind one async accessor so
 * callers do not care how the libraries are loaded; build.mjs aliases
 * `vega-canvas` to its browser build so these static imports bundle into the
 * CommonJS outputs (no native canvas: SVG text widths are estimated).
 */
import * as vega from 'vega';
import * as vegaLite from 'vega-lite';

export interface VegaRuntime {
  vega: typeof vega;
  vegaLite: typeof vegaLite;
}

const runtime: VegaRuntime = { vega, vegaLite };

/** The two libraries (async for callers written against lazy loading). */
export function loadVega(): Promise<VegaRuntime> {
  return Promise.resolve(runtime);
}
