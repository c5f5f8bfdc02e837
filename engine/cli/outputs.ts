/**
 * Files written by `leastwise fit`: JSON result, SVG charts, Markdown report.
 * Outputs never replace an input of the run (the spec or a data file).
 */
import { mkdirSync, writeFileSync } from 'node:fs';
import { basename, dirname, extname, join, relative, resolve, sep } from 'node:path';
import type { RunResult } from '../result';
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

/** Write every chart of every fit into `dir` (created when missing). */
export async function writeCharts(result: RunResult, dir: string): Promise<WrittenChart[]> {
  mkdirSync(dir, { recursive: true });
  const out: WrittenChart[] = [];
  for (let i = 0; i < result.fits.length; i++) {
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
