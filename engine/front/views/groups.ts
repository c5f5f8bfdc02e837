/**
 * Per-group fits (`per COLUMN`) in the views: the group table of
 * engine/groups/table.ts as formatted rows, the summary across groups as
 * sentences, the worst groups, and which groups get a full per-fit block.
 * Shared by the text summary, the Markdown report and the results panel, so
 * all three print the same digits.
 *
 * Detail rule: a per-group fit with at most DETAIL_ALL_GROUPS (5) groups
 * shows every group's full block (parameter table, goodness of fit,
 * warnings); with more groups only flagged groups get one, worst first and at
 * most MAX_DETAIL_GROUPS (10) - every group is in the table, and all of them
 * are in `--json` and `--groups` output.
 */
import type { FitResult, RunResult } from '../../result';
import { buildGroupTable, worstGroups, type GroupRow, type GroupTable } from '../../groups/table';
import type { GroupFlag } from '../../groups/flags';
import { DIGITS, formatEstimate, formatNumber, MISSING } from '../../format';
import type { Align } from './table';

/** Groups up to this count all get a full per-fit block. */
export const DETAIL_ALL_GROUPS = 5;
/** With more groups, at most this many flagged groups get a full block. */
export const MAX_DETAIL_GROUPS = 10;
/** Rows in the "worst groups" list. */
export const WORST_GROUPS = 5;

/** A run's fits in display order: single fits, and the groups of a per-group fit together. */
export type FitSection =
  | { kind: 'single'; fit: FitResult; index: number }
  | {
      kind: 'groups';
      name: string;
      fits: FitResult[];
      indices: number[];
      table: GroupTable;
      /** Parameters of a joint fit shared by every group (its `result.joint` entry; empty for separate fits). */
      shared: readonly string[];
      /** What the groups are: the groups of a column, or the tables of `fit NAME on A, B, …` (a joint fit's `over`). */
      over: 'column' | 'tables';
    };

/** The fits of a run as sections, in order of first appearance (a per-group fit's groups are contiguous in a result). */
export function fitSections(result: RunResult): FitSection[] {
  const out: FitSection[] = [];
  const byName = new Map<string, Extract<FitSection, { kind: 'groups' }>>();
  result.fits.forEach((fit, index) => {
    if (fit.group === undefined) {
      out.push({ kind: 'single', fit, index });
      return;
    }
    let s = byName.get(fit.name);
    if (!s) {
      const joint = result.joint?.find((j) => j.fit === fit.name);
      s = { kind: 'groups', name: fit.name, fits: [], indices: [], table: buildGroupTable([]), shared: joint?.shared ?? [], over: joint?.over ?? 'column' };
      byName.set(fit.name, s);
      out.push(s);
    }
    s.fits.push(fit);
    s.indices.push(index);
  });
  for (const s of byName.values()) s.table = buildGroupTable(s.fits);
  return out;
}

/** Indices (into `result.fits`) of the groups of a section that get a full block (see the module comment). */
export function detailIndices(section: Extract<FitSection, { kind: 'groups' }>): number[] {
  if (section.fits.length <= DETAIL_ALL_GROUPS) return [...section.indices];
  const flagged = worstGroups(section.table, section.table.rows.length).filter((r) => r.flags.length > 0).slice(0, MAX_DETAIL_GROUPS);
  const position = new Map(section.table.rows.map((r, i) => [r, i]));
  return flagged.map((r) => section.indices[position.get(r)!]);
}

/** What the full blocks after a group table cover, or null when every group has one. */
export function detailNote(section: Extract<FitSection, { kind: 'groups' }>, shown: number): string | null {
  const groups = section.fits.length;
  if (shown >= groups) return null;
  const flagged = section.table.summary.flagged;
  const all = 'every group in full: --json or --groups';
  if (shown === 0) return `No group is flagged, so no group is shown in full (${all}).`;
  const which = shown < flagged ? `the ${shown} worst of the ${flagged} flagged groups` : `the ${shown} flagged group${shown === 1 ? '' : 's'}`;
  return `Full results follow for ${which}, worst first (${all}).`;
}

/** Indices (into `result.fits`) of the fits shown in full: every single fit and the detail groups of each per-group fit, in display order. */
export function shownFitIndices(sections: readonly FitSection[]): number[] {
  return sections.flatMap((s) => (s.kind === 'single' ? [s.index] : detailIndices(s)));
}

export interface GroupTableBlock {
  headers: string[];
  rows: string[][];
  align: Align[];
}

/** Whether any group has a reduced χ² (absolute σ): the χ²/ν column is shown only then. */
function hasChi2(table: GroupTable): boolean {
  return table.rows.some((r) => r.chi2Reduced !== null);
}

/** Column labels of the displayed table: group, n, each parameter and its standard error, R², χ²/ν (with absolute σ), flags. */
export function groupTableHeaders(table: GroupTable): string[] {
  const chi2 = hasChi2(table);
  return table.columns.filter((c) => c.key !== 'stop' && (c.key !== 'chi2_reduced' || chi2)).map((c) => c.label);
}

/** One displayed row: estimates and standard errors to one last digit (format.ts `formatEstimate`). */
export function groupRowCells(table: GroupTable, row: GroupRow): string[] {
  const cells = [row.group, String(row.n)];
  row.estimates.forEach((e, j) => {
    const se = row.stderrs[j];
    if (e === null) cells.push(MISSING, MISSING);
    else {
      const f = formatEstimate(e, se, null, null);
      cells.push(f.estimate, f.stderr);
    }
  });
  cells.push(formatNumber(row.r2, DIGITS.value));
  if (hasChi2(table)) cells.push(formatNumber(row.chi2Reduced, DIGITS.statistic));
  cells.push(row.flags.join(', '));
  return cells;
}

/** The whole table for display, rows in table order (group order). */
export function groupTableBlock(table: GroupTable, rows: readonly GroupRow[] = table.rows): GroupTableBlock {
  const headers = groupTableHeaders(table);
  return {
    headers,
    rows: rows.map((r) => groupRowCells(table, r)),
    align: headers.map((_, c) => (c === 0 || c === headers.length - 1 ? 'left' : 'right')),
  };
}

/** Each group flag in words (group count line, plate-map legend). */
export const FLAG_LABEL: Record<GroupFlag, string> = {
  failed: 'failed',
  not_converged: 'not converged',
  no_dof: 'no degrees of freedom',
  few_dof: 'few degrees of freedom',
  at_bound: 'a parameter at a bound',
  poor_fit: 'poor fit',
};

/** Counts as one sentence: groups, converged, failed, not converged, flagged and by which flag. */
export function groupCountLine(table: GroupTable): string {
  const s = table.summary;
  const byFlag: [GroupFlag, number][] = [
    ['failed', s.failed], ['not_converged', s.notConverged], ['no_dof', s.noDof], ['few_dof', s.fewDof], ['at_bound', s.atBound], ['poor_fit', s.poorFit],
  ];
  const detail = byFlag.filter(([, n]) => n > 0).map(([f, n]) => `${n} ${FLAG_LABEL[f]}`);
  const retried = s.retried > 0 ? ` ${s.retried} retried from their own starting values (${s.recovered} of them converged).` : '';
  return `${s.groups} groups: ${s.converged} converged, ${s.failed} failed, ${s.notConverged} not converged; ${s.flagged} flagged${detail.length ? ` (${detail.join(', ')})` : ''}.${retried}`;
}

/** Headers and rows of the summary across converged groups: per parameter (and R²) the median, quartiles, IQR and count. */
/** The summary across groups; its rows are different quantities (each parameter, R²), so views print it with `mixed` notation. */
export function groupSummaryBlock(table: GroupTable, shared: readonly string[] = []): GroupTableBlock {
  // a joint fit's shared parameters have one value for every group: no spread to show (sharedSummaryLine says it)
  const own = table.summary.parameters.filter((p) => !shared.includes(p.name));
  const rows = [...own, { ...table.summary.r2, name: 'R²' }].map((p) => [
    p.name, formatNumber(p.median, DIGITS.value), formatNumber(p.q1, DIGITS.value), formatNumber(p.q3, DIGITS.value), formatNumber(p.iqr, DIGITS.statistic), String(p.count),
  ]);
  return { headers: ['', 'median', 'Q1', 'Q3', 'IQR', 'groups'], rows, align: ['left', 'right', 'right', 'right', 'right', 'right'] };
}

/** The line under the summary across groups naming a joint fit's shared parameters and their one value, or null without any. */
export function sharedSummaryLine(table: GroupTable, shared: readonly string[]): string | null {
  const values = table.summary.parameters.filter((p) => shared.includes(p.name)).map((p) => `${p.name} = ${formatNumber(p.median, DIGITS.value)}`);
  return values.length ? `Shared by every group (one value each): ${values.join(', ')}.` : null;
}

/** Short sentences per parameter for narrow displays: `k: median 0.31, IQR 0.05 (23 groups)`; a shared parameter: `kd: shared, 1.704`. */
export function groupSummarySentences(table: GroupTable, shared: readonly string[] = []): string[] {
  return table.summary.parameters.map((p) =>
    shared.includes(p.name)
      ? `${p.name}: shared by every group, ${formatNumber(p.median, DIGITS.value)}`
      : `${p.name}: median ${formatNumber(p.median, DIGITS.value)}, IQR ${formatNumber(p.iqr, DIGITS.statistic)} (${p.count} groups)`,
  );
}

/** The worst groups (engine/groups/table.ts `worstGroups`), at most WORST_GROUPS, as `group: flags - reason` lines. */
export function worstGroupLines(table: GroupTable, k = WORST_GROUPS): string[] {
  return worstGroups(table, k).map((r) => {
    const flags = r.flags.length ? r.flags.join(', ') : 'no flag';
    const why = r.stop === 'failed' || !r.converged ? ` - ${r.stop}: ${r.message}` : `, R² ${formatNumber(r.r2, DIGITS.value)}`;
    return `${r.group}: ${flags}${why}`;
  });
}

/** Heading of a per-group section: `Fit decay per group: 96 groups (Levenberg–Marquardt ...)` from its first group. */
export function groupHeading(section: Extract<FitSection, { kind: 'groups' }>): string {
  const f = section.fits[0];
  const n = section.fits.length;
  if (section.over === 'tables') return `Fit ${section.name} over ${n} table${n === 1 ? '' : 's'}: ${f.response} against ${f.predictor ?? 'its columns'}`;
  return `Fit ${section.name} per group: ${f.response} against ${f.predictor ?? 'its columns'}, ${n} groups`;
}
