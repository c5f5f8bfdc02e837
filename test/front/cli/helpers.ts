/** Shared helpers of the CLI tests: temp folders, in-process runs, schema validation. */
import { cpSync, mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Ajv from 'ajv';
import { runCli } from '../../../engine/front/cli/main';
import { memoryIo } from '../../../engine/front/cli/io';

export const ROOT = join(__dirname, '..', '..', '..');
export const SAMPLES = join(ROOT, 'samples');
export const SAMPLE_NAMES = ['cooling', 'photometer', 'enzyme', 'thermistor', 'doseresponse', 'drift', 'arrhenius', 'plate', 'agonist', 'potency', 'binding'] as const;

const made: string[] = [];

/** A fresh temp folder, removed by `cleanTemp()`. */
export function tempDir(prefix = 'lw-cli-'): string {
  const dir = mkdtempSync(join(tmpdir(), prefix));
  made.push(dir);
  return dir;
}

export function cleanTemp(): void {
  for (const d of made.splice(0)) rmSync(d, { recursive: true, force: true });
}

/** Copy samples/<name> into a temp folder; returns that folder (tests never write into samples/). */
export function sampleCopy(name: string): string {
  const dir = tempDir(`lw-${name}-`);
  cpSync(join(SAMPLES, name), dir, { recursive: true });
  return dir;
}

export interface CliRun {
  code: number;
  stdout: string;
  stderr: string;
}

/** Run `leastwise argv…` in-process with `cwd` as working directory. */
export async function cli(cwd: string, ...argv: string[]): Promise<CliRun> {
  const io = memoryIo(cwd);
  const code = await runCli(argv, io);
  return { code, stdout: io.stdoutText(), stderr: io.stderrText() };
}

let validator: ((data: unknown) => boolean) & { errors?: unknown } | null = null;

/** Validate a RunResult JSON value against engine/result.schema.json (ajv, draft-07). */
export function validateResult(value: unknown): { ok: boolean; errors: string } {
  if (!validator) {
    const ajv = new Ajv({ allErrors: true, strict: false });
    validator = ajv.compile(JSON.parse(readFileSync(join(ROOT, 'engine', 'result.schema.json'), 'utf8')));
  }
  const ok = validator(value) as boolean;
  return { ok, errors: ok ? '' : JSON.stringify(validator.errors).slice(0, 2000) };
}

/** True when text looks like a JavaScript stack trace. */
export function hasStackTrace(text: string): boolean {
  return /\n\s+at .+\(.+:\d+:\d+\)/.test(text) || /^\s+at /m.test(text);
}

/**
 * A private build of the CLI (`<tempdir>/cli.js`, with the engine worker beside it as in dist/), for tests
 * that run the executable in a child process: concurrent rebuilds of dist/ by other test files do not matter.
 */
export async function privateCliBuild(): Promise<string> {
  const { build } = await import('esbuild');
  const dir = tempDir('lw-cli-build-');
  await build({
    entryPoints: { cli: join(ROOT, 'cli.ts'), worker: join(ROOT, 'engine', 'worker.ts') },
    outdir: dir,
    bundle: true,
    platform: 'node',
    target: 'node20',
    format: 'cjs',
    external: ['vscode'],
    mainFields: ['module', 'main'],
    alias: { 'vega-canvas': join(ROOT, 'node_modules/vega-canvas/build/vega-canvas.browser.js') },
    logLevel: 'silent',
  });
  return join(dir, 'cli.js');
}
