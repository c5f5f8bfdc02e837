/**
 * What every part of the extension shares, built once in `activate`:
 * the vscode extension context, a log channel, the analysis store (parsed
 * and checked specs), the run store (last results per spec) and the fit
 * service. Each `registerX(ctx)` takes this and pushes its disposables to
 * `ctx.ext.subscriptions`.
 */
import * as vscode from 'vscode';
import { AnalysisStore } from './state/analyses';
import { RunStore } from './state/runs';

export const LANGUAGE_ID = 'lsq';
export const SELECTOR: vscode.DocumentSelector = [{ language: LANGUAGE_ID }];

export interface LwContext {
  ext: vscode.ExtensionContext;
  log: vscode.LogOutputChannel;
  analyses: AnalysisStore;
  runs: RunStore;
}

export function createContext(ext: vscode.ExtensionContext): LwContext {
  const log = vscode.window.createOutputChannel('Leastwise', { log: true });
  const analyses = new AnalysisStore(log);
  const runs = new RunStore();
  ext.subscriptions.push(log, analyses, runs);
  return { ext, log, analyses, runs };
}

export function isSpec(doc: vscode.TextDocument | undefined): doc is vscode.TextDocument {
  return doc !== undefined && doc.languageId === LANGUAGE_ID;
}

/** The spec a command applies to: an explicit uri, else the active editor's lsq document. */
export async function specDocument(uri?: unknown): Promise<vscode.TextDocument | undefined> {
  if (uri instanceof vscode.Uri) return vscode.workspace.openTextDocument(uri);
  if (typeof uri === 'string' && uri) return vscode.workspace.openTextDocument(vscode.Uri.parse(uri));
  const doc = vscode.window.activeTextEditor?.document;
  return isSpec(doc) ? doc : undefined;
}
