/** `leastwise check FILE...`: located diagnostics for each spec, exit 2 on any error. */
import { startCommand } from './args';
import { EXIT, type CliIo, type ExitCode } from './io';
import { MSG } from './messages';
import { checkSpec, diagnosticText, readSpec } from './spec';

export async function checkCommand(argv: string[], io: CliIo): Promise<ExitCode> {
  const args = startCommand('check', argv, io, {}, 'many');
  if (!args.ok) return args.code;
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
