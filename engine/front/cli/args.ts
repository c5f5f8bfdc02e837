/**
 * Argument parsing with Node's own `util.parseArgs` (strict: unknown options
 * are errors), turning its exceptions into messages.
 */
import { parseArgs, type ParseArgsConfig } from 'node:util';
import { suggest } from '../../../parser/suggest';
import { EXIT, type CliIo, type ExitCode } from './io';
import { plainError } from './located-lines';
import { HELP, MSG } from './messages';

export type OptionSpec = NonNullable<ParseArgsConfig['options']>;

export type Parsed<V> = { ok: true; values: V; positionals: string[] } | { ok: false; message: string };

/** Parse `argv` for command `cmd`; `--help`/`-h` is always accepted. */
export function parseCommandArgs<V extends object>(cmd: string, argv: string[], options: OptionSpec): Parsed<V & { help?: boolean }> {
  try {
    const r = parseArgs({
      args: argv,
      options: { ...options, help: { type: 'boolean', short: 'h' } },
      allowPositionals: true,
      strict: true,
    });
    return { ok: true, values: r.values as V & { help?: boolean }, positionals: r.positionals };
  } catch (e) {
    const raw = e instanceof Error ? e.message : String(e);
    // Node's messages carry advice for script authors ("To specify a positional argument ..."); keep the first sentence.
    const sentence = raw.split(/\.\s/)[0].replace(/\.$/, '');
    const first = sentence.charAt(0).toLowerCase() + sentence.slice(1);
    return { ok: false, message: MSG.badArgs(cmd, first) };
  }
}

/** The closest candidate by the parser's "did you mean" rule (parser/suggest.ts: one distance, one threshold for specs and the command line), or null. */
export function closest(word: string, candidates: readonly string[]): string | null {
  return suggest(word, candidates, 1)[0] ?? null;
}

/** The commands that take spec files, with the help text each prints for `--help`. */
type SpecCommand = 'check' | 'plan' | 'fit' | 'gather';

/**
 * The start every spec command shares: parse `argv`, print the help for
 * `--help`, and check the number of files (`one` or `many`). Returns the
 * parsed arguments, or the exit code the command ends with (its message
 * already written).
 */
export function startCommand<V extends object>(
  cmd: SpecCommand, argv: string[], io: CliIo, options: OptionSpec, files: 'one' | 'many',
): { ok: true; values: V & { help?: boolean }; positionals: string[] } | { ok: false; code: ExitCode } {
  const args = parseCommandArgs<V>(cmd, argv, options);
  const fail = (message: string) => {
    io.stderr(plainError(message) + '\n');
    return { ok: false as const, code: EXIT.inputError };
  };
  if (!args.ok) return fail(args.message);
  if (args.values.help) {
    io.stdout(HELP[cmd]);
    return { ok: false, code: EXIT.ok };
  }
  const n = args.positionals.length;
  if (n === 0) return fail(MSG.needFiles(cmd));
  if (files === 'one' && n > 1) return fail(MSG.oneFile(cmd));
  return args;
}
