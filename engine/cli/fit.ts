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
import { mkdirSync, writeFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { readHeaderFile } from '../data/index';
import { resultToJson, runPlan } from '../index';
import { iterationText } from '../views/progress';
import type { RunResult } from '../result';
import type { RunMode } from '../parallel/fit-groups';
import { runText } from '../views/text';
import { fitLabel } from '../views/summary';
import { fitSections, shownFitIndices } from '../views/groups';
import { parseCommandArgs } from './args';
import { EXIT, type CliIo, type ExitCode } from './io';
import { displayPath, plainError, runErrorLine } from './locate';
import { HELP, MSG } from './messages';
import { groupTablePaths, inputPaths, reportChartDir, writeCharts, writeGroupTables, writeReport, type WrittenChart } from './outputs';
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
  for (const f of result.fits) if (!f.stop.converged) lines.push(plainError(MSG.notConverged(fitLabel(f), `${f.stop.code}: ${f.stop.message}`)));
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

  // Refuse to write over inputs before writing anything.
  const inputs = inputPaths(result, spec.path);
  const targets = [opts.json && opts.json !== '-' ? resolve(io.cwd, opts.json) : null, opts.report ? resolve(io.cwd, opts.report) : null, ...groupPaths.values()].filter((p): p is string => p !== null);
  for (const t of targets) if (inputs.has(t)) return fail(plainError(MSG.wouldOverwriteInput(displayPath(t, io.cwd))));

  const jsonOnly = opts.json === '-';
  const json = opts.json !== undefined ? resultToJson(result) : '';
  if (jsonOnly) io.stdout(json.endsWith('\n') ? json : json + '\n');
  else if (!opts.quiet) io.stdout(runText(result));

  try {
    if (opts.json !== undefined && !jsonOnly) {
      const path = resolve(io.cwd, opts.json);
      mkdirSync(dirname(path), { recursive: true });
      writeFileSync(path, json.endsWith('\n') ? json : json + '\n');
      if (!opts.quiet) io.stderr(MSG.wrote('result JSON', displayPath(path, io.cwd)) + '\n');
    }
    let charts: WrittenChart[] = [];
    if (opts.charts !== undefined) {
      const dir = resolve(io.cwd, opts.charts);
      charts = await writeCharts(result, dir);
      if (!opts.quiet) io.stderr(MSG.wrote(`${charts.length} charts`, displayPath(dir, io.cwd)) + '\n');
    }
    if (opts.report !== undefined) {
      const path = resolve(io.cwd, opts.report);
      if (opts.charts === undefined) {
        // only the fits the report shows in full (for a per-group fit with many groups: its flagged groups)
        const dir = reportChartDir(path);
        charts = await writeCharts(result, dir, new Set(shownFitIndices(fitSections(result))));
        if (!opts.quiet) io.stderr(MSG.wrote(`${charts.length} charts`, displayPath(dir, io.cwd)) + '\n');
      }
      writeReport(result, path, charts, spec.text);
      if (!opts.quiet) io.stderr(MSG.wrote('report', displayPath(path, io.cwd)) + '\n');
    }
    if (opts.groups !== undefined) {
      for (const written of writeGroupTables(result, groupPaths)) if (!opts.quiet) io.stderr(MSG.wrote('group table', displayPath(written, io.cwd)) + '\n');
    }
  } catch (e) {
    const err = e as NodeJS.ErrnoException;
    return fail(plainError(MSG.cannotWrite(err.path ?? 'output', err.code ?? err.message)));
  }

  io.stderr(problemLines(result, spec, io));
  return runExitCode(result);
}
