/**
 * Group tables: one row per group of a `per COLUMN` fit with each free
 * parameter's estimate and standard error, fit quality and flags, plus a
 * summary across groups (median, quartiles, IQR, counts of failed and flagged
 * groups). Pure data in, JSON-ready data out (non-finite numbers become null).
 *
 * Summary figures use the groups whose fit converged (stop.converged) and
 * whose estimate is finite; failed and non-converged groups are counted, not
 * averaged in.
 */
import type { FitResult, StopCode } from '../result';
import { flagsOf, holmRejected, isNonlinear, runsP, type FlagOptions, type GroupFlag } from './flags';
import { THRESHOLDS } from '../thresholds';
import { spreadOf, type Spread } from './quantile';

export type GroupColumnKind = 'text' | 'integer' | 'number' | 'flags';

export interface GroupColumn {
  /** Machine name, also the CSV header: `group`, `n`, `<param>`, `<param>_se`, `r2`, `chi2_reduced`, `stop`, `flags`. */
  key: string;
  /** Short human label for tables. */
  label: string;
  kind: GroupColumnKind;
  /** The parameter a value column belongs to. */
  parameter?: string;
}

export interface GroupRow {
  group: string;
  n: number;
  stop: StopCode;
  converged: boolean;
  /** Per parameter in `GroupTable.parameters` order; null when absent or not finite. */
  estimates: (number | null)[];
  stderrs: (number | null)[];
  r2: number | null;
  /** Reduced χ² when σ is absolute, else null. */
  chi2Reduced: number | null;
  flags: GroupFlag[];
  /** The solver's stop message (the reason of a failure). */
  message: string;
  /** The group did not converge from the shared start and was fitted again (engine/groups/group-job.ts). */
  retried: boolean;
}

export interface ParameterSummary extends Spread {
  name: string;
}

export interface GroupSummary {
  groups: number;
  converged: number;
  failed: number;
  notConverged: number;
  /** Groups without degrees of freedom (`no_dof`) and with few (`few_dof`). */
  noDof: number;
  fewDof: number;
  atBound: number;
  poorFit: number;
  /** Groups with at least one flag (failed ones included). */
  flagged: number;
  /** Groups fitted again after the shared start did not converge, and how many of those converged. */
  retried: number;
  recovered: number;
  parameters: ParameterSummary[];
  /** Spread of R² over converged groups. */
  r2: Spread;
}

export interface GroupTable {
  fit: string;
  /** Free parameter names (fixed in every group are left out), in declaration order. */
  parameters: string[];
  columns: GroupColumn[];
  rows: GroupRow[];
  summary: GroupSummary;
}

const finiteOrNull = (v: number | null | undefined): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

/** Builds the table of a group-by fit's results (one FitResult per group, in display order). */
export function buildGroupTable(results: readonly FitResult[], options: FlagOptions = {}): GroupTable {
  const parameters = freeParameterNames(results);
  // the runs tests of the nonlinear groups, decided as one family (Holm; engine/groups/flags.ts poor_fit)
  const tested = results.map((fit) => (fit.stop.converged && !fit.sigmaAbsolute && isNonlinear(fit) ? runsP(fit) : null));
  const rejected = holmRejected(tested, THRESHOLDS.groupFamilyAlpha);
  const rows = results.map((fit, i) => rowOf(fit, parameters, options.runsRejected === undefined ? { ...options, runsRejected: rejected[i] } : options));
  return {
    fit: results[0]?.name ?? '',
    parameters,
    columns: columnsFor(parameters),
    rows,
    summary: summarize(rows, parameters),
  };
}

function freeParameterNames(results: readonly FitResult[]): string[] {
  const names: string[] = [];
  const free = new Set<string>();
  for (const fit of results) {
    for (const p of fit.parameters) {
      if (!names.includes(p.name)) names.push(p.name);
      if (!p.fixed) free.add(p.name);
    }
  }
  return names.filter((n) => free.has(n));
}

function columnsFor(parameters: readonly string[]): GroupColumn[] {
  const cols: GroupColumn[] = [
    { key: 'group', label: 'group', kind: 'text' },
    { key: 'n', label: 'n', kind: 'integer' },
  ];
  for (const name of parameters) {
    cols.push({ key: name, label: name, kind: 'number', parameter: name });
    cols.push({ key: `${name}_se`, label: `se(${name})`, kind: 'number', parameter: name });
  }
  cols.push({ key: 'r2', label: 'R²', kind: 'number' });
  cols.push({ key: 'chi2_reduced', label: 'χ²/ν', kind: 'number' });
  cols.push({ key: 'stop', label: 'stop', kind: 'text' });
  cols.push({ key: 'flags', label: 'flags', kind: 'flags' });
  return cols;
}

function rowOf(fit: FitResult, parameters: readonly string[], options: FlagOptions): GroupRow {
  const byName = new Map(fit.parameters.map((p) => [p.name, p]));
  const failed = fit.stop.code === 'failed';
  return {
    group: fit.group ?? '',
    n: fit.goodness.n,
    stop: fit.stop.code,
    converged: fit.stop.converged,
    estimates: parameters.map((n) => (failed ? null : finiteOrNull(byName.get(n)?.estimate))),
    stderrs: parameters.map((n) => (failed ? null : finiteOrNull(byName.get(n)?.stderr))),
    r2: failed ? null : finiteOrNull(fit.goodness.r2),
    chi2Reduced: failed ? null : finiteOrNull(fit.goodness.chi2Reduced),
    flags: flagsOf(fit, options),
    message: fit.stop.message,
    retried: fit.retry !== undefined,
  };
}

function summarize(rows: readonly GroupRow[], parameters: readonly string[]): GroupSummary {
  const ok = rows.filter((r) => r.converged && !r.flags.includes('failed'));
  const count = (flag: GroupFlag) => rows.filter((r) => r.flags.includes(flag)).length;
  return {
    groups: rows.length,
    converged: ok.length,
    failed: count('failed'),
    notConverged: count('not_converged'),
    noDof: count('no_dof'),
    fewDof: count('few_dof'),
    atBound: count('at_bound'),
    poorFit: count('poor_fit'),
    flagged: rows.filter((r) => r.flags.length > 0).length,
    retried: rows.filter((r) => r.retried).length,
    recovered: rows.filter((r) => r.retried && r.converged).length,
    parameters: parameters.map((name, j) => ({ name, ...spreadOf(ok.map((r) => r.estimates[j] ?? NaN)) })),
    r2: spreadOf(ok.map((r) => r.r2 ?? NaN)),
  };
}

const TIER: Record<GroupFlag | 'none', number> = { failed: 0, not_converged: 1, no_dof: 2, poor_fit: 3, few_dof: 4, at_bound: 5, none: 6 };

/**
 * The k worst rows, worst first: failed, then not converged, then without
 * degrees of freedom, then poor fit, then few degrees of freedom, then at a
 * bound, then unflagged; within a tier the larger misfit first
 * (|ln χ²/ν| with absolute σ, else 1 − R²; unknown misfit last), ties in table order.
 */
export function worstGroups(table: GroupTable, k: number): GroupRow[] {
  const tier = (r: GroupRow) => Math.min(...r.flags.map((f) => TIER[f]), TIER.none);
  const misfit = (r: GroupRow) =>
    r.chi2Reduced !== null && r.chi2Reduced > 0 ? Math.abs(Math.log(r.chi2Reduced)) : r.r2 !== null ? 1 - r.r2 : -Infinity;
  return table.rows
    .map((row, index) => ({ row, index, tier: tier(row), misfit: misfit(row) }))
    .sort((a, b) => a.tier - b.tier || b.misfit - a.misfit || a.index - b.index)
    .slice(0, Math.max(0, Math.floor(k)))
    .map((e) => e.row);
}

