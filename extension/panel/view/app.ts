/**
 * Layout of the results page: a toolbar (spec, run summary, actions), a
 * navigation rail (one entry per fit, per grouped fit, and "Queries and
 * checks") and the selected entry's content. Stateless between renders: the
 * page calls `render(state)` whenever the model, the selection or the theme
 * changes; `document.body.dataset.rendered` becomes "true" once every chart
 * of a render is drawn (tests wait for it).
 */
import type { FromPage } from '../../logic/panel-protocol';
import type { PanelModel } from '../../logic/panel-model';
import type { ResidualKind, XScale } from '../../logic/panel-chart-options';
import { finalizeCharts } from './charts';
import { clear, h } from './dom';
import { checksSection, fitSection, groupSection, jointSection, sameDataSection, warningsSection, type SectionEvents } from './sections';

export interface AppState {
  model?: PanelModel;
  selected?: string;
  banner?: { kind: 'busy' | 'failed'; text: string };
  /** Residual kind and x axis chosen per fit key. */
  residualKind?: Record<string, ResidualKind>;
  xScale?: Record<string, XScale>;
}

export interface ChartChoice {
  residual?: ResidualKind;
  xScale?: XScale;
}

export interface AppHost {
  post(msg: FromPage): void;
  select(key: string): void;
  choose(key: string, choice: ChartChoice): void;
}

const CHECKS_KEY = '#checks';
/** The list of every warning (opened by the warnings chip). */
export const WARNINGS_KEY = '#warnings';
const groupKey = (fit: string): string => `#group:${fit}`;

let renderCount = 0;

export function render(root: HTMLElement, state: AppState, host: AppHost): void {
  finalizeCharts();
  clear(root);
  const token = ++renderCount;
  document.body.dataset.rendered = 'false';
  const m = state.model;
  if (state.banner) root.append(h('div', { class: `lw-banner ${state.banner.kind}`, role: state.banner.kind === 'failed' ? 'alert' : 'status' }, state.banner.text));
  if (!m) {
    root.append(h('div', { class: 'lw-empty' },
      h('h1', null, 'Leastwise results'),
      h('p', null, 'No results yet. Open a .lsq spec and run “Leastwise: Fit This File”, or use the “Fit” lens above a fit.')));
    document.body.dataset.rendered = 'true';
    return;
  }
  const selected = resolveSelection(m, state.selected);
  root.append(toolbar(m, host), h('div', { class: 'lw-body' }, nav(m, selected, host), main(m, selected, host, token, state)));
}

/** The entry to show: the stored key if it still exists, else the first entry. */
export function resolveSelection(m: PanelModel, key: string | undefined): string {
  const keys = navKeys(m);
  if (key && (keys.includes(key) || m.fits.some((f) => f.key === key))) return key;
  return keys[0] ?? '';
}

function navKeys(m: PanelModel): string[] {
  const keys: string[] = [];
  const seenGroups = new Set<string>();
  for (const f of m.fits) {
    if (f.group === undefined) keys.push(f.key);
    else if (!seenGroups.has(f.name)) {
      seenGroups.add(f.name);
      keys.push(groupKey(f.name));
    }
  }
  if (m.findings.length) keys.push(WARNINGS_KEY);
  if (m.queries.length || m.expectations.length || m.errors.length) keys.push(CHECKS_KEY);
  return keys;
}

function toolbar(m: PanelModel, host: AppHost): HTMLElement {
  const hl = m.headline;
  const chip = (text: string, kind: 'ok' | 'warn' | 'bad' | 'plain', title?: string, open?: string) => open
    ? h('button', { class: `lw-chip ${kind}`, title, data: { open }, onClick: () => host.select(open) }, text)
    : h('span', { class: `lw-chip ${kind}`, title }, text);
  const chips = [
    chip(`${hl.converged}/${hl.fits} converged`, hl.converged === hl.fits ? 'ok' : 'bad', 'Fits (each group of a per-group fit counts once) that converged, of all declared'),
    hl.notConverged ? chip(`${hl.notConverged} not converged`, 'bad', 'Results that are not estimates: their statistics are withheld') : null,
    hl.failed ? chip(`${hl.failed} failed`, 'bad', 'Declared fits without a result (see the reason in each entry)') : null,
    hl.notRun ? chip(`${hl.notRun} not run`, 'plain', 'Declared fits the last run did not ask for') : null,
    chip(`${hl.warnings} warning${hl.warnings === 1 ? '' : 's'}`, hl.warnings ? 'warn' : 'plain', hl.warnings ? 'Show every warning (counted as in the Problems panel)' : undefined, hl.warnings ? WARNINGS_KEY : undefined),
    hl.expectations ? chip(`${hl.expectations - hl.failedExpectations}/${hl.expectations} expectations`, hl.failedExpectations ? 'bad' : 'ok', undefined, CHECKS_KEY) : null,
    hl.errors ? chip(`${hl.errors} error${hl.errors === 1 ? '' : 's'}`, 'bad', undefined, CHECKS_KEY) : null,
  ];
  const when = new Date(m.startedAt);
  return h('header', { class: 'lw-toolbar' },
    h('div', { class: 'lw-title' }, h('h1', null, m.specName), h('span', { class: 'lw-muted', title: m.startedAt }, Number.isNaN(when.getTime()) ? '' : `fitted ${isoMinute(when)}`)),
    h('div', { class: 'lw-chips' }, ...chips),
    h('div', { class: 'lw-actions' },
      h('button', { class: 'lw-btn primary', onClick: () => host.post({ type: 'refit' }), title: 'Run the spec again' }, 'Fit again'),
      h('button', { class: 'lw-btn', onClick: () => host.post({ type: 'export', format: 'markdown' }) }, 'Markdown'),
      h('button', { class: 'lw-btn', onClick: () => host.post({ type: 'export', format: 'json' }) }, 'JSON'),
      h('button', { class: 'lw-btn', onClick: () => host.post({ type: 'export', format: 'svg' }) }, 'SVG'),
    ),
  );
}

/** A time as ISO 8601 to the minute, in UTC (`2026-12-03 14:05 UTC`): the one date form of every view. */
export function isoMinute(d: Date): string {
  return `${d.toISOString().slice(0, 16).replace('T', ' ')} UTC`;
}

function nav(m: PanelModel, selected: string, host: AppHost): HTMLElement {
  const items = navKeys(m).map((key) => {
    let label = key;
    let status: 'ok' | 'warn' | 'bad' = 'ok';
    let note: string | null = null;
    if (key === WARNINGS_KEY) {
      label = `Warnings (${m.findings.length})`;
      status = 'warn';
    } else if (key === CHECKS_KEY) {
      label = 'Queries and checks';
      status = m.headline.failedExpectations || m.headline.errors ? 'bad' : 'ok';
    } else if (key.startsWith('#group:')) {
      const name = key.slice('#group:'.length);
      const g = m.groups.find((x) => x.fit === name);
      label = `${name} (${g?.rows.length ?? 0} groups)`;
      status = g?.rows.some((r) => r.flags.includes('failed') || r.flags.includes('not_converged')) ? 'bad' : g?.rows.some((r) => r.flags.length) ? 'warn' : 'ok';
    } else {
      const f = m.fits.find((x) => x.key === key);
      status = !f?.converged ? 'bad' : f.warnings.length ? 'warn' : 'ok';
      if (f && f.state !== 'converged') note = f.state.replace('_', ' ');
    }
    const active = key === selected || (key.startsWith('#group:') && selected.startsWith(`${key.slice('#group:'.length)}/`));
    return h('li', null, h('button', {
      class: `lw-nav-item${active ? ' active' : ''}`,
      data: { key },
      attrs: { 'aria-current': active ? 'true' : 'false' },
      onClick: () => host.select(key),
    }, h('span', { class: `lw-dot ${status}`, attrs: { 'aria-hidden': 'true' } }), h('span', { class: 'lw-nav-label' }, label), note ? h('span', { class: 'lw-nav-state' }, note) : null));
  });
  return h('nav', { class: 'lw-nav', attrs: { 'aria-label': 'Fits' } }, h('ul', null, ...items));
}

function main(m: PanelModel, selected: string, host: AppHost, token: number, state: AppState): HTMLElement {
  const el = h('main', { class: 'lw-main', id: 'main' });
  const pending: Promise<void>[] = [];
  // room for a chart: the window less the navigation rail (beside the content above 640 px, on top below)
  const viewport = window.innerWidth || document.body.clientWidth || 900;
  // (the content area: the window less the rail, the main padding and a scroll bar)
  const width = Math.max(300, viewport - (viewport > 640 ? 210 + 36 + 16 : 36 + 16));
  const events: SectionEvents = {
    onReveal: (fit, param) => host.post({ type: 'reveal', fit, param }),
    onSelect: (key) => host.select(key),
    onNeedCharts: (key) => host.post({ type: 'requestCharts', key }),
    onRow: (row) => {
      const f = m.fits.find((x) => x.key === shownFitKey);
      if (f) host.post({ type: 'openRow', fit: f.name, group: f.group, row });
    },
    onGroup: (group) => {
      const f = m.fits.find((x) => x.group === group && (shownGroupFit === undefined || x.name === shownGroupFit));
      if (f) host.select(f.key);
    },
    onError: (message) => host.post({ type: 'log', level: 'error', message }),
    choice: (key) => ({ residual: state.residualKind?.[key], xScale: state.xScale?.[key] }),
    onChoose: (key, choice) => host.choose(key, choice),
    onCopy: (text, what) => host.post({ type: 'copy', text, what }),
    onSave: (format, name, data) => host.post({ type: 'saveChart', format, name, data }),
  };
  let shownFitKey: string | undefined;
  let shownGroupFit: string | undefined;
  if (selected === WARNINGS_KEY) {
    el.append(warningsSection(m, events));
  } else if (selected === CHECKS_KEY) {
    const s = checksSection(m, events.onCopy);
    if (s) el.append(s);
  } else if (selected.startsWith('#group:') || m.fits.find((f) => f.key === selected)?.group !== undefined) {
    const name = selected.startsWith('#group:') ? selected.slice('#group:'.length) : m.fits.find((f) => f.key === selected)!.name;
    shownGroupFit = name;
    const g = m.groups.find((x) => x.fit === name);
    const fitKey = selected.startsWith('#group:') ? g?.rows[0]?.key : selected;
    // a joint fit's comparison between its groups leads: it answers the question the shared parameters ask
    for (const j of m.joint ?? []) if (j.fit === name) el.append(jointSection(j, events.onCopy));
    if (g) el.append(groupSection(g, fitKey, events, pending, width));
    const f = m.fits.find((x) => x.key === fitKey);
    if (f) {
      shownFitKey = f.key;
      el.append(fitSection(f, events, pending, width));
    }
  } else {
    const f = m.fits.find((x) => x.key === selected);
    if (f) {
      shownFitKey = f.key;
      el.append(fitSection(f, events, pending, width));
      const same = sameDataSection(m, f.key, events, pending, width);
      if (same) el.append(same);
    }
    const checks = checksSection(m, events.onCopy);
    if (checks && m.fits.filter((x) => x.group === undefined).length === 1) el.append(checks);
  }
  void Promise.allSettled(pending).then(() => {
    if (token === renderCount) document.body.dataset.rendered = 'true';
  });
  return el;
}
