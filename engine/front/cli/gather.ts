/**
 * `leastwise gather FILE.lsq SHARD.json... [--json PATH|-] [--report PATH.md] [--charts DIR] [--groups PATH.csv] [--quiet]`
 *
 * Joins the result JSON of the shards of a run (`fit --shard I/N --json`)
 * into the result of one run (engine/runner/gather.ts) and shows and saves it
 * as `fit` does (deliver.ts). The spec is read and checked as `fit` checks
 * it, so the plan is the one the shards ran; the shard files are inputs: no
 * output may replace one.
 */
import { resolve } from 'node:path';
import { gatherShards, type ShardFile } from '../../runner/index';
import { readInputSync, type InputFile } from '../../io/index';
import { startCommand } from './args';
import { deliverRun, OUTPUT_OPTIONS, planOutputs, type OutputOptions } from './deliver';
import { EXIT, type CliIo, type ExitCode } from './io';
import { displayPath, plainError } from './located-lines';
import { MSG } from './messages';
import { checkSpec, diagnosticText, readSpec } from './spec';

export async function gatherCommand(argv: string[], io: CliIo): Promise<ExitCode> {
  const args = startCommand<OutputOptions>('gather', argv, io, { ...OUTPUT_OPTIONS }, 'many');
  if (!args.ok) return args.code;
  const fail = (lines: string[]): ExitCode => {
    for (const l of lines) io.stderr(plainError(l) + '\n');
    return EXIT.inputError;
  };
  const [specArg, ...shardArgs] = args.positionals;
  if (shardArgs.length === 0) return fail([MSG.needShards()]);

  const read = readSpec(specArg, io);
  if (!read.ok) {
    io.stderr(read.line + '\n');
    return EXIT.inputError;
  }
  const spec = checkSpec(read.spec);
  io.stderr(diagnosticText(spec));
  if (spec.errors > 0) return fail([MSG.specHasErrors(spec.errors)]);

  const files: ShardFile[] = [];
  const inputs: InputFile[] = [];
  const problems: string[] = [];
  for (const a of shardArgs) {
    const path = resolve(io.cwd, a);
    const name = displayPath(path, io.cwd);
    inputs.push({ role: 'file', path });
    let text: string;
    try {
      text = readInputSync(path).toString('utf8');
    } catch (e) {
      problems.push(MSG.shardUnreadable(name, e instanceof Error ? e.message : String(e)));
      continue;
    }
    try {
      files.push({ name, value: JSON.parse(text) });
    } catch (e) {
      problems.push(MSG.shardNotJson(name, e instanceof Error ? e.message : String(e)));
    }
  }
  if (problems.length) return fail(problems);

  const grouped = spec.plan.fits.filter((f) => f.groupBy !== undefined).map((f) => f.name);
  const planned = planOutputs(args.values, grouped, spec, io, inputs);
  if (!planned.ok) return planned.code;

  const out = gatherShards(spec.plan, { text: spec.text, path: spec.display }, files, (k, n) => MSG.rerunShard(spec.display, k, n));
  if (!out.ok) return fail(out.problems);
  return deliverRun(out.result, planned.outputs, spec, io);
}
