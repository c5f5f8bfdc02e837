/**
 * Status bar item with the state of the last fit: running, converged with or
 * without warnings, not converged / failed expectations, failed, cancelled.
 * Shown while a spec is the active editor or after a run; click = Show Results.
 */
import * as path from 'node:path';
import * as vscode from 'vscode';
import { isSpec, type LwContext } from './context';
import type { RunState } from './state/runs';

export function registerStatusBar(ctx: LwContext): vscode.StatusBarItem {
  const item = vscode.window.createStatusBarItem('leastwise.status', vscode.StatusBarAlignment.Left, 20);
  item.name = 'Leastwise fit status';
  item.command = 'leastwise.showResults';
  let state: { uri: vscode.Uri; state: RunState; message?: string } | undefined;

  const update = (): void => {
    const active = vscode.window.activeTextEditor?.document;
    if (!state) {
      if (isSpec(active)) {
        item.text = '$(graph-line) Leastwise';
        item.tooltip = 'No fit yet: run “Leastwise: Fit This File”';
        item.backgroundColor = undefined;
        item.show();
      } else item.hide();
      return;
    }
    const name = path.posix.basename(state.uri.path);
    item.backgroundColor = undefined;
    switch (state.state) {
      case 'running':
        item.text = `$(sync~spin) Leastwise: fitting ${name}`;
        item.tooltip = `Fitting ${state.message ?? ''}`;
        break;
      case 'cancelled':
        item.text = `$(circle-slash) Leastwise: cancelled`;
        item.tooltip = `The fit of ${name} was cancelled`;
        break;
      case 'failed':
        item.text = `$(error) Leastwise: fit failed`;
        item.tooltip = state.message ?? 'The fit could not run';
        item.backgroundColor = new vscode.ThemeColor('statusBarItem.errorBackground');
        break;
      default: {
        const run = ctx.runs.get(state.uri)?.run;
        if (!run) break;
        const fits = run.fits.length;
        const converged = run.fits.filter((f) => f.stop.converged).length;
        const warnings = run.fits.reduce((s, f) => s + f.warnings.filter((w) => w.code !== 'r2_nonlinear').length, 0);
        const failedExp = run.expectations.filter((e) => !e.passed).length;
        const bad = converged < fits || failedExp > 0 || run.errors.length > 0;
        item.text = `${bad ? '$(error)' : warnings ? '$(warning)' : '$(pass)'} Leastwise: ${converged}/${fits} fit${fits === 1 ? '' : 's'}${warnings ? `, ${warnings} warning${warnings === 1 ? '' : 's'}` : ''}${failedExp ? `, ${failedExp} expectation${failedExp === 1 ? '' : 's'} failed` : ''}`;
        item.tooltip = `${name}: ${converged} of ${fits} fits converged, ${warnings} warnings, ${run.expectations.length - failedExp}/${run.expectations.length} expectations passed. Click to show the results.`;
        if (bad) item.backgroundColor = new vscode.ThemeColor('statusBarItem.warningBackground');
      }
    }
    item.show();
  };
  ctx.ext.subscriptions.push(
    item,
    ctx.runs.onDidChange((e) => {
      state = e;
      update();
    }),
    vscode.window.onDidChangeActiveTextEditor(update),
  );
  update();
  return item;
}
