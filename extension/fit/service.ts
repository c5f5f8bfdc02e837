/**
 * Fitting a spec from the editor: checks (workspace trust, saved file on
 * disk, no errors), a cancellable progress notification, the run in the
 * engine's worker (runner.ts), then the result into the run store (which
 * refreshes diagnostics, lenses, status bar and panel). One run per spec at
 * a time: a new run cancels the previous one of the same spec, whose outcome
 * is then only logged (the newer run owns the status bar and the results).
 */
import * as path from 'node:path';
import * as vscode from 'vscode';
import type { LwContext } from '../context';
import { specDiagnostics } from '../logic/diagnostics';
import { progressMessage, type FitProgress } from '../logic/progress';
import { buildPanelModel } from '../logic/panel-model';
import type { StoredRun } from '../state/runs';
import { runInWorker } from './runner';
import { requireTrust } from '../trust';

export interface FitRequest {
  /** Only these fits (by name). Default: every fit. */
  fits?: string[];
  /** Fit on save: progress in the status bar instead of a notification, and a spec with errors noted there, not in a pop-up. */
  quiet?: boolean;
}

const running = new Map<string, vscode.CancellationTokenSource>();

export function specName(uri: vscode.Uri): string {
  return path.posix.basename(uri.path);
}

export async function fitDocument(ctx: LwContext, doc: vscode.TextDocument, req: FitRequest = {}): Promise<StoredRun | undefined> {
  if (!(await requireTrust('fit'))) return undefined;
  const name = specName(doc.uri);
  if (doc.uri.scheme !== 'file') {
    void vscode.window.showWarningMessage(`Leastwise: save ${name} to a folder on disk first; data paths are relative to the spec's folder.`);
    return undefined;
  }
  const analysis = await ctx.analyses.get(doc);
  const errors = specDiagnostics(analysis).filter((d) => d.severity === 'error');
  if (errors.length) {
    const first = errors[0];
    const line = analysis.text.slice(0, first.start).split(/\r\n|\r|\n/).length;
    const text = `Leastwise: ${name} has ${errors.length} error${errors.length > 1 ? 's' : ''}; fix ${errors.length > 1 ? 'them' : 'it'} before fitting (line ${line}: ${first.message}).`;
    if (req.quiet) {
      // fit on save: the editor may save while the user is still typing (auto save), and the errors are
      // already underlined and in Problems, so no pop-up each time; a status bar note and the log say it
      ctx.log.info(text);
      vscode.window.setStatusBarMessage(`$(error) ${name}: not fitted on save, ${errors.length} error${errors.length > 1 ? 's' : ''} (line ${line})`, 8000);
      return undefined;
    }
    const pick = await vscode.window.showErrorMessage(text, 'Show Problems');
    if (pick) void vscode.commands.executeCommand('workbench.actions.view.problems');
    return undefined;
  }
  const unknown = (req.fits ?? []).filter((f) => !analysis.plan.fits.some((p) => p.name === f));
  if (unknown.length) {
    void vscode.window.showErrorMessage(`Leastwise: no fit named ${unknown.join(', ')} in ${name}.`);
    return undefined;
  }
  if (!analysis.plan.fits.length) {
    void vscode.window.showInformationMessage(`Leastwise: ${name} has no fit statement yet.`);
    return undefined;
  }

  const key = doc.uri.toString();
  running.get(key)?.cancel();
  const source = new vscode.CancellationTokenSource();
  running.set(key, source);
  ctx.runs.notify(doc.uri, 'running', req.fits ? `fit ${req.fits.join(', ')}` : 'all fits');
  const started = Date.now();
  const job = {
    plan: analysis.plan,
    options: { baseDir: path.dirname(doc.uri.fsPath), specText: analysis.text, specPath: doc.uri.fsPath, ...(req.fits ? { fits: req.fits } : {}) },
  };
  const workerPath = ctx.ext.asAbsolutePath(path.join('dist', 'worker.js'));
  const title = `Leastwise: fitting ${req.fits?.length === 1 ? `${req.fits[0]} in ` : ''}${name}`;
  try {
    const outcome = await vscode.window.withProgress(
      { location: req.quiet ? vscode.ProgressLocation.Window : vscode.ProgressLocation.Notification, title, cancellable: !req.quiet },
      (progress, token) => {
        const sub = token.onCancellationRequested(() => source.cancel());
        let last = 0;
        const state: FitProgress = { done: 0, total: 0 };
        return runInWorker(workerPath, {
          ...job,
          onProgress: (done, total) => {
            const pct = total > 0 ? (100 * done) / total : 0;
            state.done = done;
            state.total = total;
            state.iteration = undefined; // a finished unit: its iterations are over
            progress.report({ message: progressMessage(state), increment: Math.max(0, pct - last) });
            last = pct;
          },
          onIteration: (iteration) => {
            state.iteration = iteration;
            progress.report({ message: progressMessage(state) });
          },
        }, source.token).finally(() => sub.dispose());
      },
    );
    if (running.get(key) !== source) {
      // A newer fit of this spec replaced this one (it cancelled this run): its state is the one to show.
      ctx.log.info(`fit of ${doc.uri.fsPath} replaced by a newer fit after ${Date.now() - started} ms (${outcome.kind})`);
      return undefined;
    }
    if (outcome.kind === 'cancelled') {
      ctx.runs.notify(doc.uri, 'cancelled', 'cancelled');
      ctx.log.info(`fit of ${doc.uri.fsPath} cancelled after ${Date.now() - started} ms (${outcome.how === 'stopped' ? 'the solver stopped' : 'the worker was terminated'})`);
      return undefined;
    }
    if (outcome.kind === 'crashed') {
      ctx.runs.notify(doc.uri, 'failed', outcome.message);
      ctx.log.error(`fit of ${doc.uri.fsPath} failed: ${outcome.message}`);
      void vscode.window.showErrorMessage(`Leastwise: the fit of ${name} could not run: ${outcome.message}`);
      return undefined;
    }
    const model = buildPanelModel(outcome.result, { specUri: key, specName: name, declaredFits: analysis.plan.fits.map((f) => f.name) });
    const stored: StoredRun = { specUri: doc.uri, run: outcome.result, model, fits: req.fits ?? 'all', finishedAt: new Date() };
    ctx.log.info(`fitted ${doc.uri.fsPath} (${req.fits?.join(', ') ?? 'all fits'}) in ${Date.now() - started} ms`);
    ctx.runs.set(stored);
    return ctx.runs.get(doc.uri);
  } finally {
    if (running.get(key) === source) running.delete(key);
    source.dispose();
  }
}

/** Cancels every run (deactivation). */
export function cancelAllFits(): void {
  for (const s of running.values()) s.cancel();
  running.clear();
}
