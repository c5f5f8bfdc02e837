/**
 * NIST StRD through the public path, as a user would run it: each dataset is
 * written as a CSV file and a `.lsq` spec text into a temporary folder, the
 * spec is checked by the parser (`analyze`, with the CSV header known as the
 * CLI does) and the plan run by the engine (`runPlan`); the reported
 * estimates, standard errors and SSR are then scored by the log relative
 * error against NIST's certified values (`lre` and the Lanczos1 floor rule of
 * `run-strd.ts`, with the same targets).
 *
 * The model formulas are those of `models.ts` (transcribed from each file's
 * `Model:` block); they are valid `.lsq` expressions as written, so the spec
 * reads `model y = <formula>` (`model ln(y) = ...` for Nelson) with one
 * `param bK = <NIST start>` line per parameter. Data values are written with
 * `String(x)`, the shortest decimal that reads back as the same double, so the
 * CSV holds exactly the numbers read from the `.dat` file.
 *
 * Options: default (no `method`, `tolerance` or `iterations` line) for every
 * dataset unless `SPEC_OPTIONS` names it, with the reason.
 */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { analyze, hasErrors } from '../../parser/index';
import type { Diagnostic } from '../../parser/plan';
import { runPlan, readHeaderFile, type FitResult, type RunResult } from '../../engine/index';
import type { StrdDataset } from './read-strd';
import { NONLINEAR_MODELS, LINEAR_MODELS } from './models';
import { lre, RSS_FLOOR_RELATIVE } from './run-strd';
import { LRE_HEADERS, lreCells, plainTable } from './lre-table';

/**
 * Non-default fit options per dataset, each with why it is needed. Empty: every
 * dataset meets its targets on the defaults (tolerance 1e-10, 1000 iterations);
 * the closest call is Bennett5 start 1, which converges after 745 iterations.
 */
export const SPEC_OPTIONS: Readonly<Record<string, { lines: string[]; why: string }>> = {};

/** Name of the fit in every generated spec. */
export const FIT_NAME = 'certified';

/** The data block as CSV: header = NIST column names, one row per observation. */
export function csvText(ds: StrdDataset): string {
  const rows = [ds.columns.join(',')];
  for (let i = 0; i < ds.n; i++) rows.push(ds.data.map((col) => String(col[i])).join(','));
  return rows.join('\n') + '\n';
}

/** The `.lsq` spec for a dataset; `start` 1 or 2 (nonlinear) or null (linear: no start values). */
export function specText(ds: StrdDataset, start: 1 | 2 | null, csvFile: string): string {
  const model = (ds.kind === 'nls' ? NONLINEAR_MODELS : LINEAR_MODELS)[ds.name];
  if (!model) throw new Error(`no model for ${ds.name}`);
  const lines = [
    `# NIST StRD ${ds.name}${start === null ? '' : `, start ${start}`}`,
    `data strd = "${csvFile}"`,
    '',
    `fit ${FIT_NAME} on strd {`,
    `  model ${model.response ?? 'y'} = ${model.formula}`,
  ];
  for (const q of ds.parameters) lines.push(start === null ? `  param ${q.name}` : `  param ${q.name} = ${String(q.starts![start - 1])}`);
  for (const l of SPEC_OPTIONS[ds.name]?.lines ?? []) lines.push(`  ${l}`);
  lines.push('}');
  return lines.join('\n') + '\n';
}

export interface PipelineRow {
  dataset: string;
  start: 1 | 2 | null;
  /** Parser diagnostics (errors stop the case before the run). */
  diagnostics: Diagnostic[];
  /** Run errors (data problems) reported by the engine. */
  runErrors: RunResult['errors'];
  fit: FitResult | null;
  minLreParams: number;
  minLreSE: number;
  lreRSS: number;
  /** True when the rounding-level RSS rule of `run-strd.ts` applied (Lanczos1). */
  floor: boolean;
}

function sumSquares(x: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i] * x[i];
  return s;
}

/** Scores a reported fit against the certified values (see `run-strd.ts` for LRE and the floor rule). */
export function scoreFit(ds: StrdDataset, fit: FitResult): Pick<PipelineRow, 'minLreParams' | 'minLreSE' | 'lreRSS' | 'floor'> {
  const byName = new Map(fit.parameters.map((q) => [q.name, q]));
  const est = ds.parameters.map((q) => byName.get(q.name)?.estimate ?? NaN);
  const se = ds.parameters.map((q) => byName.get(q.name)?.stderr ?? NaN);
  const rss = fit.goodness.ssr;
  const s = fit.goodness.rmse;
  const yy = sumSquares(fit.points.y);
  const floor = ds.rss > 0 && ds.rss < RSS_FLOOR_RELATIVE * yy;
  const minLreParams = Math.min(...ds.parameters.map((q, j) => lre(est[j], q.certified, q.digits)));
  let minLreSE: number;
  let lreRSS: number;
  if (floor) {
    minLreSE = Math.min(...ds.parameters.map((q, j) => lre(se[j] / s, q.certifiedSd / ds.residualSd, q.digits)));
    lreRSS = Math.abs(rss - ds.rss) <= RSS_FLOOR_RELATIVE * yy ? ds.rssDigits : lre(rss, ds.rss, ds.rssDigits);
  } else {
    minLreSE = Math.min(...ds.parameters.map((q, j) => lre(se[j], q.certifiedSd, q.digits)));
    lreRSS = lre(rss, ds.rss, ds.rssDigits);
  }
  return { minLreParams, minLreSE, lreRSS, floor };
}

/** A temporary folder for the generated files; `dispose` removes it. */
export function makeWorkDir(): { dir: string; dispose: () => void } {
  const dir = mkdtempSync(join(tmpdir(), 'leastwise-strd-'));
  return { dir, dispose: () => rmSync(dir, { recursive: true, force: true }) };
}

/** Writes the CSV and spec for one case into `dir`, checks and runs it, and scores the result. */
export async function runViaSpec(ds: StrdDataset, start: 1 | 2 | null, dir: string): Promise<PipelineRow> {
  const csvFile = `${ds.name}.csv`;
  writeFileSync(join(dir, csvFile), csvText(ds));
  const text = specText(ds, start, csvFile);
  const specPath = join(dir, `${ds.name}-${start ?? 'linear'}.lsq`);
  writeFileSync(specPath, text);
  const { plan, diagnostics } = analyze(text, { headers: (_name, path) => readHeaderFile(resolve(dir, path))?.headers });
  const empty = { minLreParams: 0, minLreSE: 0, lreRSS: 0, floor: false };
  if (hasErrors(diagnostics)) return { dataset: ds.name, start, diagnostics, runErrors: [], fit: null, ...empty };
  const result = await runPlan(plan, { baseDir: dir, specText: text, specPath });
  const fit = result.fits.find((f) => f.name === FIT_NAME) ?? null;
  const score = fit ? scoreFit(ds, fit) : empty;
  return { dataset: ds.name, start, diagnostics, runErrors: result.errors, fit, ...score };
}

/** Plain-text table of pipeline rows (printed by the test when STRD_TABLE is set). */
export function pipelineTable(rows: readonly PipelineRow[]): string {
  const head = ['dataset', 'start', ...LRE_HEADERS, 'iter', 'stop'];
  const body = rows.map((r) => [
    r.dataset,
    r.start === null ? 'linear' : String(r.start),
    ...lreCells(r),
    String(r.fit?.iterations ?? '-'),
    r.fit?.stop.code ?? 'no fit',
  ]);
  return plainTable(head, body, (k) => k >= 2 && k <= 5);
}
