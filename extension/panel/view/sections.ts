/**
 * The results page's sections, each a function from model data to DOM:
 * one fit (parameters, goodness of fit, warnings, correlations, charts),
 * a group table with its across-group charts, and the queries/checks
 * section (predictions, inversions, comparisons, expectations, errors).
 */
import type { PanelChart, PanelFit, PanelGroupTable, PanelModel } from '../../logic/panel-model';
import { chartFigure, type ChartEvents } from './charts';
import { h, table } from './dom';

export interface SectionEvents extends ChartEvents {
  onReveal: (fit: string, param?: string) => void;
  onSelect: (key: string) => void;
  /** Charts of `key` are missing (sent on request). */
  onNeedCharts: (key: string) => void;
}

/** Columns of the parameter table holding numbers (right-aligned). */
const PARAM_NUMERIC = new Set([1, 2, 3, 4]);

export function fitSection(fit: PanelFit, events: SectionEvents, pending: Promise<void>[], width: number): HTMLElement {
  const params = table('lw-params', fit.parameterHeaders, fit.parameterRows, {
    numeric: (j) => PARAM_NUMERIC.has(j),
    rowProps: (r) => ({
      class: fit.flagged.includes(r[0]) ? 'flagged' : undefined,
      data: { param: r[0] },
      title: `Show ${r[0]} in the spec`,
      onClick: () => events.onReveal(fit.name, r[0]),
    }),
    caption: 'Parameters (click a row to show its declaration)',
  });
  const goodness = table('lw-goodness', ['statistic', 'value', 'note'], fit.goodness.map((e) => [e.label, e.value, e.note ?? '']), { numeric: (j) => j === 1 });
  const notes = h('aside', { class: 'lw-notes', attrs: { 'aria-label': 'Warnings' } },
    h('h3', null, 'Warnings'),
    fit.warnings.length
      ? h('ul', { class: 'lw-warnings' }, ...fit.warnings.map((w) => h('li', null, w)))
      : h('p', { class: 'lw-ok' }, 'None.'),
    fit.correlations.length
      ? table('lw-corr', ['parameters', 'correlation'], fit.correlations.map((c) => [`${c.a} · ${c.b}`, c.r]), { numeric: (j) => j === 1, caption: fit.correlationCaption })
      : null,
  );
  const fp = fit.flaggedPoints;
  const flaggedRows = fp && (fp.rows.length || fp.note)
    ? h('div', { class: 'lw-flagged-points' },
        fp.rows.length ? table('lw-points', fp.headers, fp.rows, { numeric: (j) => j < fp.headers.length - 1, caption: 'Rows to check' }) : null,
        fp.note ? h('p', { class: 'lw-muted' }, fp.note) : null)
    : null;
  const stats = h('dl', { class: 'lw-keystats' }, ...fit.keyStats.map((k) => h('div', { title: k.title }, h('dt', null, k.label), h('dd', null, k.value))));
  const charts = h('div', { class: 'lw-charts' });
  if (fit.charts) fillCharts(charts, fit.charts, events, pending, width);
  else {
    charts.append(h('p', { class: 'lw-muted' }, 'Loading charts…'));
    events.onNeedCharts(fit.key);
  }
  return h('section', { class: 'lw-fit', id: `fit-${cssId(fit.key)}`, data: { fitKey: fit.key } },
    h('header', { class: 'lw-fit-head' },
      h('h2', null, fit.label),
      h('p', { class: 'lw-muted' }, fit.heading),
      fit.model ? h('p', { class: 'lw-muted' }, fit.model) : null,
      h('p', { class: fit.converged ? 'lw-stop' : 'lw-stop lw-bad' }, fit.stop),
      fit.search ? h('p', { class: 'lw-stop' }, fit.search) : null,
      fit.robust ? h('p', { class: 'lw-stop' }, fit.robust) : null,
      fit.notFitted ? h('p', { class: 'lw-notfitted lw-bad', role: 'alert' }, fit.notFitted) : null,
    ),
    h('div', { class: 'lw-two' }, params, notes),
    fit.profile
      ? h('div', { class: 'lw-profile' },
          h('p', { class: 'lw-muted' }, fit.profile.line),
          fit.profile.rows.length
            ? table('lw-profile-table', fit.profile.headers, fit.profile.rows, { numeric: (j) => j === 1 || j === 2, caption: 'Profile-likelihood intervals' })
            : null)
      : null,
    flaggedRows,
    stats,
    charts,
    h('details', { class: 'lw-details' }, h('summary', null, 'All statistics and residual tests'), goodness),
  );
}

export function fillCharts(into: HTMLElement, charts: PanelChart[], events: ChartEvents, pending: Promise<void>[], width: number): void {
  into.replaceChildren();
  for (const c of charts) {
    const { el, drawn } = chartFigure(c, width, events);
    into.append(el);
    pending.push(drawn);
  }
}

export function groupSection(g: PanelGroupTable, selected: string | undefined, events: SectionEvents, pending: Promise<void>[], width: number): HTMLElement {
  const rows = g.rows.map((r) => r.cells);
  const tbl = table('lw-groups', g.headers, rows, {
    numeric: (j) => j > 0 && j < g.headers.length - 1,
    rowProps: (_r, i) => ({
      class: [g.rows[i].flags.length ? 'flagged' : '', g.rows[i].key === selected ? 'selected' : ''].filter(Boolean).join(' ') || undefined,
      data: { group: g.rows[i].group },
      title: g.rows[i].flags.length ? `${g.rows[i].flags.join(', ')}: ${g.rows[i].message}` : 'Show this group',
      onClick: () => events.onSelect(g.rows[i].key),
    }),
    caption: 'Groups, worst first (click a row for its fit)',
  });
  const charts = h('div', { class: 'lw-charts' });
  fillCharts(charts, g.charts, events, pending, width);
  return h('section', { class: 'lw-group', data: { fit: g.fit } },
    h('header', { class: 'lw-fit-head' }, h('h2', null, `${g.fit} — per group`), ...g.summary.map((s) => h('p', { class: 'lw-muted' }, s))),
    h('div', { class: 'lw-scroll' }, tbl),
    charts,
  );
}

export function checksSection(m: PanelModel): HTMLElement | null {
  if (!m.queries.length && !m.expectations.length && !m.errors.length) return null;
  const parts: HTMLElement[] = [];
  if (m.errors.length) parts.push(h('div', { class: 'lw-errors' }, h('h3', null, 'Errors'), h('ul', null, ...m.errors.map((e) => h('li', null, e)))));
  if (m.expectations.length) {
    parts.push(h('div', null, h('h3', null, 'Expectations'),
      h('ul', { class: 'lw-expect' }, ...m.expectations.map((e) => h('li', { class: e.verdict === 'PASS' ? 'pass' : 'fail' },
        h('span', { class: 'lw-verdict' }, e.verdict === 'PASS' ? 'passed' : 'failed'), ' ', h('code', null, e.text), ` — actual ${e.actual}`, e.verdict === 'FAIL' ? `: ${e.message}` : '')))));
  }
  for (const q of m.queries) {
    // a comparison leads with its decision: heading, sentences, then the evidence table (engine/front/views/comparison.ts)
    const lead = (q.lead ?? []).map((l) => h('p', { class: 'lw-lead' }, l));
    const body = lead.length || q.headers.length === 0
      ? [h('h3', null, q.heading), ...lead, ...(q.rows.length ? [table('lw-qtable', q.headers, q.rows, { numeric: () => true })] : [])]
      : [table('lw-qtable', q.headers, q.rows, { numeric: () => true, caption: q.heading })];
    parts.push(h('div', { class: 'lw-query' }, ...body, ...q.notes.map((n) => h('p', { class: 'lw-muted' }, n))));
  }
  return h('section', { class: 'lw-checks', id: 'checks' }, h('h2', null, 'Queries and checks'), ...parts);
}

/** A key made safe for an element id. */
export function cssId(key: string): string {
  return key.replace(/[^A-Za-z0-9_-]/g, (c) => `_${c.charCodeAt(0).toString(16)}`);
}
