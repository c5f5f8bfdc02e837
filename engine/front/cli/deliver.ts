/**
 * What `fit` and `gather` do with a result: the outputs asked for on the
 * command line (`--json`, `--report`, `--charts`, `--groups`), checked by the
 * output guard against every input before anything runs and staged to be
 * written all or nothing (engine/io), the summary on stdout, the problems on
 * stderr at their places in the spec, and the exit code. One path for both
 * commands, so a gathered run is shown and saved as one run is.
 */
import { resolve } from 'node:path';
import type { Range } from '../../../parser/plan';
import { readHeaderFile } from '../../data/index';
import { clashMessage, declaredInputs, OutputError, OutputGuard, OutputStage, type Clash, type InputFile, type OutputTarget } from '../../io/index';
import { writeJson } from '../../run/json';
import type { RunResult } from '../../result';
import { runText } from '../views/text';
import { fitLabel } from '../views/summary';
import { fitSections, shownFitIndices } from '../views/groups';
import { EXIT, type CliIo, type ExitCode } from './io';
import { displayPath, located, plainError, runErrorLine } from './located-lines';
import { MSG } from './messages';
import { chartTargets, groupTablePaths, reportChartDir, stageCharts, stageGroupTables, stageJson, stageReport, type PlannedChart } from './outputs';
import type { CheckedSpec } from './spec';

/** The output options `fit` and `gather` share. */
export interface OutputOptions {
  json?: string;
  report?: string;
  charts?: string;
  groups?: string;
  quiet?: boolean;
}

/** The parse-args declarations of `OutputOptions`. */
export const OUTPUT_OPTIONS = {
  json: { type: 'string' },
  report: { type: 'string' },
  charts: { type: 'string' },
  groups: { type: 'string' },
  quiet: { type: 'boolean' },
} as const;

/** The outputs of a run, their paths resolved and accepted by the guard. */
export interface Outputs {
  opts: OutputOptions;
  guard: OutputGuard;
  jsonPath?: string;
  reportPath?: string;
  chartDir?: string;
  groupPaths: Map<string, string>;
}

/** The exit code a finished run deserves: 2 spec/data error > 3 no convergence > 1 failed expectation > 0. */
export function runExitCode(result: RunResult): ExitCode {
  if (result.errors.length > 0) return EXIT.inputError;
  if (result.fits.some((f) => !f.stop.converged)) return EXIT.notConverged;
  if (result.expectations.some((e) => !e.passed)) return EXIT.expectationFailed;
  return EXIT.ok;
}

/**
 * Resolve and check every output before the run (chart files, named by the
 * result, are checked once it is known): against the spec, every declared
 * data file and `moreInputs` (the shard files of `gather`). On a clash its
 * lines are written and the exit code returned; nothing is written.
 */
export function planOutputs(opts: OutputOptions, grouped: readonly string[], spec: CheckedSpec, io: CliIo, moreInputs: readonly InputFile[] = []): { ok: true; outputs: Outputs } | { ok: false; code: ExitCode } {
  if (opts.groups !== undefined && grouped.length === 0) {
    io.stderr(plainError(MSG.noGroupedFit()) + '\n');
    return { ok: false, code: EXIT.inputError };
  }
  const groupPaths = opts.groups !== undefined ? groupTablePaths(grouped, resolve(io.cwd, opts.groups)) : new Map<string, string>();
  const guard = new OutputGuard([...declaredInputs(spec.path, spec.plan.data, spec.dir), ...moreInputs]);
  const jsonPath = opts.json !== undefined && opts.json !== '-' ? resolve(io.cwd, opts.json) : undefined;
  const reportPath = opts.report !== undefined ? resolve(io.cwd, opts.report) : undefined;
  const chartDir = opts.charts !== undefined ? resolve(io.cwd, opts.charts) : reportPath !== undefined ? reportChartDir(reportPath) : undefined;
  const before: OutputTarget[] = [
    ...(jsonPath ? [{ path: jsonPath, what: '--json' }] : []),
    ...(reportPath ? [{ path: reportPath, what: '--report' }] : []),
    ...(chartDir ? [{ path: chartDir, what: opts.charts !== undefined ? '--charts' : 'the chart folder of --report' }] : []),
    ...[...groupPaths.values()].map((path) => ({ path, what: '--groups' })),
  ];
  const early = guard.check(before);
  if (early.length) return { ok: false, code: refuse(early, spec, io) };
  return { ok: true, outputs: { opts, guard, jsonPath, reportPath, chartDir, groupPaths } };
}

/** Show and save a finished run as `outputs` says, report its problems, and return its exit code. */
export async function deliverRun(result: RunResult, outputs: Outputs, spec: CheckedSpec, io: CliIo): Promise<ExitCode> {
  const { opts, guard, jsonPath, reportPath, chartDir, groupPaths } = outputs;
  const fail = (line: string): ExitCode => {
    io.stderr(line + '\n');
    return EXIT.inputError;
  };
  // The chart files: with --charts every fit's, else only those the report shows in full
  // (for a per-group fit with many groups: its flagged groups).
  let charts: PlannedChart[] = [];
  if (chartDir !== undefined) {
    charts = chartTargets(result, chartDir, opts.charts !== undefined ? undefined : new Set(shownFitIndices(fitSections(result))));
    const late = guard.check(charts.map((c) => ({ path: c.path, what: opts.charts !== undefined ? '--charts' : 'a chart of --report' })));
    if (late.length) return refuse(late, spec, io);
  }

  if (opts.json !== '-' && !opts.quiet) io.stdout(runText(result));

  // Stage every file, then commit them together: a failure leaves every earlier file as it was.
  const stage = new OutputStage(io.writeHooks);
  const wrote: string[] = [];
  try {
    if (jsonPath) {
      stageJson(stage, result, jsonPath);
      wrote.push(MSG.wrote('result JSON', displayPath(jsonPath, io.cwd)));
    }
    if (chartDir !== undefined) {
      stage.folder(chartDir);
      const written = await stageCharts(stage, result, charts);
      wrote.push(MSG.wrote(`${written.length} charts`, displayPath(chartDir, io.cwd)));
      if (reportPath) {
        stageReport(stage, result, reportPath, written, spec.text);
        wrote.push(MSG.wrote('report', displayPath(reportPath, io.cwd)));
      }
    }
    for (const path of stageGroupTables(stage, result, groupPaths)) wrote.push(MSG.wrote('group table', displayPath(path, io.cwd)));
    stage.commit();
  } catch (e) {
    stage.abort();
    if (e instanceof OutputError) return fail(plainError(MSG.cannotWrite(displayPath(e.path, io.cwd), e.code)));
    return fail(plainError(MSG.renderFailed(e instanceof Error ? e.message.split('\n')[0] : String(e))));
  }
  if (opts.json === '-') {
    writeJson(result, io.stdout);
    io.stdout('\n');
  }
  if (!opts.quiet) for (const line of wrote) io.stderr(line + '\n');

  io.stderr(problemLines(result, spec, io));
  return runExitCode(result);
}

function problemLines(result: RunResult, spec: CheckedSpec, io: CliIo): string {
  const headers = new Map<string, string[] | undefined>();
  const columnIndex = (abs: string, column: string): number | undefined => {
    if (!headers.has(abs)) headers.set(abs, readHeaderFile(abs)?.headers);
    const i = headers.get(abs)?.indexOf(column) ?? -1;
    return i >= 0 ? i + 1 : undefined;
  };
  const lines = result.errors.map((e) => runErrorLine(e, { display: spec.display, dir: spec.dir }, io.cwd, columnIndex));
  // a fit (or group) that did not converge is reported at its `fit` statement
  const fitRange = new Map(spec.plan.fits.map((f) => [f.name, f.range]));
  for (const f of result.fits) {
    if (f.stop.converged) continue;
    const message = MSG.notConverged(fitLabel(f), `${f.stop.code}: ${f.stop.message}`);
    const r = fitRange.get(f.name);
    lines.push(r ? located(spec.display, r.start.line, r.start.column, 'error', message) : plainError(message));
  }
  // Expectations on a fit that produced no result only repeat the errors above.
  const quiet = (e: RunResult['expectations'][number]): boolean => result.errors.length > 0 && e.actual === null;
  for (const e of result.expectations) if (!e.passed && !quiet(e)) lines.push(`${spec.display}:${e.expectation.range.start.line}:${e.expectation.range.start.column}: error: ${MSG.expectationFailed(e.expectation.text, e.message)}`);
  return lines.map((l) => l + '\n').join('');
}

/** Print each clash (at the data statement for a data file, else at the option) and exit 2. */
function refuse(clashes: readonly Clash[], spec: CheckedSpec, io: CliIo): ExitCode {
  for (const c of clashes) {
    const message = clashMessage(c, (p) => displayPath(p, io.cwd));
    const range: Range | undefined = c.kind === 'input' && c.input.role === 'data' ? c.input.range : undefined;
    io.stderr((range ? located(spec.display, range.start.line, range.start.column, 'error', message) : plainError(message)) + '\n');
  }
  return EXIT.inputError;
}
