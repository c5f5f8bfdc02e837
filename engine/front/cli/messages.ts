/**
 * Every user-facing text of the command line: help pages and messages.
 * Messages are single lines without the `file:line:col: error:` prefix
 * (locate.ts adds it).
 */
import { DEFAULT_POLY_DEGREE, MAX_POLY_DEGREE, templateIds } from '../../templates';
import { AUTO_MIN_REFIT_ROWS } from '../../groups/bootstrap-threads';
import { AUTO_GROUPS_ALONE, AUTO_MIN_GROUPS, AUTO_MIN_ROWS } from '../../groups/threads';

export const TOOL = 'leastwise';

export const HELP = {
  main: `Usage: leastwise <command> [options]

Fit models written in .lsq spec files to CSV data, with standard errors,
intervals and residual checks.

Commands:
  check FILE...    check specs (syntax, names, data columns) and list problems
  plan FILE        print the checked fitting plan as JSON
  fit FILE         run the fits of a spec and print, save or chart the results
  gather FILE SHARD.json...
                   join the results of the shards of a per-group run
  new DATA.csv     write a starter spec for a CSV file from a model template

Options:
  -h, --help       show help (also: leastwise <command> --help)
  -v, --version    show the version

Exit codes: 0 success, 1 an expectation failed, 2 spec or data error,
3 a fit did not converge.
`,
  check: `Usage: leastwise check FILE...

Check one or more .lsq specs without fitting. Data files named in a spec are
read for their header only, so misspelt columns are found too.

Prints one line per problem:  file:line:col: error|warning: message
Exit code 2 when any error was found, else 0.
`,
  plan: `Usage: leastwise plan FILE

Print the checked fitting plan of a spec as JSON on stdout (what the engine
will run). Problems go to stderr; exit code 2 when the spec has errors.
`,
  fit: `Usage: leastwise fit FILE.lsq [options]

Run the fits of a spec, evaluate its predictions, inversions, comparisons and
expectations, and print a summary per fit.

Options:
  --fit NAME       run only this fit (repeatable); queries and expectations
                   about other fits are skipped
  --json PATH|-    write the full result as JSON (validates against
                   engine/result.schema.json); "-" writes only JSON to stdout
  --report PATH.md write a Markdown report; its charts go to a folder
                   PATH-charts/ next to it (or to --charts DIR when given)
  --charts DIR     write SVG charts for every fit into DIR
  --groups PATH.csv
                   write the group table of a per-group fit (per COLUMN) as
                   CSV: group, n, each estimate and standard error, R²,
                   reduced χ², stop, flags. Several per-group fits: one file
                   each, PATH-<fit>.csv
  --threads N      threads for per-group fits (default: all cores, used only
                   from ${AUTO_MIN_GROUPS} groups and either ${AUTO_GROUPS_ALONE} groups or ${AUTO_MIN_ROWS} rows on);
                   1 fits every group in this thread. Also the threads of
                   bootstrap refits (automatic from ${AUTO_MIN_REFIT_ROWS} refit-rows,
                   i.e. refits × rows, on)
  --quiet          print no summary; problems and failed expectations still
                   go to stderr
  --trace          record each solver's per-iteration trace (cost, gradient,
                   step, trust radius, reduction ratio) in the summary and
                   the JSON; per-group fits then run in this thread
  --shard I/N      fit shard I of N of the groups of each per-group fit
                   (contiguous runs of groups balanced by rows; fits without
                   groups in shard 1 only); join them with leastwise gather.
                   Inside a Slurm array task the shard is taken from
                   SLURM_ARRAY_TASK_ID/_MIN/_MAX (say --shard 1/1 to fit
                   everything)
  --shards N       the number of shards of a Kubernetes indexed job, whose
                   JOB_COMPLETION_INDEX gives the shard
  -h, --help       show this help

A per-group fit prints its group table, the median and IQR of each parameter
across converged groups, the worst groups and, with more than 5 groups, full
results only for flagged groups (at most 10; every group is in --json).

Exit codes: 0 success, 1 an expectation failed, 2 spec or data error,
3 a fit, or a group of a per-group fit, failed or did not converge (3 wins
over 1; the other groups are still fitted and reported).
`,
  gather: `Usage: leastwise gather FILE.lsq SHARD.json... [options]

Join the result JSON of every shard of a run (leastwise fit FILE.lsq
--shard I/N --json SHARD.json) into the result of one run: the same summary,
JSON, report and group tables, values and order, as if the spec had been
fitted in one go. Checks first that every shard is there once and that all
were fitted from this spec text, the same data and this version; a missing
shard is named with the command that reruns it.

Options:
  --json PATH|-    write the joined result as JSON; "-" writes only JSON to
                   stdout
  --report PATH.md write a Markdown report (charts in PATH-charts/, or
                   --charts DIR)
  --charts DIR     write SVG charts for every fit into DIR
  --groups PATH.csv
                   write the group table of each per-group fit as CSV
  --quiet          print no summary
  -h, --help       show this help

Exit codes as for leastwise fit; 2 also when the shards do not belong
together.
`,
  new: (): string => `Usage: leastwise new DATA.csv [options]

Write a starter spec for a CSV file: a model template with starting values
computed from the data (each heuristic is explained in the spec's comments).

Options:
  --x COL          predictor column (default: the first numeric column)
  --y COL          response column (default: the next numeric column)
  --model ID       template (default: line). One of:
                   ${templateIds().join(', ')}
  --degree N       degree of --model polynomial (default ${DEFAULT_POLY_DEGREE}, at most ${MAX_POLY_DEGREE})
  --out FILE       spec to write (default: DATA.lsq next to the CSV; "-" for
                   stdout). An existing file is never overwritten.
  -h, --help       show this help
`,
};

export const MSG = {
  unknownCommand: (c: string, suggestion: string | null) => `unknown command '${c}'${suggestion ? ` - did you mean '${suggestion}'?` : ''} (see leastwise --help)`,
  noCommand: () => 'no command given (see leastwise --help)',
  badArgs: (cmd: string, detail: string) => `${detail} (see leastwise ${cmd} --help)`,
  needFiles: (cmd: string) => `${cmd} needs a spec file (see leastwise ${cmd} --help)`,
  oneFile: (cmd: string) => `${cmd} takes exactly one file (see leastwise ${cmd} --help)`,
  cannotRead: (detail: string) => `cannot read file: ${detail}`,
  dataMissing: (path: string) => `data file not found: ${path} (paths are relative to the spec's folder)`,
  dataUnreadable: (path: string, reason: string) => `cannot read data file ${path}: ${reason}`,
  cannotWrite: (path: string, detail: string) => `cannot write ${path}: ${detail}`,
  renderFailed: (detail: string) => `cannot draw the outputs: ${detail}; nothing was written`,
  exists: (path: string) => `${path} already exists; choose another --out (existing files are never overwritten)`,
  unknownFit: (name: string, known: string[]) => `no fit named '${name}' in this spec${known.length ? ` (fits: ${known.join(', ')})` : ''}`,
  specHasErrors: (n: number) => `${n} error${n === 1 ? '' : 's'} in the spec; nothing was fitted`,
  checked: (files: number, errors: number, warnings: number) =>
    `${files} file${files === 1 ? '' : 's'} checked: ${errors} error${errors === 1 ? '' : 's'}, ${warnings} warning${warnings === 1 ? '' : 's'}`,
  notConverged: (fit: string, reason: string) => `fit ${fit} did not converge: ${reason}`,
  expectationFailed: (text: string, message: string) => `expectation failed: ${text} (${message})`,
  noGroupedFit: () => 'no fit of this run is fitted per group (per COLUMN), so --groups has nothing to write',
  groupMode: (fit: string, mode: { kind: 'workers'; threads: number; hostThread: boolean } | { kind: 'in_process'; reason: string }) =>
    mode.kind === 'workers'
      ? `fit ${fit}: groups fitted on ${mode.threads} worker thread${mode.threads === 1 ? '' : 's'}${mode.hostThread ? ' and this thread' : ''}`
      : `fit ${fit}: groups fitted in this thread (${mode.reason})`,
  badThreads: (value: string) => `--threads needs a whole number of at least 1, not '${value}' (see leastwise fit --help)`,
  wrote: (what: string, path: string) => `wrote ${what}: ${path}`,
  unknownColumn: (name: string, headers: string[]) => `no column '${name}' in the data (columns: ${headers.join(', ')})`,
  notNumeric: (name: string) => `column '${name}' holds no numbers`,
  needTwoNumeric: () => 'the data need at least two numeric columns (predictor and response)',
  sameColumn: (name: string) => `--x and --y both name '${name}'`,
  degreeWithoutPolynomial: () => '--degree goes with --model polynomial',
  badDegree: (given: string, max: number) => `--degree must be a whole number from 1 to ${max}, not '${given}'`,
  unknownTemplate: (id: string, suggestion: string | null) => `unknown model template '${id}'${suggestion ? ` - did you mean '${suggestion}'?` : ''} (templates: ${templateIds().join(', ')})`,
  scaffolded: (spec: string, title: string, y: string, x: string) =>
    `wrote ${spec}: ${title} of ${y} against ${x}. Next: leastwise check ${spec}, then leastwise fit ${spec}`,
  sampled: (rows: number) => `(The starting values come from the first ${rows.toLocaleString('en-US')} rows of the data; the fit uses every row.)`,
  internal: (detail: string) => `internal error: ${detail} (please report this with the spec and data)`,
  progress: (fit: string, done: number, total: number) => `fitted ${fit} (${done} of ${total})`,
  iterating: (what: string) => `fitting ${what}`,
  badShards: (value: string) => `--shards needs a whole number of at least 1, not '${value}' (see leastwise fit --help)`,
  shardAndShards: () => '--shard I/N already says how many shards there are; leave out --shards',
  shardsWithoutIndex: () => '--shards N goes with a Kubernetes indexed job (JOB_COMPLETION_INDEX); elsewhere pass --shard I/N',
  nothingToShard: () => 'no fit of this run is fitted per group (per COLUMN), so there is nothing to share out among shards',
  shardIgnored: (where: string) => `note: this is ${where}, but no fit of this run is fitted per group: fitting the whole spec, not a shard`,
  shardFromEnvironment: (shard: { index: number; count: number }, where: string, variables: string) =>
    `fitting shard ${shard.index} of ${shard.count} (from ${where}: ${variables}; pass --shard 1/1 to fit everything)`,
  shardWithoutJson: () => 'note: leastwise gather joins shards from their result JSON; this shard writes none (add --json PATH)',
  shardGroups: (shard: { index: number; count: number }, f: { fit: string; groups: number; from: number; to: number }) =>
    f.to > f.from
      ? `shard ${shard.index} of ${shard.count}: groups ${f.from + 1}–${f.to} of ${f.groups} of fit ${f.fit}`
      : `shard ${shard.index} of ${shard.count}: no groups of fit ${f.fit} (${f.groups} groups for ${shard.count} shards)`,
  shardUnreadable: (file: string, detail: string) => `cannot read shard result ${file}: ${detail}`,
  shardNotJson: (file: string, detail: string) => `shard result ${file} is not valid JSON: ${detail}`,
  rerunShard: (spec: string, index: number, count: number) => `rerun it with leastwise fit ${spec} --shard ${index}/${count} --json …`,
  needShards: () => 'gather needs the spec and the result JSON of every shard (see leastwise gather --help)',
};
