/**
 * The results panel's version of the "data and fitted curve" chart
 * (engine/front/views/charts.ts `fitChart`), made true in every theme:
 *
 * - A legend of swatches replaces the caption that names colours by their
 *   shade ("dark shade: confidence band"), which holds for the default
 *   palette only: in a dark theme the inner band is the lighter one, in high
 *   contrast the bands are other hues. Each layer's colour becomes a `datum`
 *   colour encoding over one shared scale whose range is the layers' palette
 *   colours, so the page's theme swap (panel/view/theme.ts) recolours the
 *   marks and their swatches alike; each swatch has its layer's opacity.
 * - Rows left out of the fit (weight 0) are drawn hollow in the muted colour,
 *   with the reason in their tooltip.
 *
 * Pure: works on the chart spec as JSON.
 */
import { PALETTE } from '../../engine/front/views/palette';

type Json = Record<string, unknown>;

const isObject = (v: unknown): v is Json => typeof v === 'object' && v !== null && !Array.isArray(v);

/** Layer name → what the legend calls it (in drawing order: the legend lists them in this order). */
function legendLabels(level: string): Record<string, string> {
  return {
    data_points: 'data',
    fitted_curve: 'fitted curve',
    confidence_band: `${level} confidence band`,
    prediction_band: `${level} prediction band`,
  };
}

/** The order of the legend entries. */
const LEGEND_ORDER = ['data_points', 'fitted_curve', 'confidence_band', 'prediction_band'];

/** Why a row of `excluded` is drawn but not fitted (result.ts `ExcludedPoints.reason`). */
export const EXCLUDED_REASON: Record<'weight_zero', string> = {
  weight_zero: 'weight 0: left out of the fit',
};

/** The caption's first sentence with the legend in place of colour words. */
export function legendCaption(hasBands: boolean): string {
  return hasBands ? 'Legend below the plot: data, fitted curve and the bands.' : 'Points: data. Line: fitted values.';
}

/**
 * The fit chart `spec` (a deep copy is returned) with a swatch legend for its
 * named layers and the left-out rows drawn muted with their reason;
 * `level` is the confidence level as the views print it (e.g. "95%").
 */
export function panelFitChart(spec: Json, level: string, excludedReason = EXCLUDED_REASON.weight_zero): Json {
  const out = structuredClone(spec) as Json;
  const layers = Array.isArray(out.layer) ? (out.layer as unknown[]).filter(isObject) : [];
  const labels = legendLabels(level);
  const present = LEGEND_ORDER.filter((name) => layers.some((l) => l.name === name));
  const colourOf = (l: Json): string | undefined => (isObject(l.mark) && typeof l.mark.color === 'string' ? l.mark.color : undefined);
  const domain: string[] = [];
  const range: string[] = [];
  const opacity: number[] = [];
  for (const name of present) {
    const l = layers.find((x) => x.name === name)!;
    const c = colourOf(l);
    if (!c) continue;
    domain.push(labels[name]);
    range.push(c);
    opacity.push(isObject(l.mark) && typeof l.mark.opacity === 'number' ? l.mark.opacity : 1);
  }
  // each swatch at its layer's opacity (one legend for all layers would draw every swatch at one layer's opacity:
  // the curve's swatch at the bands' 0.55 looked brown beside the orange curve in the dark theme)
  const swatchOpacity = domain.map((d, i) => `datum.value === ${JSON.stringify(d)} ? ${opacity[i]} : `).join('') + '1';
  const hasBands = present.includes('confidence_band');
  for (const l of layers) {
    const name = typeof l.name === 'string' ? l.name : '';
    if (name === 'excluded_points') {
      muteExcluded(l, excludedReason);
      continue;
    }
    const i = domain.indexOf(labels[name] ?? '');
    if (i < 0 || !isObject(l.mark) || !isObject(l.encoding)) continue;
    delete l.mark.color;
    l.encoding.color = {
      datum: domain[i],
      type: 'nominal',
      scale: { domain, range },
      legend: { title: null, orient: 'bottom', direction: 'horizontal', symbolType: 'square', symbolSize: 140, labelLimit: 260, encode: { symbols: { update: { opacity: { signal: swatchOpacity } } } } },
    };
  }
  if (isObject(out.config)) out.config.legend = { labelColor: PALETTE.foreground, labelFontSize: 11 };
  // the caption: colour words out, the legend in (the other sentences stay as the CLI prints them)
  if (isObject(out.title) && Array.isArray(out.title.subtitle)) {
    // the views wrap their subtitle into lines: join them, replace the sentence that names shades, and let the
    // page wrap again for its width; "hollow" names a shape, which holds in every theme
    const text = (out.title.subtitle as unknown[]).filter((x): x is string => typeof x === 'string').join(' ');
    out.title.subtitle = [text.replace(/Points: data\. Line: fitted (curve|values)\.( (Dark s|S)hade:[^.]*\.)?/, legendCaption(hasBands))];
  }
  return out;
}

/** Left-out rows: hollow, in the muted colour, each with the reason in its tooltip. */
function muteExcluded(l: Json, reason: string): void {
  if (isObject(l.mark)) l.mark = { ...l.mark, color: PALETTE.muted, opacity: 0.9, strokeDash: [2, 1] };
  if (isObject(l.data) && Array.isArray(l.data.values)) l.data.values = (l.data.values as unknown[]).map((v) => (isObject(v) ? { ...v, reason } : v));
  if (isObject(l.encoding) && Array.isArray(l.encoding.tooltip)) l.encoding.tooltip = [...(l.encoding.tooltip as unknown[]), { field: 'reason', type: 'nominal', title: 'left out' }];
}
