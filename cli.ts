/**
 * The `leastwise` executable: argv in, exit code out. The only module that
 * touches `process`; everything else is in engine/front/cli and takes an IO object.
 */
import { runCli } from './engine/front/cli/main';
import type { StageHooks } from './engine/io/index';
import { terminalSafe } from './engine/front/views/escape';

// A reader that stops early (`leastwise fit x.lsq --json - | head`) closes the
// pipe: end quietly instead of reporting a write error.
process.stdout.on('error', (e: NodeJS.ErrnoException) => {
  if (e.code === 'EPIPE') process.exit(process.exitCode ?? 0);
});

/**
 * Test hook (test/front/cli/atomic.test.ts): with LEASTWISE_TEST_PAUSE_WRITE_AFTER=N
 * the output writer stops for good once a staged file holds N bytes, after
 * saying so on stderr, so a test can kill the process mid-write without
 * guessing at timing.
 */
function writeHooks(): StageHooks | undefined {
  const after = Number(process.env.LEASTWISE_TEST_PAUSE_WRITE_AFTER);
  if (!(after > 0)) return undefined;
  return {
    pause: {
      afterBytes: after,
      onPause: (temp) => {
        process.stderr.write(`leastwise-test: paused writing ${temp}\n`);
        Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0); // blocks until the process is killed
      },
    },
  };
}

// The output boundary: names and cell text from spec and data files reach the
// terminal with control characters escaped (engine/front/views/escape.ts), so a data
// file cannot retitle the window or clear the screen; JSON stays valid.
runCli(process.argv.slice(2), {
  stdout: (text) => void process.stdout.write(terminalSafe(text)),
  stderr: (text) => void process.stderr.write(terminalSafe(text)),
  stderrIsTTY: Boolean(process.stderr.isTTY),
  cwd: process.cwd(),
  env: process.env,
  writeHooks: writeHooks(),
}).then(
  (code) => {
    process.exitCode = code;
  },
  () => {
    process.stderr.write('error: internal error\n');
    process.exitCode = 2;
  },
);
