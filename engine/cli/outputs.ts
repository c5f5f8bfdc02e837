/**
 * Files written by `leastwise fit`: JSON result, SVG charts, Markdown report,
 * per-group tables as CSV. Outputs never replace an input of the run (the
 * spec or a data file).
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { basename, dirname, extname, join, relative, resolve, sep } from 'node:path';
import type { RunResult } from '../result';
import { toCsv } from '../group/csv';
import { fitSections } from '../views/groups';
import { chartFileName, chartSvgs } from '../views/svg';
import { leadingComment, markdownReport, type ChartLink } from '../views/markdown';

export interface WrittenChart {
  fitIndex: number;
  title: string;
  path: string;
}

/** Absolute paths of the run's inputs: the spec and every data file. */
export function inputPaths(result: RunResult, specPath: string): Set<string> {
  const dir = dirname(specPath);
  return new Set([specPath, ...result.provenance.data.map((d) => resolve(dir, d.path))]);
}

/** Write the charts of every fit (or of the fits at indices `only`) into `dir` (created when missing). */
export async function writeCharts(result: RunResult, dir: string, only?: ReadonlySet<number>): Promise<WrittenChart[]> {
  mkdirSync(dir, { recursive: true });
  const out: WrittenChart[] = [];
  for (let i = 0; i < result.fits.length; i++) {
    if (only && !only.has(i)) continue;
    const fit = result.fits[i];
    for (const c of await chartSvgs(fit)) {
      const path = join(dir, chartFileName(fit, c.id));
      writeFileSync(path, c.svg);
      out.push({ fitIndex: i, title: c.title, path });
    }
  }
  return out;
}

/** Default chart folder of a report: `<report without .md>-charts` beside it. */
export function reportChartDir(reportPath: string): string {
  const ext = extname(reportPath);
  return join(dirname(reportPath), `${basename(reportPath, ext)}-charts`);
}

/** Write the Markdown report, linking `charts` relative to the report's folder; `specText` supplies "About this spec". */
export function writeReport(result: RunResult, reportPath: string, charts: WrittenChart[], specText: string): void {
  const links: ChartLink[][] = result.fits.map(() => []);
  for (const c of charts) {
    links[c.fitIndex].push({ title: c.title, href: relative(dirname(reportPath), c.path).split(sep).join('/') });
  }
  mkdirSync(dirname(reportPath), { recursive: true });
  writeFileSync(reportPath, markdownReport(result, { charts: links, about: leadingComment(specText) || undefined }));
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

/** Write the group table of each per-group fit in `paths` (fit → file) as CSV (engine/group/csv.ts); returns the paths written. */
export function writeGroupTables(result: RunResult, paths: ReadonlyMap<string, string>): string[] {
  const out: string[] = [];
  for (const s of fitSections(result)) {
    const target = s.kind === 'groups' ? paths.get(s.name) : undefined;
    if (s.kind !== 'groups' || target === undefined) continue;
    mkdirSync(dirname(target), { recursive: true });
    writeFileSync(target, toCsv(s.table));
    out.push(target);
  }
  return out;
}
