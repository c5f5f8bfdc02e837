/**
 * Tooltips formatted on hover instead of at draw time. A Vega-Lite tooltip
 * field list compiles to an encoding that formats every listed field of
 * every drawn point when the chart is drawn; with 5,000 points per chart and
 * the expression interpreter (no `eval` under our CSP) that was about 15 % of
 * the first paint of a large result (benchmark 10: page 1.10 s → 0.92 s
 * without it, measured 2026-12-02). So before drawing, each named layer's
 * tooltip list is taken out of the spec and its mark gets the bare datum as
 * tooltip (`{expr: "datum"}`, evaluated without formatting); the handler
 * formats the hovered datum with the same fields, titles and d3-format
 * specifiers (through Vega's default locale, as Vega's `format` expression
 * function does for a view without its own locale) and hands it to
 * vega-tooltip, which draws it as before.
 *
 * Tooltip titles are user names (columns, parameters): they stay out of
 * Vega-Lite's compiler (which would write them into expression source, where
 * names such as `then` or `constructor` are illegal), so any tooltip list
 * that cannot be deferred is dropped, and the formatted tooltip is an object
 * without prototype whose keys cannot be vega-tooltip's own `title` or
 * `image` (which it would show as a heading or an image).
 */
import { defaultLocale, type TooltipHandler } from 'vega';
import { Handler, type Options } from 'vega-tooltip';

// vega 6 exports vega-format's defaultLocale at run time; its typings leave it out.
declare module 'vega' {
  export function defaultLocale(): { format(specifier: string): (value: number) => string };
}

export interface TipField {
  field: string;
  title?: string;
  format?: string;
}

/** Tooltip fields per Vega mark name (`<layer name>_marks`, Vega-Lite's naming). */
export type DeferredTips = Map<string, TipField[]>;

const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);

function tipFields(v: unknown): TipField[] | null {
  if (!Array.isArray(v) || v.length === 0) return null;
  const out: TipField[] = [];
  for (const d of v) {
    // plain field references only: anything computed (aggregate, bin, time unit) stays as it was
    if (!isObject(d) || typeof d.field !== 'string' || 'aggregate' in d || 'bin' in d || 'timeUnit' in d) return null;
    out.push({ field: d.field, ...(typeof d.title === 'string' ? { title: d.title } : {}), ...(typeof d.format === 'string' ? { format: d.format } : {}) });
  }
  return out;
}

/** Moves the tooltip field lists of named layers out of `spec` (mutated; pass a copy) and returns them. */
export function deferTooltips(spec: unknown): DeferredTips {
  const tips: DeferredTips = new Map();
  const walk = (node: unknown): void => {
    if (Array.isArray(node)) return node.forEach(walk);
    if (!isObject(node)) return;
    const enc = node.encoding;
    const fields = isObject(enc) ? tipFields(enc.tooltip) : null;
    if (typeof node.name === 'string' && fields && isObject(enc) && (typeof node.mark === 'string' || isObject(node.mark))) {
      tips.set(`${node.name}_marks`, fields);
      delete enc.tooltip;
      node.mark = { ...(typeof node.mark === 'string' ? { type: node.mark } : node.mark), tooltip: { expr: 'datum' } };
    } else if (isObject(enc) && 'tooltip' in enc) {
      delete enc.tooltip; // not deferrable: dropped rather than compiled with user titles
    }
    for (const v of Object.values(node)) walk(v);
  };
  walk(spec);
  return tips;
}

/** The fields of `datum` as the Vega-Lite tooltip would have shown them: title → formatted value. */
export function formatTip(fields: readonly TipField[], datum: Record<string, unknown>): Record<string, string> {
  const locale = defaultLocale();
  const out = Object.create(null) as Record<string, string>;
  for (const f of fields) {
    const v = Object.prototype.hasOwnProperty.call(datum, f.field) ? datum[f.field] : undefined;
    out[tipKey(f.title ?? f.field)] = typeof v === 'number' ? locale.format(f.format ?? '')(v) : v === null || v === undefined ? '' : String(v);
  }
  return out;
}

/** vega-tooltip shows the keys `title` and `image` specially; a name equal to one gets an invisible U+2060 so it stays a row. */
function tipKey(name: string): string {
  return name === 'title' || name === 'image' ? `${name}\u2060` : name;
}

/** A vega-tooltip handler that formats deferred tooltips on hover. */
export function deferredTooltipHandler(tips: DeferredTips, options: Options): TooltipHandler {
  const inner = new Handler(options);
  return (handler, event, item, value) => {
    const name = (item as { mark?: { name?: unknown } } | null | undefined)?.mark?.name;
    const fields = typeof name === 'string' ? tips.get(name) : undefined;
    inner.call(handler, event, item, fields && isObject(value) ? formatTip(fields, value) : value);
  };
}
