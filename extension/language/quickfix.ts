/**
 * Quick fixes for "did you mean": a diagnostic carrying `suggestions`
 * (parser diagnostics) offers one edit per suggestion, replacing the
 * diagnostic's range. Matched to the published findings by range, code and
 * message (diagnostics come back from the editor as copies).
 */
import * as vscode from 'vscode';
import { SELECTOR, type LwContext } from '../context';
import { published } from './diagnostics';

export function registerQuickFixes(ctx: LwContext): void {
  ctx.ext.subscriptions.push(vscode.languages.registerCodeActionsProvider(SELECTOR, {
    provideCodeActions(doc, _range, context) {
      const mine = published.get(doc.uri.toString()) ?? [];
      const actions: vscode.CodeAction[] = [];
      for (const diag of context.diagnostics) {
        const found = mine.find((m) => m.vs.range.isEqual(diag.range) && m.vs.message === diag.message && String(m.vs.code) === String(diag.code));
        for (const s of found?.lsq.suggestions ?? []) {
          const current = doc.getText(diag.range);
          const replacement = current.startsWith('"') || (!/^[A-Za-z_][A-Za-z0-9_]*$/.test(s)) ? `"${s}"` : s;
          const action = new vscode.CodeAction(`Change to '${s}'`, vscode.CodeActionKind.QuickFix);
          action.diagnostics = [diag];
          action.edit = new vscode.WorkspaceEdit();
          action.edit.replace(doc.uri, diag.range, replacement);
          action.isPreferred = found?.lsq.suggestions?.[0] === s;
          actions.push(action);
        }
      }
      return actions;
    },
  }, { providedCodeActionKinds: [vscode.CodeActionKind.QuickFix] }));
}
