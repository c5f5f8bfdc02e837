/**
 * Publishes diagnostics: on every analysis (debounced typing, data file
 * changes) and after every run, `specDiagnostics` (logic/diagnostics.ts)
 * gives the plain findings, mapped here to vscode.Diagnostic. Removed when
 * the document closes. The last LsqDiagnostics per document are kept for the
 * quick-fix provider (their `fixes`, with the analysis they were made on).
 */
import * as vscode from 'vscode';
import type { LwContext } from '../context';
import { isSpec } from '../context';
import { specDiagnostics, type LsqDiagnostic, type LsqSeverity } from '../logic/diagnostics';
import type { EditorAnalysis } from '../logic/analysis';
import { lineIndex, toRange } from './convert';

const SEVERITY: Record<LsqSeverity, vscode.DiagnosticSeverity> = {
  error: vscode.DiagnosticSeverity.Error,
  warning: vscode.DiagnosticSeverity.Warning,
  info: vscode.DiagnosticSeverity.Information,
  hint: vscode.DiagnosticSeverity.Hint,
};
const SOURCE: Record<LsqDiagnostic['source'], string> = { syntax: 'leastwise', data: 'leastwise (data)', fit: 'leastwise (fit)' };

/** Last findings per document uri, with their vscode twins and the analysis they were made on (for quick fixes). */
export const published = new Map<string, { analysis: EditorAnalysis; items: { lsq: LsqDiagnostic; vs: vscode.Diagnostic }[] }>();

export function toVscodeDiagnostic(analysis: EditorAnalysis, d: LsqDiagnostic): vscode.Diagnostic {
  const idx = lineIndex(analysis, analysis.text);
  const range = toRange(idx, d);
  // a zero-width range at a line end would be invisible: widen to the previous character
  const shown = range.isEmpty && range.start.character > 0 ? new vscode.Range(range.start.translate(0, -1), range.end) : range;
  const vs = new vscode.Diagnostic(shown, d.message, SEVERITY[d.severity]);
  vs.source = SOURCE[d.source];
  vs.code = d.code;
  return vs;
}

export function registerDiagnostics(ctx: LwContext): vscode.DiagnosticCollection {
  const collection = vscode.languages.createDiagnosticCollection('leastwise');
  const publish = (uri: vscode.Uri, analysis: EditorAnalysis): void => {
    const run = ctx.runs.get(uri)?.run;
    const items = specDiagnostics(analysis, run).map((lsq) => ({ lsq, vs: toVscodeDiagnostic(analysis, lsq) }));
    published.set(uri.toString(), { analysis, items });
    collection.set(uri, items.map((i) => i.vs));
  };
  const analyseSoon = (doc: vscode.TextDocument, delay?: number): void => {
    if (isSpec(doc)) ctx.analyses.schedule(doc, delay);
  };
  ctx.ext.subscriptions.push(
    collection,
    ctx.analyses.onDidAnalyze(({ uri, analysis }) => {
      if (vscode.workspace.textDocuments.some((d) => d.uri.toString() === uri.toString())) publish(uri, analysis);
    }),
    ctx.runs.onDidChange(({ uri, state }) => {
      if (state !== 'done') return;
      const a = ctx.analyses.peek(uri);
      if (a) publish(uri, a);
    }),
    vscode.workspace.onDidOpenTextDocument((doc) => analyseSoon(doc, 0)),
    vscode.workspace.onDidChangeTextDocument((e) => analyseSoon(e.document)),
    vscode.workspace.onDidCloseTextDocument((doc) => {
      if (!isSpec(doc)) return;
      collection.delete(doc.uri);
      published.delete(doc.uri.toString());
      ctx.analyses.forget(doc.uri);
    }),
  );
  const watcher = vscode.workspace.createFileSystemWatcher('**/*.{csv,tsv,txt}');
  ctx.ext.subscriptions.push(
    watcher,
    watcher.onDidChange((u) => ctx.analyses.dataChanged(u)),
    watcher.onDidCreate((u) => ctx.analyses.dataChanged(u)),
    watcher.onDidDelete((u) => ctx.analyses.dataChanged(u)),
  );
  for (const doc of vscode.workspace.textDocuments) analyseSoon(doc, 0);
  return collection;
}
