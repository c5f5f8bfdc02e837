/**
 * `leastwise fit FILE.lsq [--fit NAME] [--json PATH|-] [--report PATH.md] [--charts DIR] [--groups PATH.csv] [--threads N] [--quiet] [--trace]`
 *
 * Checks the spec (data-aware), runs it, prints the summary (or only JSON with
 * `--json -`), writes the requested files and maps the outcome to an exit
 * code: 2 spec/data error > 3 no convergence > 1 failed expectation > 0.
 * A group of a per-group fit that failed or did not converge counts as a fit
 * that did not converge (3); the other groups are still fitted and reported.
 * Group flags that are not failures (few degrees of freedom, at a bound, poor
 * fit) do not change the exit code.
 */
import { resolve } from 'node:path';
import type { Range } from '../../../parser/plan';
import { readHeaderFile } from '../../data/index';
import { runPlan } from '../../index';
import { clashMessage, declaredInputs, OutputError, OutputGuard, OutputStage, type Clash, type OutputTarget } from '../../io/index';
import { writeJson } from '../../run/json';
import { iterationText } from '../views/progress';
import type { RunResult } from '../../result';
import type { RunMode } from '../../groups/fit-groups';
import { runText } from '../views/text';
import { fitLabel } from '../views/summary';
import { fitSections, shownFitIndices } from '../views/groups';
import { parseCommandArgs } from './args';
import { EXIT, type CliIo, type ExitCode } from './io';
import { displayPath, located, plainError, runErrorLine } from './located-lines';
import { HELP, MSG } from './messages';
import { chartTargets, groupTablePaths, reportChartDir, stageCharts, stageGroupTables, stageJson, stageReport, type PlannedChart } from './outputs';
import { progressLine } from './progress';
import { checkSpec, diagnosticText, readSpec, type CheckedSpec } from './spec';

interface FitValues {
  fit?: string[];
  json?: string;
  report?: string;
  charts?: string;
  quiet?: boolean;
  threads?: string;
  groups?: string;
  trace?: boolean;
}

/** The exit code a finished run deserves. */
export function runExitCode(result: RunResult): ExitCode {
  if (result.errors.length > 0) return EXIT.inputError;
  if (result.fits.some((f) => !f.stop.converged)) return EXIT.notConverged;
  if (result.expectations.some((e) => !e.passed)) return EXIT.expectationFailed;
  return EXIT.ok;
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

export async function fitCommand(argv: string[], io: CliIo): Promise<ExitCode> {
  const args = parseCommandArgs<FitValues>('fit', argv, {
    fit: { type: 'string', multiple: true },
    json: { type: 'string' },
    report: { type: 'string' },
    charts: { type: 'string' },
    quiet: { type: 'boolean' },
    threads: { type: 'string' },
    groups: { type: 'string' },
    trace: { type: 'boolean' },
  });
  const fail = (line: string): ExitCode => {
    io.stderr(line + '\n');
    return EXIT.inputError;
  };
  if (!args.ok) return fail(plainError(args.message));
  const opts = args.values;
  if (opts.help) {
    io.stdout(HELP.fit);
    return EXIT.ok;
  }
  if (args.positionals.length !== 1) return fail(plainError(args.positionals.length ? MSG.oneFile('fit') : MSG.needFiles('fit')));

  const read = readSpec(args.positionals[0], io);
  if (!read.ok) return fail(read.line);
  const spec = checkSpec(read.spec);
  io.stderr(diagnosticText(spec));
  if (spec.errors > 0) return fail(plainError(MSG.specHasErrors(spec.errors)));

  const threads = opts.threads === undefined ? undefined : Number(opts.threads);
  if (threads !== undefined && !(Number.isInteger(threads) && threads >= 1)) return fail(plainError(MSG.badThreads(opts.threads ?? '')));

  const known = spec.plan.fits.map((f) => f.name);
  for (const name of opts.fit ?? []) if (!known.includes(name)) return fail(plainError(MSG.unknownFit(name, known)));
  const grouped = spec.plan.fits.filter((f) => f.groupBy !== undefined && (!opts.fit?.length || opts.fit.includes(f.name))).map((f) => f.name);
  if (opts.groups !== undefined && grouped.length === 0) return fail(plainError(MSG.noGroupedFit()));
  const groupPaths = opts.groups !== undefined ? groupTablePaths(grouped, resolve(io.cwd, opts.groups)) : new Map<string, string>();

  // Every output, checked against every declared input before the run (chart files, named by the
  // result, are checked once it is known); nothing is written on a clash.
  const inputs = declaredInputs(spec.path, spec.plan.data, spec.dir);
  const guard = new OutputGuard(inputs);
  const jsonPath = opts.json !== undefined && opts.json !== '-' ? resolve(io.cwd, opts.json) : undefined;
  const reportPath = opts.report !== undefined ? resolve(io.cwd, opts.report) : undefined;
  const chartDir = opts.charts !== undefined ? resolve(io.cwd, opts.charts) : reportPath !== undefined ? reportChartDir(reportPath) : undefined;
  const chartsOf = opts.charts !== undefined ? '--charts' : 'a chart of --report';
  const before: OutputTarget[] = [
    ...(jsonPath ? [{ path: jsonPath, what: '--json' }] : []),
    ...(reportPath ? [{ path: reportPath, what: '--report' }] : []),
    ...(chartDir ? [{ path: chartDir, what: opts.charts !== undefined ? '--charts' : 'the chart folder of --report' }] : []),
    ...[...groupPaths.values()].map((path) => ({ path, what: '--groups' })),
  ];
  const early = guard.check(before);
  if (early.length) return refuse(early, spec, io);

  const progress = progressLine(io);
  const modes: string[] = [];
  let result: RunResult;
  try {
    result = await runPlan(spec.plan, {
      baseDir: spec.dir,
      specText: spec.text,
      specPath: spec.display,
      ...(opts.fit?.length ? { fits: opts.fit } : {}),
      ...(threads !== undefined ? { threads } : {}),
      ...(opts.trace ? { trace: true } : {}),
      // with --threads, say how the groups were fitted (on stderr, after the run)
      ...(threads !== undefined && !opts.quiet ? { onGroupMode: (fit: string, mode: RunMode) => modes.push(MSG.groupMode(fit, mode)) } : {}),
      onProgress: (p) => progress.update(MSG.progress(p.group !== undefined ? `${p.fit} [${p.group}]` : p.fit, p.done, p.total)),
      // a long single fit: its iterations (the line is only drawn on a terminal, throttled)
      onIteration: (it) => progress.update(MSG.iterating(iterationText(it))),
    });
  } finally {
    progress.done();
  }
  for (const m of modes) io.stderr(m + '\n');

  // The chart files: with --charts every fit's, else only those the report shows in full
  // (for a per-group fit with many groups: its flagged groups).
  let charts: PlannedChart[] = [];
  if (chartDir !== undefined) {
    charts = chartTargets(result, chartDir, opts.charts !== undefined ? undefined : new Set(shownFitIndices(fitSections(result))));
    const late = guard.check(charts.map((c) => ({ path: c.path, what: chartsOf })));
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

/** Print each clash (at the data statement for a data file, else at the option) and exit 2. */
function refuse(clashes: readonly Clash[], spec: CheckedSpec, io: CliIo): ExitCode {
  for (const c of clashes) {
    const message = clashMessage(c, (p) => displayPath(p, io.cwd));
    const range: Range | undefined = c.kind === 'input' && c.input.role === 'data' ? c.input.range : undefined;
    io.stderr((range ? located(spec.display, range.start.line, range.start.column, 'error', message) : plainError(message)) + '\n');
  }
  return EXIT.inputError;
}
