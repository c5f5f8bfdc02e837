/**
 * The command dispatcher: `leastwise <command> [args]`. Every failure becomes
 * one `error:` line and an exit code; no stack trace reaches the user.
 */
import pkg from '../../../package.json';
import { closest } from './args';
import { checkCommand } from './check';
import { fitCommand } from './fit';
import { gatherCommand } from './gather';
import { EXIT, type CliIo, type ExitCode } from './io';
import { plainError } from './located-lines';
import { HELP, MSG, TOOL } from './messages';
import { newCommand } from './new';
import { planCommand } from './plan';

export type CommandName = 'check' | 'plan' | 'fit' | 'gather' | 'new';

export const COMMANDS: Record<CommandName, (argv: string[], io: CliIo) => Promise<ExitCode>> = {
  check: checkCommand,
  plan: planCommand,
  fit: fitCommand,
  gather: gatherCommand,
  new: newCommand,
};

export function isCommandName(s: string): s is CommandName {
  return Object.prototype.hasOwnProperty.call(COMMANDS, s);
}

export const VERSION: string = pkg.version;

/** Run the command line `argv` (without the node and script paths). */
export async function runCli(argv: string[], io: CliIo): Promise<ExitCode> {
  try {
    const [first, ...rest] = argv;
    if (first === undefined) {
      io.stderr(HELP.main);
      return EXIT.inputError;
    }
    if (first === '-h' || first === '--help' || first === 'help') {
      if (rest[0] && isCommandName(rest[0])) return await COMMANDS[rest[0]](['--help'], io);
      io.stdout(HELP.main);
      return EXIT.ok;
    }
    if (first === '-v' || first === '--version') {
      io.stdout(`${TOOL} ${VERSION}\n`);
      return EXIT.ok;
    }
    if (!isCommandName(first)) {
      io.stderr(plainError(MSG.unknownCommand(first, closest(first, Object.keys(COMMANDS)))) + '\n');
      return EXIT.inputError;
    }
    return await COMMANDS[first](rest, io);
  } catch (e) {
    const detail = e instanceof Error ? e.message.split('\n')[0] : String(e);
    io.stderr(plainError(MSG.internal(detail)) + '\n');
    return EXIT.inputError;
  }
}


