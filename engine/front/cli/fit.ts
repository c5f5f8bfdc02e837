/**
 * `leastwise fit FILE.lsq [--fit NAME] [--json PATH|-] [--report PATH.md] [--charts DIR] [--groups PATH.csv] [--threads N] [--shard I/N] [--shards N] [--quiet] [--trace]`
 *
 * Checks the spec (data-aware), runs it, prints the summary (or only JSON with
 * `--json -`), writes the requested files and maps the outcome to an exit
 * code (deliver.ts): 2 spec/data error > 3 no convergence > 1 failed
 * expectation > 0. A group of a per-group fit that failed or did not converge
 * counts as a fit that did not converge (3); the other groups are still
 * fitted and reported. Group flags that are not failures (few degrees of
 * freedom, at a bound, poor fit) do not change the exit code.
 *
 * With `--shard I/N`, or inside a Slurm array task or a Kubernetes indexed
 * job, it fits one shard of the groups (engine/groups/shards.ts), to be
 * joined by `leastwise gather` (gather.ts).
 */
import { runPlan } from '../../index';
import type { RunMode } from '../../groups/fit-groups';
import { parseShard, shardFromEnvironment, type Shard } from '../../groups/shards';
import type { RunResult } from '../../result';
import { iterationText } from '../views/progress';
import { startCommand } from './args';
import { deliverRun, OUTPUT_OPTIONS, planOutputs, type OutputOptions } from './deliver';
import { EXIT, type CliIo, type ExitCode } from './io';
import { plainError } from './located-lines';
import { MSG } from './messages';
import { progressLine } from './progress';
import { checkSpec, diagnosticText, readSpec } from './spec';

export { runExitCode } from './deliver';

interface FitValues extends OutputOptions {
  fit?: string[];
  threads?: string;
  trace?: boolean;
  shard?: string;
  shards?: string;
}

export async function fitCommand(argv: string[], io: CliIo): Promise<ExitCode> {
  const args = startCommand<FitValues>('fit', argv, io, {
    ...OUTPUT_OPTIONS,
    fit: { type: 'string', multiple: true },
    threads: { type: 'string' },
    trace: { type: 'boolean' },
    shard: { type: 'string' },
    shards: { type: 'string' },
  }, 'one');
  if (!args.ok) return args.code;
  const opts = args.values;
  const fail = (line: string): ExitCode => {
    io.stderr(line + '\n');
    return EXIT.inputError;
  };

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

  const sharding = shardOf(opts, grouped, io);
  if (!sharding.ok) return fail(plainError(sharding.message));
  const shard = sharding.shard;

  // Every output, checked against every declared input before the run; nothing is written on a clash.
  const planned = planOutputs(opts, grouped, spec, io);
  if (!planned.ok) return planned.code;
  if (shard && shard.count > 1 && opts.json === undefined) io.stderr(MSG.shardWithoutJson() + '\n');

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
      ...(shard ? { shard } : {}),
      // with --threads, say how the groups were fitted (on stderr, after the run)
      ...(threads !== undefined && !opts.quiet ? { onGroupMode: (fit: string, mode: RunMode) => modes.push(MSG.groupMode(fit, mode)) } : {}),
      onProgress: (p) => progress.update(() => MSG.progress(p.group !== undefined ? `${p.fit} [${p.group}]` : p.fit, p.done, p.total)),
      // a long single fit: its iterations (the line is only drawn on a terminal, throttled; its text made only then)
      onIteration: (it) => progress.update(() => MSG.iterating(iterationText(it))),
    });
  } finally {
    progress.done();
  }
  for (const m of modes) io.stderr(m + '\n');
  if (!opts.quiet) for (const f of result.provenance.shard?.fits ?? []) io.stderr(MSG.shardGroups(result.provenance.shard!, f) + '\n');
  return deliverRun(result, planned.outputs, spec, io);
}

/**
 * The shard this run fits: `--shard I/N`, else the environment of a Slurm
 * array task or a Kubernetes indexed job (said on stderr), else none. A spec
 * without a per-group fit is not sharded (an explicit `--shard` with more
 * than one shard is refused; the environment is ignored, said so).
 */
function shardOf(opts: FitValues, grouped: readonly string[], io: CliIo): { ok: true; shard?: Shard } | { ok: false; message: string } {
  let shards: number | undefined;
  if (opts.shards !== undefined) {
    shards = Number(opts.shards);
    if (!(Number.isInteger(shards) && shards >= 1)) return { ok: false, message: MSG.badShards(opts.shards) };
  }
  if (opts.shard !== undefined) {
    if (shards !== undefined) return { ok: false, message: MSG.shardAndShards() };
    const parsed = parseShard(opts.shard);
    if (!parsed.ok) return parsed;
    if (grouped.length === 0 && parsed.shard.count > 1) return { ok: false, message: MSG.nothingToShard() };
    return { ok: true, shard: parsed.shard };
  }
  const env = shardFromEnvironment(io.env ?? {}, shards);
  if (env === undefined) return shards !== undefined ? { ok: false, message: MSG.shardsWithoutIndex() } : { ok: true };
  if (!env.ok) return env;
  if (grouped.length === 0) {
    io.stderr(MSG.shardIgnored(env.source.kind === 'slurm' ? 'a Slurm array task' : 'a Kubernetes indexed job') + '\n');
    return { ok: true };
  }
  io.stderr(MSG.shardFromEnvironment(env.shard, env.source.kind === 'slurm' ? 'the Slurm array task' : 'the Kubernetes indexed job', env.source.variables) + '\n');
  return { ok: true, shard: env.shard };
}
