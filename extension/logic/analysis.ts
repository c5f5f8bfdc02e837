/**
 * The editor's view of one spec: the parser's syntax tree, plan and
 * diagnostics plus what is known about each data file (found or not, its
 * header). Built in two steps so file reading stays outside this module:
 *   1. `parse(text)` and `dataRequests(ast)` name the files to look at;
 *   2. the caller reads the headers (see extension/state/headers.ts) and
 *      `completeAnalysis` runs the checker with them.
 */
import { check, parse, type SpecAst } from '../../parser';
import { isLinearInParameters } from '../../engine/compile';
import type { Diagnostic, Plan } from '../../parser/plan';
import { spanOf, type Span } from './text';

/** One `data` statement's file, as the editor sees it. */
export interface DataFileStatus {
  name: string;
  /** Path as written in the spec. */
  path: string;
  /**
   * `found` (header read), `missing` (no such file), `unreadable` (exists but
   * cannot be read - a folder, a named pipe - or has no header), `unknown`
   * (not read: a non-file document, a path with no folder to resolve
   * against, a file outside the workspace folders or a header wider than
   * the editor reads; see logic/data-files.ts).
   */
  state: 'found' | 'missing' | 'unreadable' | 'unknown';
  headers?: string[];
  /** Why the file is `unreadable`, or why an `unknown` file was not read (shown as a diagnostic). */
  reason?: string;
  /** Span of the quoted path in the spec, for diagnostics. */
  pathSpan?: Span;
  /** Group labels (distinct values) of the columns asked for in `HeaderRequest.labelColumns`, when the file was small enough to read whole (engine/data/labels.ts). */
  labels?: Record<string, string[]>;
}

/** What the editor needs to read for one data statement. */
export interface HeaderRequest {
  name: string;
  path: string;
  delimiter?: ',' | ';' | '\t';
  decimal?: '.' | ',';
  pathSpan?: Span;
  /** The `per` columns of the fits on this data, whose labels the checker and completion use (`FIT."GROUP"`). */
  labelColumns?: string[];
}

export interface EditorAnalysis {
  text: string;
  ast: SpecAst;
  plan: Plan;
  /** Parser and checker diagnostics. */
  diagnostics: Diagnostic[];
  data: DataFileStatus[];
}

/** The data files a parsed spec names, with the delimiter/decimal options written next to them. */
export function dataRequests(ast: SpecAst): HeaderRequest[] {
  const out: HeaderRequest[] = [];
  for (const st of ast.statements) {
    if (st.kind !== 'data' || !st.name || !st.path) continue;
    const req: HeaderRequest = { name: st.name.name, path: st.path.value, pathSpan: spanOf(st.path.range) };
    for (const opt of st.options) {
      if (opt.kind === 'delimiter' && opt.value) {
        const v = opt.value.value === '\\t' || opt.value.value === 'tab' ? '\t' : opt.value.value;
        if (v === ',' || v === ';' || v === '\t') req.delimiter = v;
      } else if (opt.kind === 'decimal' && opt.value) {
        const v = opt.value.value;
        if (v === '.' || v === ',') req.decimal = v;
      }
    }
    out.push(req);
  }
  // the `per` column of each fit on a data statement: its labels are read with the header
  for (const st of ast.statements) {
    if (st.kind !== 'fit' || !st.data) continue;
    const req = out.find((r) => r.name === st.data!.name);
    for (const item of st.items) {
      if (item.kind !== 'per' || !item.column || !req) continue;
      req.labelColumns = [...new Set([...(req.labelColumns ?? []), item.column.name])];
    }
  }
  return out;
}

/** Runs the checker with the headers found, e.g. `completeAnalysis(text, parse(text), statuses)`. */
export function completeAnalysis(
  text: string,
  parsed: { ast: SpecAst; diagnostics: Diagnostic[] },
  data: DataFileStatus[],
): EditorAnalysis {
  const headers = (dataName: string): string[] | undefined => data.find((d) => d.name === dataName && d.state === 'found')?.headers;
  // group labels from the same reading as completion's (`groupLabelsOf`)
  const groupLabels = (dataName: string, _path: string, column: string): string[] | undefined => data.find((d) => d.name === dataName && d.state === 'found')?.labels?.[column];
  const checked = check(parsed.ast, { headers, isLinearIn: isLinearInParameters, groupLabels });
  return { text, ast: parsed.ast, plan: checked.plan, diagnostics: [...parsed.diagnostics, ...checked.diagnostics], data };
}

/** Analysis without reading any file (headers unknown: unresolved names are taken as columns). */
export function analyzeOffline(text: string): EditorAnalysis {
  const parsed = parse(text);
  const data: DataFileStatus[] = dataRequests(parsed.ast).map((r) => ({ name: r.name, path: r.path, state: 'unknown', pathSpan: r.pathSpan }));
  return completeAnalysis(text, parsed, data);
}

/** Columns of the data source `dataName`, when its header was read. */
export function columnsOf(analysis: EditorAnalysis, dataName: string): string[] | undefined {
  return analysis.data.find((d) => d.name === dataName && d.state === 'found')?.headers;
}

/** Group labels of column `column` of data source `dataName`, when they were read (the checker's `groupLabels` reads the same). */
export function groupLabelsOf(analysis: EditorAnalysis, dataName: string, column: string): string[] | undefined {
  return analysis.data.find((d) => d.name === dataName && d.state === 'found')?.labels?.[column];
}
