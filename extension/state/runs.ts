/**
 * The last run of each spec in this session: the RunResult (for hovers,
 * diagnostics, exports, chart requests) and the panel model built from it.
 * Memory only; the results panel keeps its own copy of the model in its
 * webview state so it survives a reload.
 */
import * as vscode from 'vscode';
import type { RunResult } from '../../engine/result';
import { buildPanelModel, type PanelModel } from '../logic/panel-model';

export interface StoredRun {
  specUri: vscode.Uri;
  run: RunResult;
  model: PanelModel;
  /** Names of the fits this run covered (all fits, or the one at the cursor). */
  fits: string[] | 'all';
  finishedAt: Date;
}

export type RunState = 'idle' | 'running' | 'done' | 'failed' | 'cancelled';

export class RunStore implements vscode.Disposable {
  private readonly runs = new Map<string, StoredRun>();
  private readonly emitter = new vscode.EventEmitter<{ uri: vscode.Uri; state: RunState; message?: string }>();
  /** Fires when a run starts, ends, fails or is cancelled. */
  readonly onDidChange = this.emitter.event;
  /** The most recent run's spec (status bar, "Show results" without an editor). */
  last: vscode.Uri | undefined;

  get(uri: vscode.Uri): StoredRun | undefined {
    return this.runs.get(uri.toString());
  }

  set(stored: StoredRun): void {
    const prev = this.runs.get(stored.specUri.toString());
    // a run of one fit keeps the other fits' last results
    if (prev && stored.fits !== 'all') stored = mergeRuns(prev, stored);
    this.runs.set(stored.specUri.toString(), stored);
    this.last = stored.specUri;
    this.emitter.fire({ uri: stored.specUri, state: 'done' });
  }

  notify(uri: vscode.Uri, state: Exclude<RunState, 'done'>, message?: string): void {
    this.last = uri;
    this.emitter.fire({ uri, state, message });
  }

  delete(uri: vscode.Uri): void {
    this.runs.delete(uri.toString());
  }

  dispose(): void {
    this.emitter.dispose();
  }
}

/**
 * `next` (some fits) laid over `prev`: fits of other names keep their previous
 * results, in the previous order; the model is rebuilt from the merged run.
 */
function mergeRuns(prev: StoredRun, next: StoredRun): StoredRun {
  const names = new Set(next.fits === 'all' ? [] : next.fits);
  const fits = [...prev.run.fits.filter((f) => !names.has(f.name)), ...next.run.fits];
  const order = [...new Set([...prev.run.fits, ...next.run.fits].map((f) => f.name))];
  fits.sort((a, b) => order.indexOf(a.name) - order.indexOf(b.name));
  // a fit of another name that failed before keeps its error (so it stays listed as failed, with the reason)
  const errors = [...prev.run.errors.filter((e) => e.fit !== undefined && !names.has(e.fit)), ...next.run.errors];
  const run: RunResult = { ...next.run, fits, errors };
  const model = buildPanelModel(run, { specUri: next.model.specUri, specName: next.model.specName, declaredFits: next.model.declaredFits });
  return { ...next, run, model, fits: prev.fits };
}
