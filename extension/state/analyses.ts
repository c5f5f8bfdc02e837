/**
 * Analyses of open specs, kept per document version. A text change schedules
 * a new analysis after `DEBOUNCE_MS` (250 ms) of quiet; providers that need
 * one now (completion, hover…) call `get`, which reuses the cached analysis
 * when the version matches. Listeners (diagnostics, status bar) hear
 * `onDidAnalyze`.
 */
import * as vscode from 'vscode';
import { parse } from '../../parser';
import { completeAnalysis, dataRequests, type EditorAnalysis } from '../logic/analysis';
import { HeaderReader } from './headers';

/** Quiet time after the last keystroke before re-analysing. */
export const DEBOUNCE_MS = 250;

export class AnalysisStore implements vscode.Disposable {
  private readonly cache = new Map<string, { version: number; analysis: EditorAnalysis }>();
  private readonly pending = new Map<string, Promise<EditorAnalysis>>();
  private readonly timers = new Map<string, NodeJS.Timeout>();
  private readonly emitter = new vscode.EventEmitter<{ uri: vscode.Uri; analysis: EditorAnalysis }>();
  readonly headers = new HeaderReader();
  readonly onDidAnalyze = this.emitter.event;

  constructor(private readonly log: vscode.LogOutputChannel) {}

  /** The analysis of the document's current version (cached, or computed now). */
  get(doc: vscode.TextDocument): Promise<EditorAnalysis> {
    const key = doc.uri.toString();
    const hit = this.cache.get(key);
    if (hit && hit.version === doc.version) return Promise.resolve(hit.analysis);
    const tag = `${key}@${doc.version}`;
    const running = this.pending.get(tag);
    if (running) return running;
    const p = this.compute(doc).finally(() => this.pending.delete(tag));
    this.pending.set(tag, p);
    return p;
  }

  /** Last analysis, whatever its version. */
  peek(uri: vscode.Uri): EditorAnalysis | undefined {
    return this.cache.get(uri.toString())?.analysis;
  }

  /** Re-analyse after the debounce delay (0 = soon). */
  schedule(doc: vscode.TextDocument, delay = DEBOUNCE_MS): void {
    const key = doc.uri.toString();
    clearTimeout(this.timers.get(key));
    this.timers.set(key, setTimeout(() => {
      this.timers.delete(key);
      this.get(doc).catch((e) => this.log.error(`analysis of ${doc.uri.fsPath} failed: ${String(e)}`));
    }, delay));
  }

  /** Drop everything about a closed document. */
  forget(uri: vscode.Uri): void {
    const key = uri.toString();
    clearTimeout(this.timers.get(key));
    this.timers.delete(key);
    this.cache.delete(key);
  }

  /** A data file changed: forget its header and re-analyse open specs. */
  dataChanged(uri?: vscode.Uri): void {
    this.headers.clear(uri);
    for (const doc of vscode.workspace.textDocuments) {
      if (doc.languageId === 'lsq') {
        this.cache.delete(doc.uri.toString());
        this.schedule(doc, 0);
      }
    }
  }

  private async compute(doc: vscode.TextDocument): Promise<EditorAnalysis> {
    const version = doc.version;
    const text = doc.getText();
    const parsed = parse(text);
    const data = await Promise.all(dataRequests(parsed.ast).map((r) => this.headers.status(doc.uri, r)));
    const analysis = completeAnalysis(text, parsed, data);
    const key = doc.uri.toString();
    const cur = this.cache.get(key);
    if (!cur || cur.version <= version) {
      this.cache.set(key, { version, analysis });
      this.emitter.fire({ uri: doc.uri, analysis });
    }
    return analysis;
  }

  dispose(): void {
    this.headers.dispose();
    for (const t of this.timers.values()) clearTimeout(t);
    this.timers.clear();
    this.emitter.dispose();
  }
}
