/**
 * The results panel's view model: what the page draws, built from a RunResult
 * with the same view functions as the CLI (engine/front/views/summary.ts for
 * tables, engine/front/views/charts.ts for the Vega-Lite charts, engine/groups for
 * group tables), so both show the same digits and the same charts.
 *
 * Charts are built with the default palette; the page swaps each palette
 * colour for the theme colour of the same role (see panel/view/theme.ts).
 * Per-point data never travels: charts carry their thinned data
 * (≤ MAX_MARKS marks per layer), so the model stays small enough for the
 * webview's saved state. Charts of group fits beyond `eagerGroupCharts` are
 * sent on request (`chartsForKey`).
 *
 * Pure: runs in the fit worker, in tests and in the extension host.
 */
import type { FitResult, RunResult } from '../../engine/result';
import { chartSpecs, type ChartSpec } from '../../engine/front/views/charts';
import { hasProfileTable, PROFILE_HEADERS, profileLine, profileRows } from '../../engine/front/views/profile';
import { BOOTSTRAP_HEADERS, bootstrapLine, bootstrapRows, derivedIntervalBlock, hasBootstrapTable } from '../../engine/front/views/bootstrap';
import { derivedBlock, fitStatus, goodnessEntries, notFittedNote, PARAMETER_HEADERS, parameterRows, queryBlocks, expectationLine, fitLabel, fitHeading, modelLine, robustLine, searchLine, stopLine, warningLines, type Entry, type QueryBlock } from '../../engine/front/views/summary';
import { buildGroupTable, worstGroups } from '../../engine/groups/table';
import { sharedParameters } from '../../engine/front/views/across';
import type { GroupFlag } from '../../engine/groups/flags';
import { groupCountLine, groupRowCells, groupSummarySentences, groupTableHeaders } from '../../engine/front/views/groups';
import { groupsNSentence } from '../../engine/front/views/rows';
import { DIGITS, formatLevel, formatNumber } from '../../engine/format';
import { isHighCorrelation } from '../../engine/thresholds';
import { flaggedPointRows, flaggedPointsNote } from '../../engine/front/views/influence';
import { groupParameterCharts, sameDataPanelCharts, type PanelSameData } from './panel-group-charts';
import { panelFitChart } from './panel-fit-chart';
import { defaultResidualKind, RESIDUAL_CHARTS, residualKinds, withPercent, type ResidualKind } from './panel-chart-options';
import { leftOutRows, leftOutSentence, rowsLine } from './panel-rows';
import { correlationCaption } from '../../engine/front/views/summary';
import { derivedGroupTable, summariseChecks, summariseExpectations, type ExpectationSummary } from './panel-checks';
import { flagSummary, warningFindings, type WarningFinding } from './panel-warnings';
import { declaredOrder, FIT_STATE_LABEL, fitState, missingFits, stateCounts, type FitState, type MissingFit } from './panel-states';
import { panelJoint, type PanelJoint } from './panel-joint';

/** Version of the model's shape; a saved page state of another version is not restored (2: the correlation list's caption; 3: fit states, fits without a result). */
export const PANEL_MODEL_VERSION = 3 as const;

/** A chart as the page receives it (same shape as engine/front/views/charts.ts ChartSpec). */
export interface PanelChart {
  id: string;
  title: string;
  spec: Record<string, unknown>;
}

export interface PanelFit {
  /** `name`, or `name/group` for a group's fit. */
  key: string;
  name: string;
  group?: string;
  label: string;
  heading: string;
  /** The model equation and the weighting (engine/front/views/summary.ts `modelLine`), when the result carries them. */
  model: string | null;
  stop: string;
  /** The multi-start search's sentence (engine/front/views/summary.ts `searchLine`), when one ran. */
  search: string | null;
  /** A robust loss's sentence (scale and down-weighted points, engine/front/views/summary.ts `robustLine`). */
  robust: string | null;
  converged: boolean;
  /** Converged, not converged, failed (no result, `reasons` say why) or not run (extension/logic/panel-states.ts). */
  state: FitState;
  /** Whether the run has a result for it (false: a failed fit without one, or a fit not run; `reasons` say why). */
  hasResult: boolean;
  /** Why a fit has no result (the run errors naming it), or why it did not converge (the stop message); empty when converged. */
  reasons: string[];
  /** The marking of a fit that is not a result (engine/front/views/summary.ts `notFittedNote`), shown as a banner; null when fitted. */
  notFitted: string | null;
  parameterHeaders: string[];
  /** Formatted rows; column 0 is the parameter name. */
  parameterRows: string[][];
  /** Parameter names flagged (at a bound) for highlighting. */
  flagged: string[];
  /**
   * Caption of the correlation list (`correlations`: the pairs the engine warns
   * about, engine/thresholds.ts `isHighCorrelation`, each `r` the coefficient
   * as the warning prints it), with the symbol ρ and the threshold
   * (engine/front/views/summary.ts `correlationCaption`).
   */
  correlationCaption: string;
  /** n and the rows the fit left out, with why (extension/logic/panel-rows.ts `rowsLine`). */
  rows: string;
  /** How many rows the fit left out (weight 0, empty cells); 0 when none. */
  leftOut: number;
  /** A few headline figures shown above the charts (the full list is `goodness`). */
  keyStats: { label: string; value: string; title: string }[];
  goodness: Entry[];
  warnings: string[];
  /** Pairs of free parameters the engine warns about (see `correlationCaption`). */
  correlations: { a: string; b: string; r: string }[];
  /** Profile-likelihood intervals (engine/front/views/profile.ts): the line saying what was done, and the table when computed; null when the fit has none (additive). */
  profile?: { line: string; headers: string[]; rows: string[][] } | null;
  /** Bootstrap intervals (engine/front/views/bootstrap.ts): the line saying what was done, and the table when computed; null when the fit asked for none (additive). */
  bootstrap?: { line: string; headers: string[]; rows: string[][] } | null;
  /**
   * Rows flagged by the influence and outlier rules (engine/front/views/influence.ts `flaggedPointRows`, the same
   * table as the CLI and the report) and the note on their rules; no rows and a null note when nothing is flagged.
   */
  flaggedPoints: { headers: string[]; rows: string[][]; note: string | null };
  /** Charts, or null when they are sent on request. */
  charts: PanelChart[] | null;
  /** The residual kind the residual charts start with (standardized for a weighted fit) and the kinds offered (extension/logic/panel-chart-options.ts). */
  residualDefault: ResidualKind;
  residualKinds: ResidualKind[];
}

export interface PanelGroupRow {
  group: string;
  key: string;
  n: number;
  cells: string[];
  flags: GroupFlag[];
  message: string;
}

export interface PanelGroupTable {
  fit: string;
  headers: string[];
  /** Worst first (engine/groups/table.ts `worstGroups`). */
  rows: PanelGroupRow[];
  summary: string[];
  /** The flags of `rows` in one sentence (extension/logic/panel-warnings.ts `flagSummary`). */
  flagSummary: string;
  charts: PanelChart[];
}

export interface PanelModel {
  version: typeof PANEL_MODEL_VERSION;
  specUri: string;
  specName: string;
  /** ISO time the run started. */
  startedAt: string;
  run: { tool: string; toolVersion: string; data: { name: string; path: string; rows: number }[] };
  /**
   * `fits`: every entry (a declared fit, or each group of a per-group fit), with or without a result; then the
   * entries per state (they add up to `fits`).
   */
  headline: { fits: number; converged: number; notConverged: number; failed: number; notRun: number; warnings: number; expectations: number; failedExpectations: number; errors: number };
  /** Fit names as declared in the spec (when the host knew them), kept for a later merge of runs of single fits. */
  declaredFits: string[];
  fits: PanelFit[];
  /** Every warning, counted as the Problems panel counts them (`headline.warnings` is its length; extension/logic/panel-warnings.ts). */
  findings: WarningFinding[];
  groups: PanelGroupTable[];
  /** Query tables; the derived-quantity table (engine/front/views/summary.ts `derivedBlock`) comes first when there is one. */
  queries: QueryBlock[];
  expectations: { verdict: 'PASS' | 'FAIL'; text: string; actual: string; message: string }[];
  /**
   * Checks of per-group fits summarised (extension/logic/panel-checks.ts): each expectation with its passed and
   * failed counts and the failures; the derived quantities as a group × quantity table. Null without groups.
   */
  groupChecks: { expectations: ExpectationSummary[]; derived: { headers: string[]; rows: string[][] } | null } | null;
  errors: string[];
  /** Single fits of the same data drawn together (extension/logic/panel-group-charts.ts; additive, optional). */
  sameData?: PanelSameData[];
  /** The between-groups comparison of each joint fit, shown in its group entry (extension/logic/panel-joint.ts; additive, optional: absent without joint fits). */
  joint?: PanelJoint[];
}

export interface ModelOptions {
  specUri: string;
  specName: string;
  /** Group fits whose charts are included up front (the worst first). Default 6. */
  eagerGroupCharts?: number;
  /** Names of the fits the spec declares, in order (from the plan): fits without a result are listed too. Default: those the run names. */
  declaredFits?: readonly string[];
}

export function fitKey(f: { name: string; group?: string }): string {
  return f.group === undefined ? f.name : `${f.name}/${f.group}`;
}

export function buildPanelModel(run: RunResult, opts: ModelOptions): PanelModel {
  const eager = new Set<string>();
  const groups: PanelGroupTable[] = [];
  for (const [name, fits] of groupedFits(run)) {
    const table = buildGroupTable(fits);
    const worst = worstGroups(table, table.rows.length);
    worst.slice(0, opts.eagerGroupCharts ?? 6).forEach((r) => eager.add(fitKey({ name, group: r.group })));
    groups.push({
      fit: name,
      // the same columns, digits and summary sentences as the CLI and the report (engine/front/views/groups.ts)
      headers: groupTableHeaders(table),
      rows: worst.map((r) => ({
        group: r.group,
        key: fitKey({ name, group: r.group }),
        n: r.n,
        cells: groupRowCells(table, r),
        flags: r.flags,
        message: r.message,
      })),
      // the rows of the whole fit, as the CLI's line under the per-group heading (engine/front/views/rows.ts)
      summary: [groupCountLine(table), groupsNSentence(fits), ...groupSummarySentences(table, sharedParameters(run, name))],
      flagSummary: flagSummary(table.rows),
      charts: groupParameterCharts(fits, table, sharedParameters(run, name)),
    });
  }
  const declared = opts.declaredFits ?? [];
  const missing = missingFits(run, declared);
  const order = declaredOrder(declared, [...run.fits.map((f) => f.name), ...missing.map((m) => m.name)]);
  const fits = [...run.fits.map((f) => panelFit(f, f.group === undefined || eager.has(fitKey(f)))), ...missing.map(missingPanelFit)]
    .map((f, i) => ({ f, i }))
    .sort((a, b) => (order.get(a.f.name) ?? 0) - (order.get(b.f.name) ?? 0) || a.i - b.i)
    .map((x) => x.f);
  const counts = stateCounts(fits.map((f) => f.state));
  const findings = warningFindings(run.fits);
  return {
    version: PANEL_MODEL_VERSION,
    specUri: opts.specUri,
    specName: opts.specName,
    startedAt: run.provenance.startedAt,
    run: { tool: run.provenance.tool, toolVersion: run.provenance.toolVersion, data: run.provenance.data.map((d) => ({ name: d.name, path: d.path, rows: d.rows })) },
    headline: {
      fits: fits.length,
      converged: counts.converged,
      notConverged: counts.not_converged,
      failed: counts.failed,
      notRun: counts.not_run,
      warnings: findings.length,
      expectations: run.expectations.length,
      failedExpectations: run.expectations.filter((e) => !e.passed).length,
      errors: run.errors.length,
    },
    declaredFits: [...order.keys()],
    fits,
    findings,
    groups,
    queries: [derivedBlock(run), derivedIntervalBlock(run), ...queryBlocks(run)].filter((b): b is QueryBlock => b !== null),
    expectations: run.expectations.map(expectationLine),
    groupChecks: summariseChecks(run.expectations) || derivedGroupTable(run.derived ?? [])
      ? { expectations: summariseExpectations(run.expectations), derived: derivedGroupTable(run.derived ?? []) }
      : null,
    errors: run.errors.map((e) => `${e.message}${e.file ? ` (${e.file}${e.row ? `, line ${e.row}` : ''})` : ''}`),
    sameData: sameDataPanelCharts(run),
    ...(run.joint?.length ? { joint: panelJoint(run) } : {}),
  };
}

/** Fits run per group, by fit name, in run order. */
function groupedFits(run: RunResult): Map<string, FitResult[]> {
  const out = new Map<string, FitResult[]>();
  for (const f of run.fits) {
    if (f.group === undefined) continue;
    const list = out.get(f.name);
    if (list) list.push(f);
    else out.set(f.name, [f]);
  }
  return out;
}

export function panelFit(f: FitResult, withCharts: boolean): PanelFit {
  return {
    key: fitKey(f),
    name: f.name,
    ...(f.group !== undefined ? { group: f.group } : {}),
    label: fitLabel(f),
    heading: fitHeading(f),
    model: modelLine(f),
    stop: stopLine(f),
    search: searchLine(f),
    robust: robustLine(f),
    converged: f.stop.converged,
    state: fitState(f),
    hasResult: true,
    reasons: f.stop.converged ? [] : [f.stop.message],
    notFitted: notFittedNote(f),
    parameterHeaders: PARAMETER_HEADERS(f.level),
    parameterRows: parameterRows(f),
    flagged: f.parameters.filter((p) => p.atBound).map((p) => p.name),
    rows: rowsLine(f),
    leftOut: leftOutRows(f).total,
    correlationCaption: correlationCaption(),
    keyStats: keyStats(f),
    goodness: goodnessEntries(f),
    warnings: warningLines(f),
    correlations: highCorrelations(f),
    profile: panelProfile(f),
    bootstrap: panelBootstrap(f),
    flaggedPoints: flaggedPoints(f),
    charts: withCharts ? panelCharts(f) : null,
    residualDefault: defaultResidualKind({ weighted: f.points.weight !== null || f.sigmaAbsolute, converged: f.stop.converged }),
    residualKinds: residualKinds(f.stop.converged),
  };
}

/** The entry of a declared fit without a result: its state and reasons, nothing else to show. */
function missingPanelFit(m: MissingFit): PanelFit {
  const label = FIT_STATE_LABEL[m.state];
  return {
    key: m.name,
    name: m.name,
    label: m.name,
    heading: `Fit ${m.name}: ${label}, no result`,
    stop: m.state === 'failed' ? `Failed: ${m.reasons.join(' ')}` : `Not run: ${m.reasons.join(' ')}`,
    model: null,
    search: null,
    robust: null,
    converged: false,
    state: m.state,
    hasResult: false,
    reasons: m.reasons,
    notFitted: null,
    parameterHeaders: [],
    parameterRows: [],
    flagged: [],
    rows: '',
    leftOut: 0,
    correlationCaption: correlationCaption(),
    keyStats: [],
    goodness: [],
    warnings: [],
    correlations: [],
    profile: null,
    flaggedPoints: { headers: [], rows: [], note: null },
    charts: [],
    residualDefault: 'raw',
    residualKinds: [],
  };
}

function panelBootstrap(f: FitResult): PanelFit['bootstrap'] {
  const line = bootstrapLine(f);
  if (!line) return null;
  return { line, headers: hasBootstrapTable(f) ? BOOTSTRAP_HEADERS(f.level) : [], rows: hasBootstrapTable(f) ? bootstrapRows(f) : [] };
}

function panelProfile(f: FitResult): PanelFit['profile'] {
  const line = profileLine(f);
  if (!line) return null;
  return { line, headers: hasProfileTable(f) ? PROFILE_HEADERS(f.level) : [], rows: hasProfileTable(f) ? profileRows(f) : [] };
}

export function panelCharts(f: FitResult): PanelChart[] {
  return chartSpecs(f).map((c: ChartSpec) => {
    const spec = c.spec as unknown as Record<string, unknown>;
    // the fit chart with a swatch legend instead of colour words, left-out rows muted (panel-fit-chart.ts)
    const shown = c.id === 'fit' ? panelFitChart(spec, formatLevel(f.level)) : RESIDUAL_CHARTS.includes(c.id) ? withPercent(structuredClone(spec)) : spec;
    return { id: c.id, title: c.title, spec: shown };
  });
}

/** Charts of the fit with key `key`, for a page that asks for them later. */
export function chartsForKey(run: RunResult, key: string): PanelChart[] | null {
  const f = run.fits.find((x) => fitKey(x) === key);
  return f ? panelCharts(f) : null;
}

/**
 * The headline figures: the same strings as the goodness-of-fit table of the
 * CLI and the report (summary.ts `goodnessEntries`), looked up by its labels,
 * so the panel never prints a number with other digits than the CLI.
 */
function keyStats(f: FitResult): PanelFit['keyStats'] {
  const g = f.goodness;
  const counts: PanelFit['keyStats'] = [
    { label: 'n', value: String(g.n), title: `rows fitted${leftOutSentence(f) ? ` (${leftOutSentence(f)})` : ''}` },
    ...(leftOutRows(f).total ? [{ label: 'left out', value: String(leftOutRows(f).total), title: leftOutSentence(f) ?? '' }] : []),
    { label: 'dof', value: String(g.dof), title: 'degrees of freedom' },
  ];
  // a fit that is not a result shows no goodness-of-fit figures (the engine withholds them)
  if (fitStatus(f) !== 'fitted') return [...counts, { label: 'fit', value: 'not fitted', title: notFittedNote(f) ?? '' }];
  const entries = goodnessEntries(f);
  const entry = (label: string): Entry | undefined => entries.find((e) => (e.key ?? e.label) === label);
  const stat = (short: string, label: string, title: string): PanelFit['keyStats'] => {
    const e = entry(label);
    return e ? [{ label: short, value: e.value, title: e.note ? `${title} (${e.note})` : title }] : [];
  };
  return [
    ...counts,
    ...stat('RMSE', 'residual standard deviation (RMSE)', 'residual standard deviation'),
    ...(f.sigmaAbsolute ? stat('χ²/ν', 'reduced χ² (χ²/dof)', 'reduced chi-square') : []),
    ...stat('R²', 'R²', 'coefficient of determination'),
    ...stat('AICc', 'AICc', 'small-sample Akaike information criterion'),
  ];
}

function flaggedPoints(f: FitResult): PanelFit['flaggedPoints'] {
  const t = flaggedPointRows(f);
  return { headers: t.headers, rows: t.rows, note: flaggedPointsNote(f) };
}

function highCorrelations(f: FitResult): { a: string; b: string; r: string }[] {
  const out: { a: string; b: string; r: string }[] = [];
  const ps = f.parameters;
  for (let i = 0; i < ps.length; i++) {
    for (let j = i + 1; j < ps.length; j++) {
      const r = f.correlation[i]?.[j];
      if (!ps[i].fixed && !ps[j].fixed && typeof r === 'number' && isHighCorrelation(r)) out.push({ a: ps[i].name, b: ps[j].name, r: formatNumber(r, DIGITS.statistic) });
    }
  }
  return out;
}
