/**
 * Charts across curves for the results panel: the same Vega-Lite specs as the
 * CLI report (engine/front/views/across.ts) as PanelCharts. For a per-group
 * fit: the overlay of every group's curve (a legend that selects), residuals
 * by group, one chart per free parameter (estimate ± one standard error per
 * group, group labels on the axis, flagged groups highlighted) and, when the
 * group labels are well names, the plate maps (ids `plate-…`; the page shows
 * one at a time with a chooser, panel/view/plate.ts). Clicking a parameter
 * point or a well opens that group's fit (each datum carries `group`).
 */
import type { FitResult, RunResult } from '../../engine/result';
import type { GroupTable } from '../../engine/groups/table';
import { groupSectionCharts, sameDataCharts } from '../../engine/front/views/across';
import { sameDataFitSets } from '../../engine/front/views/curves';
import type { PanelChart } from './panel-model';

const toPanel = (c: { id: string; title: string; spec: unknown }): PanelChart => ({ id: c.id, title: c.title, spec: c.spec as Record<string, unknown> });

/** `shared`: the parameters of a joint fit shared by every group (no chart across groups of them, across.ts). */
export function groupParameterCharts(fits: readonly FitResult[], table: GroupTable, shared: readonly string[] = []): PanelChart[] {
  return groupSectionCharts(table.fit, fits, table, {}, shared).map(toPanel);
}

/** Sets of single fits of the same data (engine/front/views/curves.ts `sameDataFitSets`): fit keys and their overlay charts. */
export interface PanelSameData {
  fits: string[];
  charts: PanelChart[];
}

export function sameDataPanelCharts(run: RunResult): PanelSameData[] {
  return sameDataFitSets(run.fits).map((set) => ({ fits: set.curves.map((c) => c.key), charts: sameDataCharts(set).map(toPanel) }));
}
