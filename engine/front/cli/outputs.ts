/**
 * Files written by `leastwise fit`: JSON result, SVG charts, Markdown report,
 * per-group tables as CSV. Every one goes through engine/io: its path is
 * checked against the run's inputs (the spec and every declared data file)
 * by the output guard before anything is written, and it is staged in a
 * temporary file and committed with the others only when all are rendered.
 */
import { basename, dirname, extname, join, relative, sep } from 'node:path';
import type { RunResult } from '../../result';
import { toCsv } from '../views/group-csv';
import type { OutputStage } from '../../io/index';
import { writeJson } from '../../run/json';
import { fitSections } from '../views/groups';
import { chartFileName, chartSpecs, type ChartId } from '../views/charts';
import { renderSvg } from '../views/svg';
import { acrossCharts, acrossFileName, type AcrossCharts } from '../views/across';
import { leadingComment, markdownReport, type ChartLink } from '../views/markdown';

export interface WrittenChart {
  /** The fit, or -1 for a chart across curves (`across`). */
  fitIndex: number;
  /** Key of the across-curve charts (engine/front/views/across.ts) this chart belongs to. */
  across?: string;
  title: string;
  path: string;
}

/** A chart to draw: which fit, which chart, which file. */
export interface PlannedChart {
  /** The fit, or -1 for a chart across curves (`across`). */
  fitIndex: number;
  /** A per-fit ChartId, or an across-curve chart's id. */
  id: ChartId | string;
  path: string;
  /** Key of the across-curve charts (engine/front/views/across.ts `acrossCharts`). */
  across?: string;
}

/** The chart files of every fit (or of the fits at indices `only`) in `dir`, named but not drawn. */
export function chartTargets(result: RunResult, dir: string, only?: ReadonlySet<number>): PlannedChart[] {
  const out: PlannedChart[] = [];
  result.fits.forEach((fit, fitIndex) => {
    if (only && !only.has(fitIndex)) return;
    for (const c of chartSpecs(fit)) out.push({ fitIndex, id: c.id, path: join(dir, chartFileName(fit, c.id)) });
  });
  // charts across curves: the overlays, residuals by group and plate maps of every per-group fit and set of fits of the same data
  for (const a of acrossOf(result)) for (const c of a.charts) out.push({ fitIndex: -1, id: c.id, path: join(dir, acrossFileName(a, c.id)), across: a.key });
  return out;
}

/** The across-curve charts of a run, built once for naming and drawing (10,000 groups: about 2.7 s to build, measured 2026-12-03). */
const acrossMemo = new WeakMap<RunResult, AcrossCharts[]>();
function acrossOf(result: RunResult): AcrossCharts[] {
  let a = acrossMemo.get(result);
  if (!a) acrossMemo.set(result, (a = acrossCharts(result)));
  return a;
}

/** Draw the planned charts and stage their files (fit by fit, so only one fit's drawings are held at a time). */
export async function stageCharts(stage: OutputStage, result: RunResult, planned: readonly PlannedChart[]): Promise<WrittenChart[]> {
  const out: WrittenChart[] = [];
  const byFit = new Map<number, PlannedChart[]>();
  for (const p of planned) if (p.across === undefined) byFit.set(p.fitIndex, [...(byFit.get(p.fitIndex) ?? []), p]);
  for (const [fitIndex, charts] of byFit) {
    const specs = chartSpecs(result.fits[fitIndex]);
    for (const c of charts) {
      const spec = specs.find((s) => s.id === c.id);
      if (!spec) continue;
      stage.file(c.path, await renderSvg(spec.spec, spec.title));
      out.push({ fitIndex, title: spec.title, path: c.path });
    }
  }
  const acrossPlanned = planned.filter((p) => p.across !== undefined);
  if (acrossPlanned.length) {
    const specs = new Map(acrossOf(result).map((a) => [a.key, a.charts]));
    for (const c of acrossPlanned) {
      const spec = specs.get(c.across as string)?.find((s) => s.id === c.id);
      if (!spec) continue;
      stage.file(c.path, await renderSvg(spec.spec, spec.title));
      out.push({ fitIndex: -1, across: c.across, title: spec.title, path: c.path });
    }
  }
  return out;
}

/** Stage the result JSON (streamed in chunks: any row count; a newline at the end). */
export function stageJson(stage: OutputStage, result: RunResult, path: string): void {
  stage.file(path, (write) => {
    writeJson(result, write);
    write('\n');
  });
}

/** Default chart folder of a report: `<report without .md>-charts` beside it. */
export function reportChartDir(reportPath: string): string {
  const ext = extname(reportPath);
  return join(dirname(reportPath), `${basename(reportPath, ext)}-charts`);
}

/** Stage the Markdown report, linking `charts` relative to the report's folder; `specText` supplies "About this spec". */
export function stageReport(stage: OutputStage, result: RunResult, reportPath: string, charts: WrittenChart[], specText: string): void {
  const links: ChartLink[][] = result.fits.map(() => []);
  const across: Record<string, ChartLink[]> = {};
  for (const c of charts) {
    const link = { title: c.title, href: relative(dirname(reportPath), c.path).split(sep).join('/') };
    if (c.across !== undefined) (across[c.across] ??= []).push(link);
    else links[c.fitIndex].push(link);
  }
  stage.file(reportPath, markdownReport(result, { charts: links, acrossCharts: across, about: leadingComment(specText) || undefined }));
}

/**
 * Where the group tables go for `--groups PATH`: PATH itself when the run has
 * one per-group fit (as planned, `per COLUMN`), else `<PATH without its
 * extension>-<fit>.csv` per fit.
 */
export function groupTablePaths(fits: readonly string[], path: string): Map<string, string> {
  if (fits.length === 1) return new Map([[fits[0], path]]);
  const ext = extname(path);
  const stem = join(dirname(path), basename(path, ext));
  return new Map(fits.map((f) => [f, `${stem}-${f}${ext || '.csv'}`]));
}

/** Stage the group table of each per-group fit in `paths` (fit → file) as CSV (engine/front/views/group-csv.ts); returns the paths staged. */
export function stageGroupTables(stage: OutputStage, result: RunResult, paths: ReadonlyMap<string, string>): string[] {
  const out: string[] = [];
  for (const s of fitSections(result)) {
    const target = s.kind === 'groups' ? paths.get(s.name) : undefined;
    if (s.kind !== 'groups' || target === undefined) continue;
    stage.file(target, toCsv(s.table));
    out.push(target);
  }
  return out;
}
