/**
 * Leastwise's own chart palette: calm, low-saturation colours with one warm
 * accent for the fitted curve. Keys are roles, not hues, so the results panel
 * can map each role to a theme CSS variable (`--lw-<role>`) and fall back to
 * these values; the headless SVG renderer uses them as they are.
 */

export interface Palette {
  /** Chart background. */
  background: string;
  /** Titles, axis titles and labels. */
  foreground: string;
  /** Subtitles, tick labels, legend labels. */
  muted: string;
  /** Grid lines and axis domain. */
  grid: string;
  /** Observed data points. */
  points: string;
  /** Fitted curve. */
  curve: string;
  /** Confidence band around the curve. */
  confidenceBand: string;
  /** Prediction band (wider, lighter). */
  predictionBand: string;
  /** Zero lines and reference lines. */
  reference: string;
  /** Histogram bars. */
  bars: string;
  /** Points that draw attention (large standardized residuals). */
  highlight: string;
}

export type PaletteRole = keyof Palette;

export const PALETTE: Readonly<Palette> = Object.freeze({
  background: '#fbfaf7',
  foreground: '#2c3a43',
  muted: '#66737c',
  grid: '#e4e2dc',
  points: '#3f6e8c',
  curve: '#b8573e',
  confidenceBand: '#d79a7f',
  predictionBand: '#efd8c6',
  reference: '#8d989f',
  bars: '#7f9c8a',
  highlight: '#9b3d5a',
});

/** Role names in a fixed order (for the panel's CSS variable mapping). */
export const PALETTE_ROLES: readonly PaletteRole[] = Object.keys(PALETTE) as PaletteRole[];

/** CSS variable name the panel uses for a role, e.g. `points` → `--lw-points`. */
export function cssVariable(role: PaletteRole): string {
  return `--lw-${role.replace(/[A-Z]/g, (c) => `-${c.toLowerCase()}`)}`;
}

/** Font stack available everywhere without downloads (SVG viewers substitute locally). */
export const FONT = 'system-ui, -apple-system, "Segoe UI", Roboto, "Helvetica Neue", Arial, sans-serif';

/**
 * Colours for several curves in one chart (groups of a per-group fit, or
 * several fits of the same data), in order; our own set. Chosen so that every
 * pair stays apart for the three common colour-vision deficiencies: the
 * smallest CIELAB ΔE*76 between two of them, after simulating protanopia,
 * deuteranopia and tritanopia (Machado, Oliveira & Fernandes 2009, severity
 * 1), is at least 12 (test/front/views/palette.test.ts computes it); their
 * lightness L* lies in 38..66, readable on the light and the dark panel
 * background. Marker shapes (SERIES_SHAPES) vary with the colour, so no
 * curve is told apart by colour alone.
 */
export const SERIES: readonly string[] = Object.freeze(['#2f6f9f', '#e0892a', '#8a3fc4', '#9c9a6a', '#b23a2e', '#2aa7a3', '#6e5656', '#8f7be0']);

/** Vega marker shapes paired with SERIES, in the same order. */
export const SERIES_SHAPES: readonly string[] = Object.freeze(['circle', 'square', 'triangle-up', 'diamond', 'cross', 'triangle-down', 'triangle-right', 'triangle-left']);

/**
 * Sequential ramp for heat maps (plate maps), low to high; our own. Its
 * lightness falls strictly from stop to stop (tested), so order reads from
 * lightness alone, whatever the colour vision.
 */
export const HEAT_RAMP: readonly string[] = Object.freeze(['#f4eedb', '#d8c98f', '#93ad7c', '#3f8088', '#2c416f']);
