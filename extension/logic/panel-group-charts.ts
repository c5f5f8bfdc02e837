/**
 * Charts across the groups of a `per COLUMN` fit: one Vega-Lite chart per
 * free parameter, estimate ± one standard error per group, flagged groups in
 * the highlight colour. Colours are the default palette's roles (the page
 * maps them to theme colours like every other chart). Clicking a point
 * selects that group in the panel (each datum carries `group`).
 */
import type { FitResult } from '../../engine/result';
import type { GroupTable } from '../../engine/groups/table';
import { FONT, PALETTE } from '../../engine/front/views/palette';
import { chartLabel } from '../../engine/front/views/escape';
import type { PanelChart } from './panel-model';
import { CHART_FORMAT } from '../../engine/format';

const SCHEMA = 'https://vega.github.io/schema/vega-lite/v6.json';
/** Groups beyond this count are drawn without axis labels (they would overlap). */
const MAX_LABELLED_GROUPS = 60;

export function groupParameterCharts(fits: readonly FitResult[], table: GroupTable): PanelChart[] {
  const pal = PALETTE;
  const labelled = table.rows.length <= MAX_LABELLED_GROUPS;
  const width = Math.max(320, Math.min(900, table.rows.length * 16));
  return table.parameters.map((name, j) => {
    const values = table.rows.map((r, i) => {
      const est = r.estimates[j];
      const se = r.stderrs[j];
      return {
        group: r.group,
        order: i,
        estimate: est,
        low: est !== null && se !== null ? est - se : null,
        high: est !== null && se !== null ? est + se : null,
        se,
        flagged: r.flags.length > 0 ? 'flagged' : 'ok',
        flags: r.flags.join(', ') || 'none',
      };
    }).filter((v) => v.estimate !== null);
    const unit = fits.flatMap((f) => f.parameters).find((p) => p.name === name)?.unit;
    // user names only as label text (axis and chart titles, see engine/front/views/charts.ts); groups are data values
    const x = { field: 'group', type: 'nominal', sort: { field: 'order' }, axis: { title: `${table.rows.length} groups`, ...(labelled ? { labelAngle: -40, labelLimit: 90 } : { labels: false, ticks: false }) } };
    const yAxis = { title: chartLabel(unit ? `${name} [${unit}]` : name) };
    const spec = {
      $schema: SCHEMA,
      title: { text: chartLabel(`${table.fit}: ${name} across groups`), subtitle: ['Point: estimate. Bar: ± one standard error. Highlighted: flagged groups.'] },
      width,
      height: 180,
      config: {
        background: pal.background,
        font: FONT,
        view: { stroke: null },
        title: { color: pal.foreground, subtitleColor: pal.muted, anchor: 'start', fontSize: 13, fontWeight: 600, subtitleFontSize: 11 },
        axis: { labelColor: pal.muted, titleColor: pal.foreground, gridColor: pal.grid, domainColor: pal.reference, tickColor: pal.reference, titleFontWeight: 'normal' },
      },
      data: { values },
      layer: [
        { mark: { type: 'rule', color: pal.reference }, encoding: { x, y: { field: 'low', type: 'quantitative', axis: yAxis, scale: { zero: false } }, y2: { field: 'high' } } },
        {
          name: 'group_points',
          mark: { type: 'point', filled: true, size: 46 },
          encoding: {
            x,
            y: { field: 'estimate', type: 'quantitative', axis: yAxis },
            color: { field: 'flagged', type: 'nominal', scale: { domain: ['ok', 'flagged'], range: [pal.points, pal.highlight] }, legend: null },
            tooltip: [
              { field: 'group', type: 'nominal', title: 'group' },
              { field: 'estimate', type: 'quantitative', title: name, format: CHART_FORMAT.value },
              { field: 'se', type: 'quantitative', title: 'standard error', format: CHART_FORMAT.uncertainty },
              { field: 'flags', type: 'nominal', title: 'flags' },
            ],
          },
        },
      ],
    };
    return { id: `group-${name}`, title: `${table.fit}: ${name} across groups`, spec };
  });
}
