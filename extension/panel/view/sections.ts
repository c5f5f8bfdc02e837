/**
 * The results page's sections, each a function from model data to DOM:
 * one fit (parameters, goodness of fit, warnings, correlations, charts),
 * a group table with its across-group charts, the between-groups comparison
 * of a joint fit, and the queries/checks section (predictions, inversions,
 * comparisons, expectations, errors).
 */
import type { PanelChart, PanelFit, PanelGroupTable, PanelModel } from '../../logic/panel-model';
import type { PanelJoint } from '../../logic/panel-joint';
import { groupsPhrase } from '../../logic/panel-warnings';
import { chartSlots } from '../../logic/panel-layout';
import { canLogX, PREDICTOR_CHARTS, RESIDUAL_CHARTS, RESIDUAL_KIND_LABEL, withResidualKind, withXScale, xScaleOf, type ResidualKind, type XScale } from '../../logic/panel-chart-options';
import { chartFigure, type ChartEvents } from './charts';
import { h, table } from './dom';
import { isPlateChart, plateMaps } from './plate';

export interface SectionEvents extends ChartEvents {
  onReveal: (fit: string, param?: string) => void;
  onSelect: (key: string) => void;
  /** Charts of `key` are missing (sent on request). */
  onNeedCharts: (key: string) => void;
  /** The reader's residual kind and x axis for fit `key` (undefined: the defaults). */
  choice: (key: string) => { residual?: ResidualKind; xScale?: XScale };
  onChoose: (key: string, choice: { residual?: ResidualKind; xScale?: XScale }) => void;
  /** Copy a table's tab-separated text. */
  onCopy?: (tsv: string, what: string) => void;
}

/** Columns of the parameter table holding numbers (right-aligned). */
const PARAM_NUMERIC = new Set([1, 2, 3, 4]);

export function fitSection(fit: PanelFit, events: SectionEvents, pending: Promise<void>[], width: number): HTMLElement {
  if (!fit.hasResult) return missingFitSection(fit);
  const params = table('lw-params', fit.parameterHeaders, fit.parameterRows, {
    numeric: (j) => PARAM_NUMERIC.has(j),
    rowProps: (r) => ({
      class: fit.flagged.includes(r[0]) ? 'flagged' : undefined,
      data: { param: r[0] },
      title: `Show ${r[0]} in the spec`,
      onClick: () => events.onReveal(fit.name, r[0]),
    }),
    caption: 'Parameters (click a row to show its declaration)',
    copy: events.onCopy,
  });
  const goodness = table('lw-goodness', ['statistic', 'value', 'note'], fit.goodness.map((e) => [e.label, e.value, e.note ?? '']), { numeric: (j) => j === 1, mixed: true, copy: events.onCopy });
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
        fp.rows.length ? table('lw-points', fp.headers, fp.rows, { numeric: (j) => j < fp.headers.length - 1, caption: 'Rows to check', copy: events.onCopy }) : null,
        fp.note ? h('p', { class: 'lw-muted' }, fp.note) : null)
    : null;
  const stats = h('dl', { class: 'lw-keystats' }, ...fit.keyStats.map((k) => h('div', { title: k.title }, h('dt', null, k.label), h('dd', null, k.value))));
  const charts = h('div', { class: 'lw-charts' });
  const choices = fit.charts ? chartControls(fit, fit.charts, events) : null;
  if (fit.charts) fillCharts(charts, choices!.charts, events, pending, width);
  else {
    charts.append(h('p', { class: 'lw-muted' }, 'Loading charts…'));
    events.onNeedCharts(fit.key);
  }
  return h('section', { class: 'lw-fit', id: `fit-${cssId(fit.key)}`, data: { fitKey: fit.key, state: fit.state } },
    h('header', { class: 'lw-fit-head' },
      h('h2', null, fit.label, ...(fit.state === 'converged' ? [] : [' ', h('span', { class: `lw-state ${fit.state}` }, fit.state.replace('_', ' '))])),
      h('p', { class: 'lw-muted' }, fit.heading),
      h('p', { class: fit.leftOut ? 'lw-rows lw-has-left-out' : 'lw-rows' }, fit.rows),
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
            ? table('lw-profile-table', fit.profile.headers, fit.profile.rows, { numeric: (j) => j === 1 || j === 2, caption: 'Profile-likelihood intervals', copy: events.onCopy })
            : null)
      : null,
    fit.bootstrap
      ? h('div', { class: 'lw-bootstrap' },
          h('p', { class: 'lw-muted' }, fit.bootstrap.line),
          fit.bootstrap.rows.length
            ? table('lw-bootstrap-table', fit.bootstrap.headers, fit.bootstrap.rows, { numeric: (j) => j >= 1, caption: 'Bootstrap intervals' })
            : null)
      : null,
    flaggedRows,
    stats,
    choices?.bar ?? null,
    charts,
    h('details', { class: 'lw-details' }, h('summary', null, 'All statistics and residual tests'), goodness),
  );
}

/** A row of buttons choosing one of `options`; the chosen one is pressed. */
function segmented<T extends string>(label: string, name: string, options: readonly T[], chosen: T, text: (o: T) => string, pick: (o: T) => void, disabled: (o: T) => boolean = () => false): HTMLElement {
  return h('div', { class: 'lw-segmented', role: 'group', data: { control: name }, attrs: { 'aria-label': label } },
    h('span', { class: 'lw-muted' }, `${label}:`),
    ...options.map((o) => {
      const b = h('button', { class: `lw-seg${o === chosen ? ' on' : ''}`, data: { value: o }, attrs: { 'aria-pressed': o === chosen ? 'true' : 'false' }, onClick: () => { if (o !== chosen) pick(o); } }, text(o));
      if (disabled(o)) {
        b.disabled = true;
        b.title = 'Not available for this fit';
      }
      return b;
    }));
}

/** The residual-kind and x-axis switches of a fit, and its charts as chosen. */
function chartControls(fit: PanelFit, charts: PanelChart[], events: SectionEvents): { bar: HTMLElement | null; charts: PanelChart[] } {
  const choice = events.choice(fit.key);
  const kind: ResidualKind = choice.residual && fit.residualKinds.includes(choice.residual) ? choice.residual : fit.residualDefault;
  const predictorCharts = charts.filter((c) => PREDICTOR_CHARTS.includes(c.id));
  const viewsScale: XScale | undefined = predictorCharts.length ? xScaleOf(predictorCharts[0].spec) : undefined;
  const logOk = predictorCharts.length > 0 && predictorCharts.every((c) => canLogX(c.spec));
  const scale: XScale | undefined = viewsScale && (choice.xScale === 'log' && !logOk ? 'linear' : choice.xScale ?? viewsScale);
  const shown = charts.map((c) => {
    let spec = c.spec;
    if (RESIDUAL_CHARTS.includes(c.id) && kind !== 'raw') spec = withResidualKind(spec, kind);
    if (scale && PREDICTOR_CHARTS.includes(c.id) && scale !== viewsScale) spec = withXScale(spec, scale);
    return spec === c.spec ? c : { ...c, spec };
  });
  const hasResiduals = charts.some((c) => RESIDUAL_CHARTS.includes(c.id));
  const controls = [
    hasResiduals && fit.residualKinds.length
      ? segmented('Residuals', 'residual', ['raw', 'standardized', 'percent'] as const, kind, (o) => RESIDUAL_KIND_LABEL[o], (o) => events.onChoose(fit.key, { residual: o }), (o) => !fit.residualKinds.includes(o))
      : null,
    scale
      ? segmented('x axis', 'x-scale', ['linear', 'log'] as const, scale, (o) => o, (o) => events.onChoose(fit.key, { xScale: o }), (o) => o === 'log' && !logOk)
      : null,
  ].filter((x): x is HTMLElement => x !== null);
  return { bar: controls.length ? h('div', { class: 'lw-chart-controls' }, ...controls) : null, charts: shown };
}

/** A declared fit without a result: its state and why, in place of tables and charts. */
function missingFitSection(fit: PanelFit): HTMLElement {
  return h('section', { class: 'lw-fit lw-missing', id: `fit-${cssId(fit.key)}`, data: { fitKey: fit.key, state: fit.state } },
    h('header', { class: 'lw-fit-head' },
      h('h2', null, fit.label, ' ', h('span', { class: `lw-state ${fit.state}` }, fit.state === 'failed' ? 'failed' : 'not run')),
      h('p', { class: 'lw-muted' }, fit.heading)),
    h('div', { class: fit.state === 'failed' ? 'lw-notfitted lw-bad' : 'lw-notfitted', role: fit.state === 'failed' ? 'alert' : undefined },
      h('p', null, fit.state === 'failed' ? 'This fit has no result:' : 'This fit has no result in the last run:'),
      h('ul', { class: 'lw-reasons' }, ...fit.reasons.map((r) => h('li', null, r)))),
    h('p', { class: 'lw-muted' }, 'No parameters, statistics or charts are shown. A comparison that names it compares the others and says it left this one out; other queries of it are listed under the errors.'),
  );
}

/** Every warning of the run, counted as in the Problems panel; each names the fit (or groups) to open. */
export function warningsSection(m: PanelModel, events: SectionEvents): HTMLElement {
  const byFit = new Map<string, typeof m.findings>();
  for (const f of m.findings) byFit.set(f.fit, [...(byFit.get(f.fit) ?? []), f]);
  const blocks = [...byFit].map(([fit, list]) => {
    const g = m.groups.find((x) => x.fit === fit);
    return h('div', { class: 'lw-warn-fit', data: { fit } },
      h('h3', null, h('button', { class: 'lw-link', onClick: () => events.onSelect(g ? `#group:${fit}` : fit) }, fit), ` — ${list.length} warning${list.length === 1 ? '' : 's'}`),
      g ? h('p', { class: 'lw-muted lw-flag-summary' }, g.flagSummary) : null,
      h('ul', { class: 'lw-warnings' }, ...list.map((w) => h('li', { data: { code: w.code } },
        w.text, ` [${w.code}]`,
        w.groups ? h('span', { class: 'lw-muted' }, ' — ', groupsPhrase(w.groups), ' ', ...w.keys.slice(0, 5).map((k) => h('button', { class: 'lw-link', onClick: () => events.onSelect(k) }, k.slice(fit.length + 1)))) : null))));
  });
  return h('section', { class: 'lw-warnings-all', id: 'warnings' },
    h('h2', null, `Warnings (${m.findings.length})`),
    h('p', { class: 'lw-muted' }, 'Counted as in the Problems panel: one entry per warning of a fit, and one per kind of warning of a per-group fit, naming its groups.'),
    ...blocks);
}

export function fillCharts(into: HTMLElement, charts: PanelChart[], events: ChartEvents, pending: Promise<void>[], width: number): void {
  into.replaceChildren();
  const slots = chartSlots(charts.length, width);
  charts.forEach((c, i) => {
    const { el, drawn } = chartFigure(c, slots[i].width, events);
    if (slots[i].paired) el.classList.add('paired');
    into.append(el);
    pending.push(drawn);
  });
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
    copy: events.onCopy,
  });
  const charts = h('div', { class: 'lw-charts' });
  fillCharts(charts, g.charts.filter((c) => !isPlateChart(c)), events, pending, width);
  const plates = plateMaps(g.fit, g.charts.filter(isPlateChart), events, pending, width);
  return h('section', { class: 'lw-group', data: { fit: g.fit } },
    h('header', { class: 'lw-fit-head' }, h('h2', null, `${g.fit} — per group`), ...g.summary.map((s) => h('p', { class: 'lw-muted' }, s))),
    plates,
    h('div', { class: 'lw-scroll' }, tbl),
    charts,
  );
}

/**
 * The between-groups comparison of a joint fit (extension/logic/panel-joint.ts, the CLI's blocks): the joint
 * solve, its tables (shared estimates, shared-versus-separate F tests, pairs with Fieller's interval), the
 * readings and the caution.
 */
export function jointSection(j: PanelJoint, onCopy?: (tsv: string, what: string) => void): HTMLElement {
  return h('section', { class: j.converged ? 'lw-joint' : 'lw-joint lw-not-converged', data: { fit: j.fit } },
    h('header', { class: 'lw-fit-head' },
      h('h2', null, j.heading, ...(j.converged ? [] : [' ', h('span', { class: 'lw-state not_converged' }, 'not converged')])),
      ...j.lead.map((l, i) => h('p', { class: i === 0 ? (j.converged ? 'lw-stop' : 'lw-stop lw-bad') : 'lw-muted' }, l))),
    ...j.tables.map((t) => h('div', { class: 'lw-scroll' },
      table('lw-qtable lw-joint-table', t.headers, t.rows, { numeric: (c) => t.numeric.includes(c), caption: t.title, copy: onCopy }))),
    h('ul', { class: 'lw-joint-readings' }, ...j.readings.map((r) => h('li', null, r))),
    h('p', { class: 'lw-caution', role: 'note' }, j.caution));
}

export function checksSection(m: PanelModel, onCopy?: (tsv: string, what: string) => void): HTMLElement | null {
  if (!m.queries.length && !m.expectations.length && !m.errors.length) return null;
  const parts: HTMLElement[] = [];
  if (m.errors.length) parts.push(h('div', { class: 'lw-errors' }, h('h3', null, 'Errors'), h('ul', null, ...m.errors.map((e) => h('li', null, e)))));
  const gc = m.groupChecks;
  if (gc && gc.expectations.length) {
    const passed = gc.expectations.reduce((s, e) => s + e.passed, 0);
    const failed = gc.expectations.reduce((s, e) => s + e.failed, 0);
    parts.push(h('div', { class: 'lw-expect-summary' },
      h('h3', null, `Expectations: ${passed} passed, ${failed} failed`),
      h('ul', { class: 'lw-expect' }, ...gc.expectations.map((e) => h('li', { class: e.failed ? 'fail' : 'pass', data: { passed: e.passed, failed: e.failed } },
        h('span', { class: 'lw-verdict' }, e.failed ? 'failed' : 'passed'), ' ', h('code', null, e.text), ` — ${e.passed} passed, ${e.failed} failed`,
        e.failures.length
          ? h('ul', { class: 'lw-failures' }, ...e.failures.map((f) => h('li', null, f.group !== undefined ? `[${f.group}] ` : '', `actual ${f.actual}: ${f.message}`)))
          : null)))));
  } else if (m.expectations.length) {
    parts.push(h('div', null, h('h3', null, 'Expectations'),
      h('ul', { class: 'lw-expect' }, ...m.expectations.map((e) => h('li', { class: e.verdict === 'PASS' ? 'pass' : 'fail' },
        h('span', { class: 'lw-verdict' }, e.verdict === 'PASS' ? 'passed' : 'failed'), ' ', h('code', null, e.text), ` — actual ${e.actual}`, e.verdict === 'FAIL' ? `: ${e.message}` : '')))));
  }
  if (gc?.derived) {
    // in place of the long list of the derived table (one row per quantity and group); its notes stay
    const notes = m.queries.find((q) => q.heading === 'Derived quantities')?.notes ?? [];
    parts.push(h('div', { class: 'lw-derived-groups' }, h('div', { class: 'lw-scroll' }, table('lw-qtable lw-derived-table', gc.derived.headers, gc.derived.rows, { numeric: (j) => j > 0, caption: 'Derived quantities per group', copy: onCopy })),
      ...notes.map((n) => h('p', { class: 'lw-muted' }, n))));
  }
  for (const q of m.queries) {
    if (gc?.derived && q.heading === 'Derived quantities') continue;
    // a comparison leads with its decision: heading, sentences, then the evidence table (engine/front/views/comparison.ts)
    const lead = (q.lead ?? []).map((l) => h('p', { class: 'lw-lead' }, l));
    const body = lead.length || q.headers.length === 0
      ? [h('h3', null, q.heading), ...lead, ...(q.rows.length ? [table('lw-qtable', q.headers, q.rows, { numeric: () => true, what: q.heading, copy: onCopy })] : [])]
      : [table('lw-qtable', q.headers, q.rows, { numeric: () => true, caption: q.heading, copy: onCopy })];
    parts.push(h('div', { class: 'lw-query' }, ...body, ...q.notes.map((n) => h('p', { class: 'lw-muted' }, n))));
  }
  return h('section', { class: 'lw-checks', id: 'checks' }, h('h2', null, 'Queries and checks'), ...parts);
}

/** A key made safe for an element id. */
export function cssId(key: string): string {
  return key.replace(/[^A-Za-z0-9_-]/g, (c) => `_${c.charCodeAt(0).toString(16)}`);
}

/** The charts of the fits of the same data as fit `key` (model.sameData), or null when it has none. */
export function sameDataSection(m: PanelModel, key: string, events: ChartEvents, pending: Promise<void>[], width: number): HTMLElement | null {
  const set = m.sameData?.find((s) => s.fits.includes(key));
  if (!set) return null;
  const charts = h('div', { class: 'lw-charts' });
  fillCharts(charts, set.charts, events, pending, width);
  return h('section', { class: 'lw-same-data', data: { fits: set.fits.join(',') } }, h('h3', null, 'Fits of the same data'), charts);
}
