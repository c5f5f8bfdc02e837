/**
 * The printable content of a run, as strings, shared by the text and the
 * Markdown views (they differ only in layout). Digits follow engine/format.ts,
 * thresholds behind the notes engine/thresholds.ts.
 */
import type { DerivedResult, ExpectationResult, FitResult, QueryResult, RunResult, Weighting } from '../../result';
import { weightingText } from '../../messages';
import type { Align } from './table';
import { LOSSES, LOSS_SPECS } from '../../../parser/registry/losses';
import { METHOD_SPECS } from '../../../parser/registry/methods';
import { DIGITS, formatEstimate, formatInteger, formatLevel, formatNumber, formatP, isUsable, MISSING, pClause } from '../../format';
import { CORRELATION_SYMBOL, isLargeCondition, isSerialDurbinWatson, THRESHOLDS } from '../../thresholds';
import { comparisonBlock, groupComparisonBlock } from './comparison';
import { fitQueryBlock } from './queries';
import { residualUnit, squaredUnit } from './units';
import { durbinWatsonHint, influenceEntries, runsHint } from './influence';
import { accountOf, leftOutClause } from './rows';

/** How the views name the solver and the loss of a fit (labels from parser/registry). */
export const METHOD_LABEL: Readonly<Record<FitResult['method'], string>> = {
  linear: METHOD_SPECS.linear.label,
  levenberg_marquardt: METHOD_SPECS.levenberg_marquardt.label,
  gradient_descent: METHOD_SPECS.gradient_descent.label,
};

export const LOSS_LABEL: Readonly<Record<FitResult['loss'], string>> = Object.fromEntries(
  LOSSES.map((l) => [l, LOSS_SPECS[l].label]),
) as Record<FitResult['loss'], string>;

/**
 * How far a fit's numbers can be read as a result: `fitted` (the solver
 * converged), `last_iterate` (it stopped without converging: the values are
 * where it stopped), `not_fitted` (no step was taken: the values are the
 * starting values). The engine withholds every statistic of the last two
 * (engine/run/fit-stats.ts); the views say so wherever they show the fit.
 */
export type FitStatus = 'fitted' | 'last_iterate' | 'not_fitted';

export function fitStatus(fit: FitResult): FitStatus {
  if (fit.stop.converged) return 'fitted';
  return fit.iterations > 0 ? 'last_iterate' : 'not_fitted';
}

/** The marking of a fit that is not a result (null for a fitted one), shared by the CLI, the report and the panel. */
export function notFittedNote(fit: FitResult): string | null {
  switch (fitStatus(fit)) {
    case 'fitted': return null;
    case 'last_iterate':
      return 'Not a fitted result: the values shown are where the solver stopped (its last iterate), not a least-squares solution. Standard errors, intervals, goodness of fit and residual checks are withheld, and no fitted curve is drawn.';
    case 'not_fitted':
      return 'Nothing was fitted: the values shown are the starting values. Standard errors, intervals, goodness of fit and residual checks are withheld, and no fitted curve is drawn.';
  }
}

/** `newton` or `newton [batch=B]` for per-group fits. */
export function fitLabel(fit: FitResult): string {
  return fit.group !== undefined ? `${fit.name} [${fit.group}]` : fit.name;
}

/** How the bounds of a Levenberg–Marquardt fit were handled (engine/solve/nonlinear.ts). */
export const BOUNDS_LABEL: Record<NonNullable<FitResult['boundsMethod']>, string> = {
  reflective: 'interior reflective bounds',
  projection: 'projected bounds',
};

export function fitHeading(fit: FitResult): string {
  return `Fit ${fitLabel(fit)}: ${fit.response} against ${fit.predictor ?? 'its columns'} (${METHOD_LABEL[fit.method]}, ${LOSS_LABEL[fit.loss]})`;
}

/** One sentence on how and why the solver stopped. */
export function stopLine(fit: FitResult): string {
  const verdict = fit.stop.converged ? 'converged' : 'NOT converged';
  const bounds = fit.boundsMethod ? `, ${BOUNDS_LABEL[fit.boundsMethod]}` : '';
  const count = fit.iterations > 0 || fit.method !== 'linear' ? `; ${fit.iterations} iterations, ${fit.evaluations} evaluations${bounds}` : '';
  return `Stopped: ${verdict} (${fit.stop.code}: ${fit.stop.message}${count})`;
}

/** Minima listed by `searchLine` (the rest are counted). */
const SEARCH_MINIMA_SHOWN = 3;

/**
 * One sentence on the multi-start search, when it ran: points tried, distinct
 * minima (lowest first, the reported one marked) and where the fit from the
 * starting values ended. Null when the fit had no search.
 */
export function searchLine(fit: FitResult): string | null {
  const s = fit.search;
  if (!s) return null;
  if (s.skipped) return `Search: not run (${s.skipped})`;
  const shown = s.minima.slice(0, SEARCH_MINIMA_SHOWN).map((m) => `${formatNumber(m.ssr)}${m.reported ? ' reported' : ''}${m.converged ? '' : ' not converged'}`);
  const more = s.minima.length > SEARCH_MINIMA_SHOWN ? `, ${s.minima.length - SEARCH_MINIMA_SHOWN} more` : '';
  const start = s.reason === 'no_start' ? 'computed ' : s.reason === 'asked' ? 'given ' : '';
  const ending = s.lowerElsewhere
    ? `; the fit from the ${start}starting values stopped higher, at SSR ${formatNumber(s.startSsr)}`
    : '; the fit from the starting values reached the lowest';
  const why = s.reason === 'check' && s.mark ? ` (run because ${s.mark})` : '';
  return `Search${why}: ${s.points} starting points, ${s.refined} refined, ${s.minima.length} distinct minim${s.minima.length === 1 ? 'um' : 'a'} by SSR (${shown.join(', ')}${more})${ending}`;
}

/**
 * One sentence on a robust loss: its scale, where the scale came from, and
 * how many points it down-weighted. Null for squared loss.
 */
export function robustLine(fit: FitResult): string | null {
  const r = fit.robust;
  if (!r) return null;
  const from = r.scaleFrom === 'given' ? 'as given' : `${formatNumber(r.tuning, 4)} × the residuals' robust spread (1.4826·MAD)`;
  const low = r.weights.reduce((m, w) => Math.min(m, w), 1);
  const down = r.downweighted === 0
    ? 'no point down-weighted'
    : `${r.downweighted} of ${r.weights.length} points down-weighted (smallest weight ${formatNumber(low, 2)}; weights in the JSON)`;
  return `Robust ${LOSS_LABEL[fit.loss]}: scale ${formatNumber(r.scale, 4)} (${from}); ${down}`;
}

export const PARAMETER_HEADERS = (level: number): string[] => ['parameter', 'estimate', 'std. error', `${formatLevel(level)} low`, `${formatLevel(level)} high`, 'unit', 'note'];

/** Rows of the parameter table: name, estimate, SE, interval ends, unit, note. */
export function parameterRows(fit: FitResult): string[][] {
  const status = fitStatus(fit);
  return fit.parameters.map((p) => {
    const f = formatEstimate(p.estimate, p.fixed ? null : p.stderr, p.fixed ? null : p.lower, p.fixed ? null : p.upper);
    const notes: string[] = [];
    if (p.fixed) notes.push('fixed');
    else if (status === 'last_iterate') notes.push('last iterate, not fitted');
    else if (status === 'not_fitted') notes.push('starting value, not fitted');
    if (p.atBound) notes.push(`at ${p.atBound} bound`);
    if (!p.fixed && isUsable(p.relativeStderr) && p.relativeStderr > THRESHOLDS.relativeStderr) notes.push(`poorly determined (SE ${formatNumber(p.relativeStderr * 100, DIGITS.percent)}% of estimate)`);
    return [p.name, f.estimate, p.fixed ? 'fixed' : f.stderr, p.fixed ? '' : f.lower, p.fixed ? '' : f.upper, p.unit ?? '', notes.join('; ')];
  });
}

export interface Entry {
  label: string;
  value: string;
  note?: string;
  /** The label without a unit, when the label has one (lookups by label: extension/logic/panel-model.ts). */
  key?: string;
}

/** Goodness-of-fit entries in reading order; for a fit that is not a result only the counts and the SSR where it stopped. */
export function goodnessEntries(fit: FitResult): Entry[] {
  const g = fit.goodness;
  const status = fitStatus(fit);
  if (status !== 'fitted') {
    const out: Entry[] = [
      { label: 'points (n)', value: formatInteger(g.n), note: leftOutClause(accountOf(fit)) ?? undefined },
      { label: 'free parameters (p)', value: formatInteger(g.p) },
      { label: 'degrees of freedom', value: formatInteger(g.dof) },
    ];
    if (status === 'last_iterate' && isUsable(g.ssr)) out.push({ label: 'SSR at the last iterate', value: formatNumber(g.ssr), note: 'where the solver stopped, not a minimum' });
    out.push({ label: 'R², RMSE, AIC and the rest', value: 'withheld', note: status === 'last_iterate' ? 'the fit did not converge' : 'nothing was fitted' });
    return out;
  }
  const e: Entry[] = [
    { label: 'points (n)', value: formatInteger(g.n), note: leftOutClause(accountOf(fit)) ?? undefined },
    { label: 'free parameters (p)', value: formatInteger(g.p) },
    { label: 'degrees of freedom', value: formatInteger(g.dof) },
    unitEntry({ label: 'sum of squared residuals (SSR)', value: formatNumber(g.ssr), note: weightedNote(fit, 'ssr') }, squaredUnit(residualUnit(fit, weightingOf(fit).kind))),
    unitEntry({ label: 'residual standard deviation (RMSE)', value: formatNumber(g.rmse), note: weightedNote(fit, 'rmse') }, residualUnit(fit, weightingOf(fit).kind)),
    { label: 'R²', value: formatNumber(g.r2), note: joinNotes(weightedNote(fit, 'r2'), r2Caveat(fit)) },
    { label: 'adjusted R²', value: formatNumber(g.adjR2) },
  ];
  if (fit.sigmaAbsolute) {
    e.push({ label: 'χ²', value: formatNumber(g.chi2) });
    e.push({ label: 'reduced χ² (χ²/dof)', value: formatNumber(g.chi2Reduced, DIGITS.statistic), note: 'near 1 when σ matches the scatter' });
  }
  const share = fit.jointShare;
  if (share) {
    // a group of a joint fit (engine/run/joint-group-stats.ts): pooled s and dof; its own share; no information criteria
    e[2] = { ...e[2], note: 'of the joint fit: all rows less all its parameters (the variance is pooled over the groups)' };
    e[4] = { ...e[4], note: joinNotes(e[4].note, 'pooled over the groups: the s of every interval') };
    e.push({ label: 'share of the parameters', value: formatNumber(share.parameters, DIGITS.statistic), note: `trace of the joint hat matrix over this group's rows; ${formatNumber(share.dof, DIGITS.statistic)} degrees of freedom of its own` });
    e.push({ label: "this group's own RMSE", value: formatNumber(share.rmse), note: `√(SSR / its own degrees of freedom), against the pooled ${formatNumber(share.pooledRmse)}` });
    e.push({ label: 'AIC, AICc, BIC', value: 'joint fit only', note: 'a group with shared parameters is not a model of its own' });
  } else e.push({ label: 'AIC', value: formatNumber(g.aic), note: aicConvention(fit) }, { label: 'AICc', value: formatNumber(g.aicc) }, { label: 'BIC', value: formatNumber(g.bic) });
  e.push({ label: 'condition number', value: formatNumber(g.condition, DIGITS.magnitude), note: isLargeCondition(g.condition) ? `large (above ${formatNumber(THRESHOLDS.condition)}): parameters nearly redundant, digits may be lost` : undefined });
  const r = fit.residuals;
  if (r.durbinWatson !== null) e.push({ label: 'Durbin–Watson', value: formatNumber(r.durbinWatson, DIGITS.magnitude), note: durbinWatsonHint(r.durbinWatson, fit) });
  if (r.runs) e.push({ label: 'runs test p', value: formatP(r.runs.pValue), note: runsHint(r.runs, fit) });
  if (r.shapiroWilk) e.push({ label: 'Shapiro–Wilk p', value: formatP(r.shapiroWilk.pValue), note: `W = ${formatNumber(r.shapiroWilk.w, DIGITS.statistic)}` });
  e.push(...influenceEntries(fit));
  return e;
}

/** An entry whose label gains the unit (`… (RMSE, ng/mL)`); `key` keeps the label without it for lookups. */
function unitEntry(e: Entry, unit: string | undefined): Entry {
  return unit ? { ...e, label: `${e.label.slice(0, -1)}, ${unit})`, key: e.label } : e;
}

/** Notes joined with '; ', or undefined when there are none. */
const joinNotes = (...notes: (string | null | undefined)[]): string | undefined => notes.filter((n): n is string => !!n).join('; ') || undefined;

/** The weighting of a fit: the runner's record (`FitResult.model`), else what the result itself says (σ absolute, weights present). */
export function weightingOf(fit: FitResult): Weighting {
  if (fit.model) return fit.model.weighting;
  if (fit.sigmaAbsolute) return { kind: 'sigma', expression: null };
  return fit.points.weight ? { kind: 'weight', expression: null } : { kind: 'none', expression: null };
}

/**
 * How a weighted fit's SSR, RMSE and R² are to be read (engine/stats/goodness.ts): from the weighted residuals
 * √wᵢ(yᵢ − ŷᵢ); with absolute σ (wᵢ = 1/σᵢ²) SSR is χ² and RMSE is in units of σ. Undefined when unweighted.
 */
export function weightedNote(fit: FitResult, what: 'ssr' | 'rmse' | 'r2'): string | undefined {
  const w = weightingOf(fit).kind;
  if (w === 'none') return undefined;
  if (what === 'ssr') return w === 'sigma' ? 'weighted by 1/σ² (this is χ²)' : 'weighted: Σ w·residual²';
  if (what === 'rmse') return w === 'sigma' ? 'in σ units, not response units: √(χ²/dof), near 1 when σ matches the scatter' : 'weighted: √(Σ w·residual²/dof), in response units for w = 1';
  return 'weighted, about the weighted mean';
}

/**
 * The convention behind AIC (engine/stats/goodness.ts): the Gaussian log-likelihood with all its constants, and
 * k estimated quantities — the p free parameters plus σ when the scatter is estimated, p alone with absolute σ.
 */
export function aicConvention(fit: FitResult): string {
  const p = fit.goodness.p;
  return fit.sigmaAbsolute
    ? `k = p = ${p}: σ given, not estimated; Gaussian log-likelihood with its constants`
    : `k = p + 1 = ${p + 1}: σ counted as an estimated parameter; Gaussian log-likelihood with its constants`;
}

/** The model equation and the weighting, one line for every view's header (null when the result does not carry them). */
export function modelLine(fit: FitResult): string | null {
  if (!fit.model) return null;
  return `Model: ${fit.model.equation}; weighting: ${weightingText.describe(fit.model.weighting)}`;
}

/**
 * The caveat beside R², or null: the text of the fit's `r2_nonlinear` warning,
 * which the engine gives exactly when the model is nonlinear in its free
 * parameters (engine/stats/warnings.ts) — keyed on the model, not on the
 * method, so a model linear in its parameters fitted by an iterative solver
 * carries no caveat. The CLI, the report and the panel all read it here.
 */
export function r2Caveat(fit: FitResult): string | null {
  return fit.warnings.find((w) => w.code === 'r2_nonlinear')?.message ?? null;
}

/**
 * Warning texts with their codes. `r2_nonlinear` is left out: the R² entry of
 * goodnessEntries already carries it (`r2Caveat`).
 */
export function warningLines(fit: FitResult): string[] {
  return fit.warnings.filter((w) => w.code !== 'r2_nonlinear').map((w) => `${w.message}${w.parameters?.length ? ` (${w.parameters.join(', ')})` : ''} [${w.code}]`);
}

/** Caption of a list of strongly correlated parameter pairs: the symbol and the test of the `high_correlation` warning. */
export function correlationCaption(): string {
  return `High correlations (|${CORRELATION_SYMBOL}| > ${formatNumber(THRESHOLDS.correlation)})`;
}

/** Column labels of the solver trace table (`traceRows`). */
export const TRACE_HEADERS = ['iteration', 'cost', 'trial cost', 'gradient', 'step', 'radius', 'ratio', 'accepted', 'step kind', 'bounds met'];

/** Rows of the per-iteration trace (fit --trace), or none. */
export function traceRows(fit: FitResult): string[][] {
  if (!fit.trace) return [];
  // cost to 10 digits: the trace is read for changes in the last digits between iterations
  const n = (v: number | null, sig: number = DIGITS.statistic) => formatNumber(v, sig);
  return fit.trace.records.map((r) => [
    formatInteger(r.iteration), n(r.cost, 10), n(r.trialCost, 10), n(r.gradient, DIGITS.magnitude), n(r.step, DIGITS.magnitude), n(r.radius, DIGITS.magnitude), n(r.ratio, DIGITS.magnitude),
    r.accepted ? 'yes' : 'no', r.kind ? `${r.kind}${r.stepBack !== null && r.stepBack !== undefined ? ` (step back ${formatNumber(r.stepBack)})` : ''}` : '', (r.bounds ?? []).join(', '),
  ]);
}

/** The trace's heading line: solver, records shown and left out. */
export function traceHeading(fit: FitResult): string | null {
  const t = fit.trace;
  if (!t) return null;
  const solver = { levenberg_marquardt: 'Levenberg–Marquardt', reflective_trust_region: 'interior reflective trust region', gradient_descent: 'gradient descent' }[t.solver];
  const omitted = t.omitted > 0 ? `; ${t.omitted} in the middle left out` : '';
  return `Solver trace (${solver}): ${t.records.length} trial steps${omitted}. Cost ½‖r‖²; gradient: the scaled measure of the stop test; step: scaled length; ratio: actual over predicted reduction.`;
}

export interface QueryBlock {
  heading: string;
  /** Sentences shown between the heading and the table: a comparison's decision first (comparison.ts). */
  lead?: string[];
  headers: string[];
  rows: string[][];
  /** Column alignment (numbers right, names and notes left). */
  align: Align[];
  notes: string[];
}

/** One table per query, with the fit's level in the headings. */
export function queryBlocks(result: RunResult): QueryBlock[] {
  // predict, invert and backcalc tables: ./queries.ts
  // (a compare of per-group fits adds its group-by-group table: comparison.ts groupComparisonBlock)
  return result.queries.flatMap((q: QueryResult): QueryBlock[] => {
    if (q.kind !== 'compare') return [fitQueryBlock(result, q)!];
    const byGroup = groupComparisonBlock(q);
    return byGroup ? [comparisonBlock(q), byGroup] : [comparisonBlock(q)];
  });
}

/** `lod` or `lod [batch 2]` for a derived quantity of a per-group fit. */
export function derivedLabel(d: DerivedResult): string {
  return d.group !== undefined ? `${d.name} [${d.group}]` : d.name;
}

/** Lists at most this many groups of a per-group quantity by name in a note; more are counted. */
const NOTE_GROUPS = 5;

/** Labels of the quantities a note applies to; a per-group quantity's groups are summarised when there are many. */
function derivedLabels(ds: readonly DerivedResult[], all: readonly DerivedResult[]): string {
  const names = [...new Set(ds.map((d) => d.name))];
  return names.map((name) => {
    const mine = ds.filter((d) => d.name === name);
    if (mine[0].group === undefined || mine.length <= NOTE_GROUPS) return mine.map(derivedLabel).join(', ');
    const groups = all.filter((d) => d.name === name).length;
    return mine.length === groups ? `${name} (all ${groups} groups)` : `${name} (${mine.length} of ${groups} groups)`;
  }).join(', ');
}

/**
 * The derived quantities as one table (name, value, standard error, interval,
 * unit), or null when there are none. Value, standard error and interval ends
 * share one last digit (formatEstimate). The notes say, per distinct note,
 * which quantities it applies to: how the uncertainty was obtained and under
 * which assumptions, or why a number is missing.
 */
export function derivedBlock(result: RunResult): QueryBlock | null {
  const derived = result.derived ?? [];
  if (derived.length === 0) return null;
  const levels = [...new Set(derived.filter((d) => d.lower !== null && d.upper !== null).map((d) => d.level))];
  const oneLevel = levels.length <= 1;
  const rows = derived.map((d) => {
    const f = formatEstimate(d.value, d.stderr, d.lower, d.upper);
    const hasInterval = d.lower !== null && d.upper !== null;
    const kind = d.dof !== null ? `t, ${d.dof} dof` : 'normal';
    const interval = hasInterval ? `[${f.lower}, ${f.upper}]${oneLevel ? '' : ` (${formatLevel(d.level ?? NaN)}, ${kind})`}` : '';
    return [derivedLabel(d), d.value === null ? MISSING : f.estimate, d.stderr === null ? MISSING : f.stderr, interval, d.unit ?? ''];
  });
  const byNote = new Map<string, DerivedResult[]>();
  for (const d of derived) {
    const list = byNote.get(d.note);
    if (list) list.push(d);
    else byNote.set(d.note, [d]);
  }
  const notes = [...byNote].map(([note, ds]) => `${derivedLabels(ds, derived)}: ${note}`);
  const lv = oneLevel && levels[0] !== undefined && levels[0] !== null ? `${formatLevel(levels[0])} ` : '';
  return {
    heading: 'Derived quantities',
    headers: ['quantity', 'value', 'std. error', `${lv}interval`, 'unit'],
    rows,
    align: ['left', 'right', 'right', 'right', 'left'],
    notes,
  };
}

export function expectationLine(e: ExpectationResult): { verdict: 'PASS' | 'FAIL'; text: string; actual: string; message: string } {
  const text = e.group !== undefined ? `${e.expectation.text} [${e.group}]` : e.expectation.text;
  return { verdict: e.passed ? 'PASS' : 'FAIL', text, actual: e.actual === null ? MISSING : formatNumber(e.actual), message: e.message };
}

export type ExpectationRow = ReturnType<typeof expectationLine>;

/**
 * Expectation lines for display. An expectation checked on more than
 * `manyGroups` groups (default 5) becomes one line for all its groups
 * (`[all 96 groups]`, or `[3 of 96 groups fail]`) followed by the line of
 * each failing group; others give one line per result.
 */
export function expectationRows(result: RunResult, manyGroups = 5): ExpectationRow[] {
  const key = (e: ExpectationResult) => `${e.expectation.text}@${e.expectation.range.start.line}:${e.expectation.range.start.column}`;
  const byKey = new Map<string, ExpectationResult[]>();
  for (const e of result.expectations) {
    const list = byKey.get(key(e));
    if (list) list.push(e);
    else byKey.set(key(e), [e]);
  }
  const out: ExpectationRow[] = [];
  for (const es of byKey.values()) {
    const grouped = es.filter((e) => e.group !== undefined);
    if (grouped.length <= manyGroups) {
      for (const e of es) out.push(expectationLine(e));
      continue;
    }
    const failed = es.filter((e) => !e.passed);
    const tag = failed.length === 0 ? `[all ${es.length} groups]` : `[${failed.length} of ${es.length} groups fail]`;
    out.push({ verdict: failed.length === 0 ? 'PASS' : 'FAIL', text: `${es[0].expectation.text} ${tag}`, actual: '', message: '' });
    for (const e of failed) out.push(expectationLine(e));
  }
  return out;
}

export function expectationTally(result: RunResult): string {
  const n = result.expectations.length;
  const passed = result.expectations.filter((e) => e.passed).length;
  return n === 0 ? 'No expectations.' : `${passed} of ${n} expectations passed.`;
}
