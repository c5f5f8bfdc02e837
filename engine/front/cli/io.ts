/**
 * What a command may touch besides the file system: two output streams, the
 * working directory and whether stderr is a terminal. cli.ts builds the real
 * one from `process`; tests pass a recording one.
 */

import type { StageHooks } from '../../io/index';

export interface CliIo {
  stdout(text: string): void;
  stderr(text: string): void;
  /** stderr is an interactive terminal: progress lines are allowed. */
  stderrIsTTY: boolean;
  /** Directory that relative paths on the command line are resolved against. */
  cwd: string;
  /** Clock in milliseconds for progress throttling. Default `Date.now`. */
  now?: () => number;
  /** Environment variables (cli.ts: `process.env`): `fit` reads the shard of a Slurm array task or Kubernetes indexed job from them. Default none. */
  env?: Readonly<Record<string, string | undefined>>;
  /** Test hooks of the output writer (engine/io/stage.ts); cli.ts sets them from the environment. */
  writeHooks?: StageHooks;
}

/** Exit codes of every command. */
export const EXIT = {
  /** Success. */
  ok: 0,
  /** A run finished but an `expect` line failed. */
  expectationFailed: 1,
  /** The spec, the data or the command line is wrong (or an internal failure). */
  inputError: 2,
  /** A fit did not converge. */
  notConverged: 3,
} as const;

export type ExitCode = (typeof EXIT)[keyof typeof EXIT];

/** An IO that records output, for tests and for embedding. */
export function memoryIo(cwd: string, stderrIsTTY = false): CliIo & { out: string[]; err: string[]; stdoutText(): string; stderrText(): string } {
  const out: string[] = [];
  const err: string[] = [];
  return {
    out,
    err,
    stdout: (t) => void out.push(t),
    stderr: (t) => void err.push(t),
    stderrIsTTY,
    cwd,
    stdoutText: () => out.join(''),
    stderrText: () => err.join(''),
  };
}
