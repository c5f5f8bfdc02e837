/**
 * Draws Vega-Lite chart specs with vega-embed, under the panel's strict CSP:
 * expressions go through vega-interpreter (`ast: true`), so nothing is
 * compiled with `eval`/`new Function`; vega-embed's and the tooltip's own
 * style sheets are off (page.css styles the tooltip), so no inline style
 * element is injected. Tooltips of point layers are formatted on hover
 * (tooltips.ts). Each chart gets `data-marks` (number of drawn mark items)
 * once rendered, which the tests read.
 */
import embed, { type Result } from 'vega-embed';
import { expressionInterpreter } from 'vega-interpreter';
import type { PanelChart } from '../../logic/panel-model';
import { h } from './dom';
import { chartImageName } from '../../logic/panel-copy';
import { TITLE_CHAR_PX, wrapSubtitle, wrapTitle } from '../../../engine/front/views/wrap';
import { chartLabel } from '../../../engine/front/views/escape';
import { themed, themeFont, themePalette } from './theme';
import { deferredTooltipHandler, deferTooltips } from './tooltips';

export interface ChartEvents {
  /** A data point with a CSV row was clicked. */
  onRow?: (row: number) => void;
  /** A group's point was clicked (group charts). */
  onGroup?: (group: string) => void;
  onError?: (message: string) => void;
  /** Save the drawn chart (SVG text or a PNG data URL). */
  onSave?: (format: 'png' | 'svg', name: string, data: string) => void;
}

const live = new Set<Result>();

/** Finalizes every drawn chart (before the page redraws). */
export function finalizeCharts(): void {
  for (const r of live) r.finalize();
  live.clear();
}

/** A figure element that draws `chart` into itself, `maxWidth` pixels wide with its axes (0: as the spec says); resolves when drawn. */
export function chartFigure(chart: PanelChart, maxWidth: number, events: ChartEvents): { el: HTMLElement; drawn: Promise<void> } {
  const target = h('div', { class: 'lw-chart-canvas' });
  const el = h('figure', { class: 'lw-chart', data: { chartId: chart.id }, attrs: { 'aria-label': chart.title } }, target);
  const spec = themed(chart.spec, themePalette(), themeFont()) as Record<string, unknown>;
  const ownTitle = titleFrom(spec, chart.title);
  if (typeof spec.width === 'number' && maxWidth > 0) {
    // the whole chart, axes included, `maxWidth` wide (extension/logic/panel-layout.ts); square charts (the Q-Q plot) stay about square
    if (spec.height === spec.width) spec.height = Math.floor(Math.min(maxWidth - 70, 480));
    spec.width = Math.floor(maxWidth);
    spec.autosize = { type: 'fit-x', contains: 'padding' };
    wrapSubtitleOf(spec, maxWidth);
  }
  // the title wrapped again for the drawn width and the page's font; when cut, the full title is the figure's tooltip
  if (ownTitle && typeof spec.width === 'number' && wrapTitleOf(spec, chart.title, spec.width - 70)) el.title = chart.title;
  const tips = deferTooltips(spec); // formatted on hover (tooltips.ts)
  const drawn = embed(target, spec as never, {
    ast: true,
    expr: expressionInterpreter,
    actions: false,
    defaultStyle: false,
    renderer: 'svg',
    tooltip: deferredTooltipHandler(tips, { theme: 'custom', disableDefaultStyle: true }),
    logLevel: 1, // vega.Error
  })
    .then((result) => {
      live.add(result);
      result.view.addEventListener('click', (_event, item) => {
        const datum = (item as { datum?: Record<string, unknown> } | null | undefined)?.datum;
        if (!datum) return;
        if (typeof datum.row === 'number' && events.onRow) events.onRow(datum.row);
        else if (typeof datum.group === 'string' && events.onGroup) events.onGroup(datum.group);
      });
      el.dataset.marks = String(countMarks(target));
      const save = events.onSave;
      if (save) {
        const button = (format: 'png' | 'svg') => h('button', {
          class: 'lw-save', data: { format }, title: `Save this chart as ${format.toUpperCase()}`, attrs: { type: 'button' },
          onClick: () => {
            const name = chartImageName(chart.title, format);
            // PNG at twice the screen resolution, for print
            const image = format === 'svg' ? result.view.toSVG() : result.view.toImageURL('png', 2);
            void image.then((data) => save(format, name, data)).catch((e: unknown) => events.onError?.(`saving ${chart.id}: ${String(e)}`));
          },
        }, format.toUpperCase());
        el.append(h('figcaption', { class: 'lw-chart-actions' }, button('png'), button('svg')));
      }
    })
    .catch((e: unknown) => {
      el.dataset.marks = '0';
      el.append(h('p', { class: 'lw-error' }, `Chart could not be drawn: ${e instanceof Error ? e.message : String(e)}`));
      events.onError?.(`chart ${chart.id}: ${e instanceof Error ? e.message : String(e)}`);
    });
  return { el, drawn };
}

/** Subtitle lines (re)wrapped to the drawn chart's width (engine/front/views/wrap.ts). */
function wrapSubtitleOf(spec: Record<string, unknown>, width: number): void {
  const t = spec.title;
  if (typeof t !== 'object' || t === null || !Array.isArray((t as { subtitle?: unknown }).subtitle)) return;
  const lines = ((t as { subtitle: unknown[] }).subtitle).filter((x): x is string => typeof x === 'string');
  // lines the views wrapped for their width are joined again into sentences before wrapping for this one
  (t as { subtitle: unknown[] }).subtitle = wrapSubtitle([lines.join(' ')].flatMap((x) => x.split(/(?<=\.) (?=[A-Z])/)), width - 24);
}

/** Whether the spec's drawn title is `title` as the views wrap it (charts.ts `top`), so it may be wrapped again from `title`. */
function titleFrom(spec: Record<string, unknown>, title: string): boolean {
  const t = spec.title as { text?: unknown } | undefined;
  const text = t && typeof t === 'object' ? t.text : undefined;
  const drawn = Array.isArray(text) ? text.join(' ') : typeof text === 'string' ? text : null;
  if (drawn === null || typeof spec.width !== 'number') return false;
  return drawn === title || drawn === wrapTitle(title, spec.width).lines.join(' ');
}

/** The spec's title (re)wrapped from the full `title` to `width` pixels (engine/front/views/wrap.ts `wrapTitle`); true when cut. */
function wrapTitleOf(spec: Record<string, unknown>, title: string, width: number): boolean {
  const t = spec.title;
  if (typeof t !== 'object' || t === null) return false;
  const w = wrapTitle(title, width, TITLE_CHAR_PX);
  (t as { text: unknown }).text = w.lines.length === 1 ? chartLabel(w.lines[0]) : w.lines.map(chartLabel);
  return w.shortened;
}

/** Drawn mark items (points, lines, areas, bars) in an SVG chart. */
export function countMarks(root: Element): number {
  return root.querySelectorAll('svg .role-mark path, svg .role-mark line, svg .role-mark rect, svg .role-mark circle').length;
}
