/**
 * The editor's export checks its targets with the CLI's output guard
 * (engine/io guard.ts): against the spec and every data file it declares -
 * those of the spec as it reads now and those of the run being exported,
 * loaded or not - by file identity. No vscode here.
 */
import { dirname, relative } from 'node:path';
import { clashMessage, declaredInputs, OutputGuard } from '../../engine/io';
import type { DataSource } from '../../parser/plan';

export interface ExportInputs {
  /** Absolute path of the spec file. */
  specPath: string;
  /** Data statements of the spec's current analysis. */
  declared: readonly Pick<DataSource, 'name' | 'path' | 'range'>[];
  /** Data files recorded in the run's provenance (paths as written in the spec). */
  recorded: readonly { name: string; path: string }[];
}

/** The refusal message when one of `targets` (absolute paths) is an input (or two are one file); null when all may be written. */
export function exportRefusal(inputs: ExportInputs, targets: readonly string[]): string | null {
  const data = [...inputs.declared, ...inputs.recorded.filter((r) => !inputs.declared.some((d) => d.name === r.name && d.path === r.path))];
  const guard = new OutputGuard(declaredInputs(inputs.specPath, data));
  const clashes = guard.check(targets.map((path) => ({ path, what: 'the export' })));
  if (!clashes.length) return null;
  const base = dirname(inputs.specPath);
  return clashMessage(clashes[0], (p) => relative(base, p).split('\\').join('/') || p);
}
