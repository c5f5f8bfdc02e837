/**
 * Reading and checking a spec file for the commands: text, paths, the
 * data-aware parser check (CSV headers read from disk) and located output.
 */
import { dirname, resolve } from 'node:path';
import { analyze } from '../../../parser/index';
import { isLinearInParameters } from '../../compile';
import type { Diagnostic, Plan } from '../../../parser/plan';
import { labelLookup, readHeader, type HeaderOptions } from '../../data/index';
import { dataFilePath, inputStatus, readInputSync, type InputError } from '../../io/index';
import type { CliIo } from './io';
import { diagnosticLine, displayPath, located, sortDiagnostics } from './located-lines';
import { MSG } from './messages';

export interface LoadedSpec {
  /** Absolute path. */
  path: string;
  /** Path as shown in messages. */
  display: string;
  /** Folder that data paths in the spec are relative to. */
  dir: string;
  text: string;
}

export interface CheckedSpec extends LoadedSpec {
  plan: Plan;
  diagnostics: Diagnostic[];
  errors: number;
  warnings: number;
}

/** Read a spec; on failure the located error line. */
export function readSpec(arg: string, io: CliIo): { ok: true; spec: LoadedSpec } | { ok: false; line: string } {
  const path = resolve(io.cwd, arg);
  const display = displayPath(path, io.cwd);
  try {
    // regular files only (engine/io): a named pipe or a device never blocks the read
    const text = readInputSync(path).toString('utf8');
    return { ok: true, spec: { path, display, dir: dirname(path), text } };
  } catch (e) {
    return { ok: false, line: located(display, undefined, undefined, 'error', MSG.cannotRead((e as InputError).message)) };
  }
}

/**
 * Column names of each data file the spec names, read from the file's header
 * (relative to the spec's folder). Unreadable files give `undefined`, so the
 * parser falls back to taking unknown names as columns and the run reports the
 * missing file with its location.
 */
export function headerReader(specDir: string): ((dataName: string, path: string, options?: HeaderOptions) => string[] | undefined) & { tooLong: Map<string, string> } {
  const cache = new Map<string, string[] | undefined>();
  /** Data paths (as written) whose header is longer than the cap, with the message. */
  const tooLong = new Map<string, string>();
  const read = (_name: string, path: string, options: HeaderOptions = {}) => {
    const abs = resolve(specDir, path);
    const key = `${options.delimiter ?? ''}\u0000${options.decimal ?? ''}\u0000${abs}`;
    if (!cache.has(key)) {
      const r = readHeader(abs, { ...options, displayPath: path });
      if (!r.ok && r.reason === 'too_long') tooLong.set(path, r.message);
      cache.set(key, r.ok ? r.info.headers : undefined);
    }
    return cache.get(key);
  };
  return Object.assign(read, { tooLong });
}

/**
 * Errors for data files the spec names that do not exist or are not regular
 * files (a folder, a named pipe, a device), at their `data` statements.
 */
export function missingDataDiagnostics(plan: Plan, specDir: string): Diagnostic[] {
  const out: Diagnostic[] = [];
  for (const d of plan.data) {
    const status = inputStatus(dataFilePath(d.path, specDir));
    if (status.ok) continue;
    const missing = status.error.code === 'ENOENT';
    out.push({
      severity: 'error',
      code: missing ? 'data_file_missing' : 'data_file_unreadable',
      message: missing ? MSG.dataMissing(d.path) : MSG.dataUnreadable(d.path, status.error.message),
      range: d.range,
    });
  }
  return out;
}

export function checkSpec(spec: LoadedSpec): CheckedSpec {
  const headers = headerReader(spec.dir);
  // group labels for `unknown_group` (engine/data/labels.ts): the distinct values of each `per` column
  const { plan, diagnostics } = analyze(spec.text, { headers, isLinearIn: isLinearInParameters, groupLabels: labelLookup(spec.dir) });
  const longHeaders: Diagnostic[] = plan.data.flatMap((d) => {
    const message = headers.tooLong.get(d.path);
    return message ? [{ severity: 'warning' as const, code: 'header_too_long', message, range: d.range }] : [];
  });
  const sorted = sortDiagnostics([...diagnostics, ...missingDataDiagnostics(plan, spec.dir), ...longHeaders]);
  return {
    ...spec,
    plan,
    diagnostics: sorted,
    errors: sorted.filter((d) => d.severity === 'error').length,
    warnings: sorted.filter((d) => d.severity === 'warning').length,
  };
}

/** Diagnostic lines of a checked spec, each ending with a newline. */
export function diagnosticText(spec: CheckedSpec, only?: (d: Diagnostic) => boolean): string {
  return spec.diagnostics.filter(only ?? (() => true)).map((d) => diagnosticLine(spec.display, d) + '\n').join('');
}
