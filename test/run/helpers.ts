/** Test helpers for the runner: invented CSVs in a temp folder, spec → analyze → run. */
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll } from 'vitest';
import { analyze } from '../../parser/index';
import { headerLookup } from '../../engine/data/header';
import { runPlan, type RunOptions } from '../../engine/runner/run-plan';
import type { RunResult } from '../../engine/result';
import type { Diagnostic } from '../../parser/plan';

/** Seeded standard normal values (shared test generator), re-exported for the runner tests. */
export { normals } from '../fixtures/random';

const made: string[] = [];
// Registered in the root suite of each test file that imports this module.
afterAll(() => {
  for (const d of made.splice(0)) rmSync(d, { recursive: true, force: true });
});

/** A fresh folder under the OS temp dir, removed after the test file's tests. */
export function tempDir(): string {
  const d = mkdtempSync(join(tmpdir(), 'lw-run-'));
  made.push(d);
  return d;
}

/** Writes `name` in `dir` from a header and rows of cells. */
export function writeCsv(dir: string, name: string, header: string[], rows: (number | string)[][]): string {
  const path = join(dir, name);
  writeFileSync(path, [header.join(','), ...rows.map((r) => r.join(','))].join('\n') + '\n');
  return path;
}

export interface SpecRun {
  result: RunResult;
  diagnostics: Diagnostic[];
}

/**
 * Analyzes `spec` (with real CSV headers read from `dir` unless `headers: false`)
 * and runs it. Fails the test when the parser reports an error.
 */
export async function runSpec(spec: string, dir: string, options: { headers?: boolean } & Partial<RunOptions> = {}): Promise<SpecRun> {
  const useHeaders = options.headers ?? true;
  const { plan, diagnostics } = analyze(spec, useHeaders ? { headers: headerLookup(dir) } : {});
  const errors = diagnostics.filter((d) => d.severity === 'error');
  if (errors.length) throw new Error(`spec has errors: ${errors.map((d) => `${d.code}: ${d.message}`).join('; ')}`);
  const result = await runPlan(plan, { baseDir: dir, specText: spec, ...options });
  return { result, diagnostics };
}
