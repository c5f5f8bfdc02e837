/**
 * Located messages in the one format editors and terminals understand:
 * `file:line:col: severity: message`, with paths shown relative to the
 * working directory.
 */
import { isAbsolute, relative, resolve, sep } from 'node:path';
import type { Diagnostic } from '../../../parser/plan';
import { inlineText } from '../../../parser/printable';
import type { RunError } from '../../result';

export type Severity = 'error' | 'warning' | 'info';

/** `path` as the user should read it: relative to `cwd` when inside it, forward slashes kept as typed. */
export function displayPath(path: string, cwd: string): string {
  const abs = isAbsolute(path) ? path : resolve(cwd, path);
  const rel = relative(cwd, abs);
  if (rel && !rel.startsWith('..') && !isAbsolute(rel)) return rel.split(sep).join('/');
  return abs;
}


export function located(file: string, line: number | undefined, column: number | undefined, severity: Severity, message: string): string {
  const where = line === undefined ? file : column === undefined ? `${file}:${line}` : `${file}:${line}:${column}`;
  return inlineText(`${where}: ${severity}: ${message}`);
}

/** One diagnostic line; suggestions are appended unless the message already offers them. */
export function diagnosticLine(file: string, d: Diagnostic): string {
  let message = d.message;
  if (d.suggestions?.length && !/did you mean/i.test(message)) message += ` - did you mean ${d.suggestions.map((s) => `'${s}'`).join(' or ')}?`;
  return located(file, d.range.start.line, d.range.start.column, d.severity, message);
}

/** Diagnostics in source order. */
export function sortDiagnostics(ds: readonly Diagnostic[]): Diagnostic[] {
  return [...ds].sort((a, b) => a.range.start.offset - b.range.start.offset || a.range.start.column - b.range.start.column);
}

/**
 * A run error located in the data file (line and 1-based column index when the
 * column is known), else in the spec, else at the spec as a whole.
 * `columnIndex` maps a data file and column name to its 1-based position.
 */
export function runErrorLine(
  e: RunError,
  spec: { display: string; dir: string },
  cwd: string,
  columnIndex: (absFile: string, column: string) => number | undefined,
): string {
  if (e.file && (e.row !== undefined || !e.range)) {
    const abs = isAbsolute(e.file) ? e.file : resolve(spec.dir, e.file);
    const col = e.field ?? (e.column !== undefined ? columnIndex(abs, e.column) : undefined);
    return located(displayPath(abs, cwd), e.row, e.row !== undefined ? col : undefined, 'error', withoutLocation(e.message, e.file));
  }
  if (e.range) return located(spec.display, e.range.start.line, e.range.start.column, 'error', e.message);
  return located(spec.display, undefined, undefined, 'error', e.message);
}

/** A message without a leading `file:row:` of its own (we print the location in front). */
export function withoutLocation(message: string, file: string): string {
  const name = file.split(/[\\/]/).pop() ?? file;
  for (const prefix of [file, name]) {
    const m = new RegExp(`^${prefix.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')}(:\\d+){0,2}:\\s*`).exec(message);
    if (m) return message.slice(m[0].length);
  }
  return message;
}

/** Unlocated error line (command-line problems). */
export function plainError(message: string): string {
  return inlineText(`error: ${message}`);
}
