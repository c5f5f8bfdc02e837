/**
 * Plate maps: a heat map over the microplate layout of one parameter's
 * estimate, or of the groups' flags, when a per-group fit's labels are well
 * names (wells.ts `detectPlates`). Every well of the plate is drawn; wells
 * without a group are left empty (outline only), wells of a group without a
 * value for the map (not converged, failed, no estimate) are outlined in the
 * highlight colour. Each well with a group carries `group`, so a click in the
 * panel opens that group's fit. Several plates (label prefixes) are drawn one
 * below the other, at most MAX_PLATES.
 */
import type { GroupTable } from '../../groups/table';
import { GROUP_FLAGS, type GroupFlag } from '../../groups/flags';
import { CHART_FORMAT } from '../../format';
import { config, type Json } from './charts';
import { wrapLines, type GroupChartSpec } from './group-charts';
import { chartLabel } from './escape';
import { HEAT_RAMP, PALETTE, SERIES, type Palette } from './palette';
import { detectPlates, wellName, type PlateLayout } from './wells';
import { FLAG_LABEL } from './groups';
import type { TopLevelSpec } from 'vega-lite';

/** Plates drawn in one chart. */
export const MAX_PLATES = 8;

/** What a flag map shows per well: its most severe flag (GROUP_FLAGS order), or none. */
export type FlagCategory = GroupFlag | 'none';

/** Colours of the flag map: none in the bars colour, then one SERIES colour per flag. */
export const FLAG_COLOURS: Readonly<Record<FlagCategory, string>> = Object.freeze({
  none: PALETTE.bars, failed: SERIES[4], not_converged: SERIES[1], no_dof: SERIES[2], few_dof: SERIES[7], at_bound: SERIES[0], poor_fit: SERIES[3],
});

export interface WellDatum {
  plate: string;
  well: string;
  rowLetter: string;
  column: number;
  /** The group in this well, or null when the well is empty. */
  group: string | null;
  value: number | null;
  flag: FlagCategory | null;
  /** `flag` in words (groups.ts FLAG_LABEL; `no flag`), or null for an empty well. */
  flagLabel: string | null;
  flags: string;
}

const flagWords = (f: FlagCategory): string => (f === 'none' ? 'no flag' : FLAG_LABEL[f]);

/** One map per plate choice: `flags` or a parameter name. */
export type PlateMeasure = { kind: 'flags' } | { kind: 'parameter'; name: string; index: number };

/** Every well of every plate (at most MAX_PLATES) with its group's value for `measure`. */
export function plateData(layout: PlateLayout, table: GroupTable, measure: PlateMeasure): WellDatum[] {
  const byGroup = new Map(table.rows.map((r) => [r.group, r]));
  const at = new Map(layout.groups.map((g) => [`${g.plate}\u0000${g.row}\u0000${g.column}`, g.group]));
  const out: WellDatum[] = [];
  for (const plate of layout.plates.slice(0, MAX_PLATES)) {
    for (let row = 0; row < layout.shape.rows; row++) {
      for (let column = 1; column <= layout.shape.columns; column++) {
        const group = at.get(`${plate}\u0000${row}\u0000${column}`) ?? null;
        const r = group !== null ? byGroup.get(group) : undefined;
        let value: number | null = null;
        if (r && measure.kind === 'parameter' && r.converged) value = r.estimates[measure.index];
        const flag: FlagCategory | null = r ? (GROUP_FLAGS.find((f) => r.flags.includes(f)) ?? 'none') : null;
        out.push({ plate, well: wellName(row, column), rowLetter: String.fromCharCode(65 + row), column, group, value, flag, flagLabel: flag === null ? null : flagWords(flag), flags: r ? r.flags.join(', ') || 'none' : '' });
      }
    }
  }
  return out;
}

function plateView(layout: PlateLayout, plate: string, values: WellDatum[], measure: PlateMeasure, pal: Palette, legendTitle: string): Json {
  const cell = layout.shape.format === 96 ? 30 : 18;
  const rows = Array.from({ length: layout.shape.rows }, (_, i) => String.fromCharCode(65 + i));
  const columns = Array.from({ length: layout.shape.columns }, (_, i) => i + 1);
  const x = { field: 'column', type: 'ordinal', scale: { domain: columns }, axis: { title: null, orient: 'top', labelAngle: 0, domain: false, ticks: false, labelPadding: 4 } };
  const y = { field: 'rowLetter', type: 'ordinal', scale: { domain: rows }, axis: { title: null, domain: false, ticks: false, labelPadding: 6 } };
  const mine = values.filter((v) => v.plate === plate);
  const tooltip = [
    { field: 'well', type: 'nominal', title: 'well' },
    { field: 'group', type: 'nominal', title: 'group' },
    ...(measure.kind === 'parameter' ? [{ field: 'value', type: 'quantitative', title: measure.name, format: CHART_FORMAT.value }] : []),
    { field: 'flags', type: 'nominal', title: 'flags' },
  ];
  const colour: Json = measure.kind === 'parameter'
    ? { field: 'value', type: 'quantitative', scale: { range: [...HEAT_RAMP], zero: false }, legend: { title: chartLabel(legendTitle), gradientLength: Math.min(200, cell * layout.shape.rows) } }
    : (() => {
        const present = GROUP_FLAGS.filter((f) => values.some((v) => v.flag === f));
        const domain: FlagCategory[] = ['none', ...present];
        // the legend reads the flags in words (groups.ts FLAG_LABEL), the data keeps the codes
        return { field: 'flagLabel', type: 'nominal', scale: { domain: domain.map(flagWords), range: domain.map((d) => FLAG_COLOURS[d]) }, legend: { title: 'flag' } };
      })();
  const filled = measure.kind === 'parameter' ? mine.filter((v) => v.value !== null) : mine.filter((v) => v.flag !== null);
  const withoutValue = measure.kind === 'parameter' ? mine.filter((v) => v.group !== null && v.value === null) : [];
  const layer: Json[] = [
    // every well, dashed: seen only where no coloured well covers it (an empty well)
    { name: 'wells', data: { values: mine }, mark: { type: 'rect', fill: pal.background, stroke: pal.reference, strokeWidth: 1, strokeDash: [2, 2] }, encoding: { x, y, tooltip } },
    { name: 'well_values', data: { values: filled }, mark: { type: 'rect', stroke: pal.grid, strokeWidth: 1, cursor: 'pointer' }, encoding: { x, y, color: colour, tooltip } },
  ];
  const flagged = measure.kind === 'parameter' ? filled.filter((v) => v.flag !== null && v.flag !== 'none') : [];
  if (flagged.length) layer.push({ name: 'flagged_wells', data: { values: flagged }, mark: { type: 'point', shape: 'circle', filled: true, size: cell * 2, color: pal.highlight, stroke: pal.background, strokeWidth: 1, cursor: 'pointer' }, encoding: { x, y, tooltip } });
  if (withoutValue.length) layer.push({ name: 'wells_without_value', data: { values: withoutValue }, mark: { type: 'rect', fill: pal.background, stroke: pal.highlight, strokeWidth: 2, cursor: 'pointer' }, encoding: { x, y, tooltip } });
  const view: Json = { width: cell * layout.shape.columns, height: cell * layout.shape.rows, layer };
  if (layout.plates.length > 1 || plate !== '') view.title = { text: chartLabel(plate === '' ? 'plate' : `plate ${plate}`), fontSize: 12, fontWeight: 'normal' };
  return view;
}

/** The plate maps of a per-group fit: flags first, then one per parameter; none when its groups are not wells. */
export function plateMapSpecs(table: GroupTable, opts: { palette?: Palette } = {}): GroupChartSpec[] {
  const found = detectPlates(table.rows.map((r) => r.group));
  if (!found.layout) return [];
  const layout = found.layout;
  const pal = opts.palette ?? PALETTE;
  const measures: PlateMeasure[] = [{ kind: 'flags' }, ...table.parameters.map((name, index) => ({ kind: 'parameter' as const, name, index }))];
  const plates = layout.plates.slice(0, MAX_PLATES);
  return measures.map((m) => {
    const values = plateData(layout, table, m);
    const what = m.kind === 'flags' ? 'flags' : m.name;
    const title = `${table.fit}: plate map of ${what}`;
    const sub = [`${layout.shape.format}-well layout from the group labels: ${layout.groups.length} wells with a group; dashed outline: a well without one.`];
    if (m.kind === 'parameter') {
      sub.push('Colour: the estimate (lighter low, darker high). Dot: a flagged group (see the flag map). Thick outline: a group without a fitted value (not converged or failed).');
    } else sub.push('Colour: the most severe flag of the well\'s fit.');
    sub.push('In the panel, click a well to open its fit.');
    if (layout.plates.length > MAX_PLATES) sub.push(`Showing the first ${MAX_PLATES} of ${layout.plates.length} plates.`);
    const spec = {
      $schema: 'https://vega.github.io/schema/vega-lite/v6.json',
      title: { text: chartLabel(title), subtitle: wrapLines(sub, layout.shape.format === 96 ? 64 : 80) },
      config: { ...config(pal), axis: { ...(config(pal).axis as Json), grid: false } },
      vconcat: plates.map((p) => plateView(layout, p, values, m, pal, what)),
      resolve: { scale: { color: 'shared' } },
    } as unknown as TopLevelSpec;
    return { id: `plate-${m.kind === 'flags' ? 'flags' : `param-${m.name}`}`, title, spec };
  });
}
