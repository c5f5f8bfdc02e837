/**
 * Tiny DOM builder for the results page. Text always goes through
 * `textContent` (never innerHTML), so names and messages from specs and data
 * files cannot inject markup.
 */

import { toTsv } from '../../logic/panel-copy';
import { decimalPadding, paddingText, panelNumberColumns } from '../../logic/panel-align';

export type Child = Node | string | number | null | undefined | false;

export interface Props {
  class?: string;
  id?: string;
  title?: string;
  role?: string;
  /** `data-*` attributes. */
  data?: Record<string, string | number>;
  /** Other attributes (aria-*, type, tabindex, scope...). */
  attrs?: Record<string, string>;
  onClick?: (ev: MouseEvent) => void;
}

export function h<K extends keyof HTMLElementTagNameMap>(tag: K, props: Props | null = null, ...children: Child[]): HTMLElementTagNameMap[K] {
  const el = document.createElement(tag);
  if (props) {
    if (props.class) el.className = props.class;
    if (props.id) el.id = props.id;
    if (props.title) el.title = props.title;
    if (props.role) el.setAttribute('role', props.role);
    for (const [k, v] of Object.entries(props.data ?? {})) el.dataset[k] = String(v);
    for (const [k, v] of Object.entries(props.attrs ?? {})) el.setAttribute(k, v);
    if (props.onClick) {
      const onClick = props.onClick;
      const target = el as HTMLElement;
      target.addEventListener('click', (ev: MouseEvent) => onClick(ev));
      if (tag !== 'button' && tag !== 'a') {
        // keyboard access for clickable rows
        target.tabIndex = 0;
        target.addEventListener('keydown', (ev: KeyboardEvent) => {
          if (ev.key === 'Enter' || ev.key === ' ') {
            ev.preventDefault();
            onClick(new MouseEvent('click'));
          }
        });
      }
    }
  }
  append(el, children);
  return el;
}

export function append(el: HTMLElement, children: Child[]): void {
  for (const c of children) {
    if (c === null || c === undefined || c === false) continue;
    el.append(typeof c === 'number' ? String(c) : c);
  }
}

/** A table with a header row; `cell` may return a node for rich cells. */
export function table(
  className: string,
  headers: string[],
  rows: string[][],
  opts: { numeric?: (col: number) => boolean; mixed?: boolean; rowProps?: (row: string[], i: number) => Props; caption?: string; copy?: (tsv: string, what: string) => void; what?: string } = {},
): HTMLTableElement {
  const head = h('thead', null, h('tr', null, ...headers.map((t, j) => h('th', { class: opts.numeric?.(j) ? 'num' : undefined, attrs: { scope: 'col' } }, t))));
  // Copy keeps the cells as given (the CLI's digits); the page shows each numeric column in one notation
  const given = rows;
  // (`mixed`: a list of different quantities, such as the goodness of fit, keeps each value's own notation, as the CLI's list does)
  if (!opts.mixed) rows = panelNumberColumns(rows, (j) => opts.numeric?.(j) ?? false);
  // numeric columns aligned on the decimal point (extension/logic/panel-align.ts)
  const pads = headers.map((_, j) => (j > 0 && opts.numeric?.(j) ? decimalPadding(rows.map((r) => r[j] ?? '')) : null));
  const cell = (t: string, i: number, j: number): HTMLElement => {
    if (j === 0) return h('th', { attrs: { scope: 'row' } }, t);
    if (!opts.numeric?.(j)) return h('td', null, t);
    const pad = pads[j]?.[i];
    const text = pad ? paddingText(pad) : '';
    // drawn by page.css as generated content: the cell's text stays the CLI's string (copy, find, tests)
    return h('td', { class: 'num', data: text ? { pad: text } : undefined }, t);
  };
  const body = h('tbody', null, ...rows.map((r, i) => h('tr', opts.rowProps?.(r, i) ?? null, ...r.map((t, j) => cell(t, i, j)))));
  const copy = opts.copy;
  const copyButton = copy
    ? h('button', { class: 'lw-copy', title: 'Copy this table as tab-separated text', attrs: { type: 'button' }, onClick: () => copy(toTsv(headers, given), opts.what ?? opts.caption ?? 'table') }, 'Copy')
    : null;
  const caption = opts.caption || copyButton ? h('caption', null, opts.caption ?? '', copyButton) : null;
  return h('table', { class: className }, caption, head, body);
}

export function clear(el: Element): void {
  while (el.firstChild) el.removeChild(el.firstChild);
}
