/** `leastwise plan FILE`: the checked plan as JSON on stdout. */
import { parseCommandArgs } from './args';
import { EXIT, type CliIo, type ExitCode } from './io';
import { plainError } from './located-lines';
import { HELP, MSG } from './messages';
import { checkSpec, diagnosticText, readSpec } from './spec';

export async function planCommand(argv: string[], io: CliIo): Promise<ExitCode> {
  const args = parseCommandArgs('plan', argv, {});
  if (!args.ok) {
    io.stderr(plainError(args.message) + '\n');
    return EXIT.inputError;
  }
  if (args.values.help) {
    io.stdout(HELP.plan);
    return EXIT.ok;
  }
  if (args.positionals.length !== 1) {
    io.stderr(plainError(args.positionals.length === 0 ? MSG.needFiles('plan') : MSG.oneFile('plan')) + '\n');
    return EXIT.inputError;
  }
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
