/**
 * The `leastwise` executable: argv in, exit code out. The only module that
 * touches `process`; everything else is in engine/cli and takes an IO object.
 */
import { runCli } from './engine/cli/main';

// A reader that stops early (`leastwise fit x.lsq --json - | head`) closes the
// pipe: end quietly instead of reporting a write error.
process.stdout.on('error', (e: NodeJS.ErrnoException) => {
  if (e.code === 'EPIPE') process.exit(process.exitCode ?? 0);
});

runCli(process.argv.slice(2), {
  stdout: (text) => void process.stdout.write(text),
  stderr: (text) => void process.stderr.write(text),
  stderrIsTTY: Boolean(process.stderr.isTTY),
  cwd: process.cwd(),
}).then(
  (code) => {
    process.exitCode = code;
  },
  () => {
    process.stderr.write('error: internal error\n');
    process.exitCode = 2;
  },
);
