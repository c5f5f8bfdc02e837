/**
 * The output guard: before anything is written, every output of a run is
 * checked against every input the spec declares - the spec itself and each
 * `data` file of the plan, whether it loaded or not and whether the run uses
 * it or not - by file identity (identity.ts: device and inode, or the real
 * location of a file that does not exist yet), not by spelling. Outputs are
 * also checked against each other (two outputs naming one file would make the
 * second replace the first). Used by the CLI (`fit`, `new`) and the editor's
 * export.
 */
import { dirname, isAbsolute, resolve } from 'node:path';
import type { DataSource, Range } from '../../parser/plan';
import { outputText } from '../messages';
import { fileIdentity, sameFile, type FileIdentity } from './identity';

export type InputFile =
  | { role: 'spec'; /** Absolute path as the run reads it. */ path: string }
  | { role: 'file'; /** An input that is not part of a spec (the CSV that `new` reads). */ path: string }
  | { role: 'data'; path: string; /** The data statement's name, path as written and place in the spec. */ name: string; written: string; range?: Range };

/** Where the engine reads a data path from: relative paths against the spec's folder (as engine/run/datasets.ts). */
export function dataFilePath(written: string, specDir: string): string {
  return isAbsolute(written) ? written : resolve(specDir, written);
}

/**
 * The inputs of a spec: the spec file and every data statement of its plan
 * (`data` in plan order), each resolved as the engine resolves it.
 */
export function declaredInputs(specPath: string, data: readonly (Pick<DataSource, 'name' | 'path'> & { range?: Range })[], specDir = dirname(specPath)): InputFile[] {
  return [
    { role: 'spec', path: specPath },
    ...data.map((d): InputFile => ({ role: 'data', path: dataFilePath(d.path, specDir), name: d.name, written: d.path, range: d.range })),
  ];
}

export interface OutputTarget {
  /** Absolute path of the file (or folder) to write. */
  path: string;
  /** What writes it, for messages: `--json`, `a chart of --report`, `the export`. */
  what: string;
}

export type Clash =
  | { kind: 'input'; output: OutputTarget; input: InputFile; /** The two paths are spelled differently (a link or another route). */ alias: boolean }
  | { kind: 'same_target'; output: OutputTarget; first: OutputTarget };

/** Checks outputs against the inputs it was made with, and against every output it accepted before. */
export class OutputGuard {
  private readonly inputs: { input: InputFile; id: FileIdentity }[];
  private readonly accepted: { output: OutputTarget; id: FileIdentity }[] = [];

  constructor(inputs: readonly InputFile[]) {
    this.inputs = inputs.map((input) => ({ input, id: fileIdentity(input.path) }));
  }

  /** The clashes of `targets` (none: they are accepted and later targets are checked against them too). */
  check(targets: readonly OutputTarget[]): Clash[] {
    const clashes: Clash[] = [];
    const fresh: { output: OutputTarget; id: FileIdentity }[] = [];
    for (const output of targets) {
      const id = fileIdentity(output.path);
      for (const i of this.inputs) {
        if (sameFile(id, i.id)) clashes.push({ kind: 'input', output, input: i.input, alias: resolve(output.path) !== resolve(i.input.path) });
      }
      const earlier = [...this.accepted, ...fresh].find((a) => sameFile(id, a.id));
      if (earlier) clashes.push({ kind: 'same_target', output, first: earlier.output });
      fresh.push({ output, id });
    }
    if (clashes.length === 0) this.accepted.push(...fresh);
    return clashes;
  }
}

/** The message of a clash; `display` turns absolute paths into the form the user reads. */
export function clashMessage(c: Clash, display: (path: string) => string): string {
  if (c.kind === 'same_target') return outputText.sameTarget(display(c.output.path), c.first.what, c.output.what);
  const input = c.input.role === 'data' ? outputText.inputName({ role: 'data', name: c.input.name, path: c.input.written }) : outputText.inputName({ role: c.input.role, path: display(c.input.path) });
  return outputText.isInput(display(c.output.path), c.output.what, input, c.alias);
}
