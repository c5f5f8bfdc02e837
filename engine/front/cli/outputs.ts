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
import { leadingComment, markdownReport, type ChartLink } from '../views/markdown';

export interface WrittenChart {
  fitIndex: number;
  title: string;
  path: string;
}

/** A chart to draw: which fit, which chart, which file. */
export interface PlannedChart {
  fitIndex: number;
  id: ChartId;
  path: string;
}

/** The chart files of every fit (or of the fits at indices `only`) in `dir`, named but not drawn. */
export function chartTargets(result: RunResult, dir: string, only?: ReadonlySet<number>): PlannedChart[] {
  const out: PlannedChart[] = [];
  result.fits.forEach((fit, fitIndex) => {
    if (only && !only.has(fitIndex)) return;
    for (const c of chartSpecs(fit)) out.push({ fitIndex, id: c.id, path: join(dir, chartFileName(fit, c.id)) });
  });
  return out;
}

/** Draw the planned charts and stage their files (fit by fit, so only one fit's drawings are held at a time). */
export async function stageCharts(stage: OutputStage, result: RunResult, planned: readonly PlannedChart[]): Promise<WrittenChart[]> {
  const out: WrittenChart[] = [];
  const byFit = new Map<number, PlannedChart[]>();
  for (const p of planned) byFit.set(p.fitIndex, [...(byFit.get(p.fitIndex) ?? []), p]);
  for (const [fitIndex, charts] of byFit) {
    const specs = chartSpecs(result.fits[fitIndex]);
    for (const c of charts) {
      const spec = specs.find((s) => s.id === c.id);
      if (!spec) continue;
      stage.file(c.path, await renderSvg(spec.spec));
      out.push({ fitIndex, title: spec.title, path: c.path });
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
  for (const c of charts) {
    links[c.fitIndex].push({ title: c.title, href: relative(dirname(reportPath), c.path).split(sep).join('/') });
  }
  stage.file(reportPath, markdownReport(result, { charts: links, about: leadingComment(specText) || undefined }));
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
