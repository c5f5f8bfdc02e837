/**
 * Widths of the charts of one fit in the results panel, so no card stands
 * half empty: the first chart (data and curve) takes the whole row, the
 * others go two to a row when each still gets `MIN_PAIR_PLOT` pixels of plot,
 * else one to a row at full width. Widths are the charts' whole widths,
 * axes included (the page draws them with Vega-Lite's `fit-x` autosize); the
 * card adds its padding and border (`CARD_EXTRA`, page.css `.lw-chart`).
 *
 * Pure: numbers in, numbers out.
 */

/** Pixels a card adds around its chart (page.css `.lw-chart`: padding 8 px and border 1 px on each side). */
export const CARD_EXTRA = 18;
/** Gap between cards in a row (page.css `.lw-charts` gap). */
export const CARD_GAP = 18;
/** Smallest chart width (axes included) for two cards side by side. */
export const MIN_PAIR_PLOT = 360;
/** Widest plot of the first chart (beyond it lines get hard to follow). */
export const MAX_PLOT = 1100;

export interface ChartSlot {
  /** Chart width in pixels, axes included. */
  width: number;
  /** Whether the card shares its row with another one. */
  paired: boolean;
}

/** A slot per chart, in order, for a content area `available` pixels wide. */
export function chartSlots(count: number, available: number): ChartSlot[] {
  const full = Math.max(280, Math.min(MAX_PLOT, Math.floor(available - CARD_EXTRA)));
  const half = Math.floor((available - CARD_GAP) / 2 - CARD_EXTRA);
  const pair = half >= MIN_PAIR_PLOT;
  const rest = count - 1;
  return Array.from({ length: count }, (_, i) => {
    if (i === 0 || !pair) return { width: full, paired: false };
    // an odd chart left over at the end gets the whole row
    const last = i === count - 1 && rest % 2 === 1;
    return last ? { width: full, paired: false } : { width: Math.min(half, MAX_PLOT), paired: true };
  });
}
