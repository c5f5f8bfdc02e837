/** `leastwise check FILE...`: located diagnostics for each spec, exit 2 on any error. */
import { parseCommandArgs } from './args';
import { EXIT, type CliIo, type ExitCode } from './io';
import { plainError } from './located-lines';
import { HELP, MSG } from './messages';
import { checkSpec, diagnosticText, readSpec } from './spec';

export async function checkCommand(argv: string[], io: CliIo): Promise<ExitCode> {
  const args = parseCommandArgs('check', argv, {});
  if (!args.ok) {
    io.stderr(plainError(args.message) + '\n');
    return EXIT.inputError;
  }
  if (args.values.help) {
    io.stdout(HELP.check);
    return EXIT.ok;
  }
  if (args.positionals.length === 0) {
    io.stderr(plainError(MSG.needFiles('check')) + '\n');
    return EXIT.inputError;
  }
  let errors = 0;
  let warnings = 0;
  for (const file of args.positionals) {
    const read = readSpec(file, io);
    if (!read.ok) {
      io.stdout(read.line + '\n');
      errors++;
      continue;
    }
    const checked = checkSpec(read.spec);
    io.stdout(diagnosticText(checked));
    errors += checked.errors;
    warnings += checked.warnings;
  }
  io.stderr(MSG.checked(args.positionals.length, errors, warnings) + '\n');
  return errors > 0 ? EXIT.inputError : EXIT.ok;
}
