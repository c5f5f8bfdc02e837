/**
 * Quick fixes: the `fixes` of a published finding (logic/fixes.ts: "did you
 * mean", a start moved inside its bounds or the bound widened) as code
 * actions. Matched to the published findings by range, code and message
 * (diagnostics come back from the editor as copies); an edit whose text has
 * changed since the analysis is not offered.
 */
import * as vscode from 'vscode';
import { SELECTOR, type LwContext } from '../context';
import { published } from './diagnostics';
import { lineIndex, toRange } from './convert';

export function registerQuickFixes(ctx: LwContext): void {
  ctx.ext.subscriptions.push(vscode.languages.registerCodeActionsProvider(SELECTOR, {
    provideCodeActions(doc, _range, context) {
      const mine = published.get(doc.uri.toString());
      if (!mine) return [];
      const idx = lineIndex(mine.analysis, mine.analysis.text);
      const actions: vscode.CodeAction[] = [];
      for (const diag of context.diagnostics) {
        const found = mine.items.find((m) => m.vs.range.isEqual(diag.range) && m.vs.message === diag.message && String(m.vs.code) === String(diag.code));
        for (const fix of found?.lsq.fixes ?? []) {
          const edits = fix.edits.map((e) => ({ range: toRange(idx, e), e }));
          if (edits.some(({ range, e }) => doc.getText(range) !== e.oldText)) continue; // the text moved on since the analysis
          const action = new vscode.CodeAction(fix.title, vscode.CodeActionKind.QuickFix);
          action.diagnostics = [diag];
          action.edit = new vscode.WorkspaceEdit();
          for (const { range, e } of edits) action.edit.replace(doc.uri, range, e.newText);
          action.isPreferred = fix.preferred === true;
          actions.push(action);
        }
      }
      return actions;
    },
  }, { providedCodeActionKinds: [vscode.CodeActionKind.QuickFix] }));
}
