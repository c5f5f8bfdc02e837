/** `leastwise plan FILE`: the checked plan as JSON on stdout. */
import { startCommand } from './args';
import { EXIT, type CliIo, type ExitCode } from './io';
import { plainError } from './located-lines';
import { MSG } from './messages';
import { checkSpec, diagnosticText, readSpec } from './spec';

export async function planCommand(argv: string[], io: CliIo): Promise<ExitCode> {
  const args = startCommand('plan', argv, io, {}, 'one');
  if (!args.ok) return args.code;
  const read = readSpec(args.positionals[0], io);
  if (!read.ok) {
    io.stderr(read.line + '\n');
    return EXIT.inputError;
  }
  const checked = checkSpec(read.spec);
  io.stderr(diagnosticText(checked));
  if (checked.errors > 0) {
    io.stderr(plainError(MSG.specHasErrors(checked.errors)) + '\n');
    return EXIT.inputError;
  }
  // Infinite bounds become null, as the plan documents for JSON.
  io.stdout(JSON.stringify(checked.plan, null, 2) + '\n');
  return EXIT.ok;
}
