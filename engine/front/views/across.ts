/**
 * The charts across curves of a run, in one list the CLI report and the
 * results panel both read: per per-group fit the overlay, the residuals by
 * group, each parameter across groups and (for well labels) the plate maps;
 * per set of fits of the same data (curves.ts `sameDataFitSets`) the overlay
 * and the residuals by fit.
 */
import type { FitResult, RunResult } from '../../result';
import type { GroupTable } from '../../groups/table';
import { fitSections } from './groups';
import { groupCurveSet, sameDataFitSets, type CurveSet } from './curves';
import { groupParameterSpecs, overlayChart, residualsByCurveChart, type GroupChartOptions, type GroupChartSpec } from './group-charts';
import { plateMapSpecs } from './plate-charts';
import { fileStem } from './charts';

export interface AcrossCharts {
  /** `groups`: the per-group fit `name`; `fits`: the fits of the same data named in `name` (comma-separated). */
  kind: 'groups' | 'fits';
  name: string;
  /** Stable key: the fit name for groups, `same-data:<names>` for fits. */
  key: string;
  charts: GroupChartSpec[];
}

/**
 * The across-group charts of one per-group fit, in display order. `shared`: the parameters a joint fit shares
 * (result.ts `JointFitResult.shared`), whose value is one for every group by construction: no chart across
 * groups and no plate map of them (their estimates are in the between-groups table, views/joint.ts).
 */
export function groupSectionCharts(name: string, fits: readonly FitResult[], table: GroupTable, opts: GroupChartOptions = {}, shared: readonly string[] = []): GroupChartSpec[] {
  const set = groupCurveSet(name, fits, new Map(table.rows.map((r) => [r.group, r.flags])));
  // the ids of group-charts.ts `groupParameterSpecs` and plate-charts.ts `plateMapSpecs`
  const skip = new Set(shared.flatMap((p) => [`group-${p}`, `plate-param-${p}`]));
  return [
    ...(set ? [overlayChart(set, opts), residualsByCurveChart(set, opts)] : []),
    ...groupParameterSpecs(fits, table, opts),
    ...plateMapSpecs(table, opts),
  ].filter((c): c is GroupChartSpec => c !== null && !skip.has(c.id));
}

/** The parameters the joint fit of per-group fit `name` shares; none when it is not a joint fit. */
export function sharedParameters(result: RunResult, name: string): string[] {
  return result.joint?.find((j) => j.fit === name)?.shared ?? [];
}

/** The charts of a set of fits of the same data. */
export function sameDataCharts(set: CurveSet, opts: GroupChartOptions = {}): GroupChartSpec[] {
  return [overlayChart(set, opts), residualsByCurveChart(set, opts)].filter((c): c is GroupChartSpec => c !== null);
}

/** Every across-curve chart of a run: per-group fits in order, then sets of fits of the same data. */
export function acrossCharts(result: RunResult, opts: GroupChartOptions = {}): AcrossCharts[] {
  const out: AcrossCharts[] = [];
  for (const s of fitSections(result)) {
    if (s.kind === 'groups') out.push({ kind: 'groups', name: s.name, key: s.name, charts: groupSectionCharts(s.name, s.fits, s.table, opts, sharedParameters(result, s.name)) });
  }
  for (const set of sameDataFitSets(result.fits)) out.push({ kind: 'fits', name: set.name, key: `same-data:${set.name}`, charts: sameDataCharts(set, opts) });
  return out.filter((a) => a.charts.length > 0);
}

/**
 * File name of an across-curve chart: `<fit>~groups-<chart>.svg` for a
 * per-group fit, `<first fit>~same-data-<chart>.svg` for fits of the same
 * data. The `~groups-`/`~same-data-` infix never occurs in a per-fit chart's
 * name (charts.ts `chartFileName`: `~` there is followed by 8 hex digits).
 */
export function acrossFileName(a: AcrossCharts, id: string): string {
  const stem = a.kind === 'groups' ? `${fileStem(a.name)}~groups` : `${fileStem(a.name.split(', ')[0])}~same-data`;
  return `${stem}-${fileStem(id)}.svg`;
}
