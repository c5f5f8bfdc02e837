/**
 * The plate maps of a per-group fit (chart ids `plate-…`, built by
 * engine/front/views/plate-charts.ts): one map at a time, chosen in a select
 * (flags or a parameter). A click on a well opens that group's fit (the
 * chart's click handler, charts.ts, reads the datum's `group`).
 */
import type { PanelChart } from '../../logic/panel-model';
import { chartFigure, type ChartEvents } from './charts';
import { h } from './dom';

export const isPlateChart = (c: PanelChart): boolean => c.id.startsWith('plate-');

/** The label of a plate map in the chooser: `flags` or the parameter's name. */
function choiceLabel(c: PanelChart): string {
  return c.id === 'plate-flags' ? 'flags' : c.id.replace(/^plate-param-/, '');
}

/** The map chosen last per fit, kept across redraws (a click on a well redraws the page). */
const chosen = new Map<string, string>();

/** The chooser and the chosen map of fit `fit`; `pending` gets the first drawing. */
export function plateMaps(fit: string, charts: PanelChart[], events: ChartEvents, pending: Promise<void>[], width: number): HTMLElement | null {
  if (!charts.length) return null;
  const holder = h('div', { class: 'lw-plate-map' });
  const draw = (c: PanelChart): Promise<void> => {
    const { el, drawn } = chartFigure(c, width, events);
    holder.replaceChildren(el);
    return drawn;
  };
  const first = charts.find((c) => c.id === chosen.get(fit)) ?? charts[0];
  const select = h('select', { class: 'lw-plate-choice', attrs: { 'aria-label': 'Plate map of' } },
    ...charts.map((c) => {
      const o = h('option', { attrs: { value: c.id } }, choiceLabel(c));
      o.selected = c === first;
      return o;
    }));
  select.addEventListener('change', () => {
    const c = charts.find((x) => x.id === select.value);
    if (!c) return;
    chosen.set(fit, c.id);
    document.body.dataset.plateDrawn = 'false';
    void draw(c).then(() => { document.body.dataset.plateDrawn = 'true'; });
  });
  pending.push(draw(first));
  return h('div', { class: 'lw-plate' }, h('label', { class: 'lw-muted' }, 'Plate map of ', select), holder);
}
