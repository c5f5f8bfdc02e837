/**
 * What the results panel asks the editor to do: open a data file at a row,
 * show a fit or parameter declaration in the spec, fit again, export.
 */
import * as vscode from 'vscode';
import type { LwContext } from '../context';
import { exportReport, saveChartImage } from '../export/report';
import { resolveDataUri } from '../state/headers';
import { lineIndex, toRange } from '../language/convert';
import { findFitName, findParamName } from '../logic/declarations';
import type { PanelActions } from './panel';

export function panelActions(ctx: LwContext, refit: (spec: vscode.Uri) => Promise<void>): PanelActions {
  return {
    async openRow(specUri, fit, _group, row) {
      const doc = await vscode.workspace.openTextDocument(specUri);
      const analysis = await ctx.analyses.get(doc);
      const dataName = analysis.plan.fits.find((f) => f.name === fit)?.blocks[0]?.data;
      const data = analysis.plan.data.find((d) => d.name === dataName);
      const csv = data ? resolveDataUri(specUri, data.path) : undefined;
      if (!csv) {
        void vscode.window.showWarningMessage(`Leastwise: cannot find the data file of fit ${fit}.`);
        return;
      }
      const line = Math.max(0, row - 1); // row is the 1-based file line (header = 1)
      const editor = await vscode.window.showTextDocument(csv, { viewColumn: vscode.ViewColumn.One, preview: true });
      const range = editor.document.lineAt(Math.min(line, editor.document.lineCount - 1)).range;
      // the whole row selected, cursor at its start
      editor.selection = new vscode.Selection(range.end, range.start);
      editor.revealRange(range, vscode.TextEditorRevealType.InCenter);
    },
    async reveal(specUri, fit, param) {
      const doc = await vscode.workspace.openTextDocument(specUri);
      const analysis = await ctx.analyses.get(doc);
      const span = (param ? findParamName(analysis, fit, param) : undefined) ?? findFitName(analysis, fit);
      const editor = await vscode.window.showTextDocument(doc, { viewColumn: vscode.ViewColumn.One });
      if (!span) return;
      const r = toRange(lineIndex(analysis, analysis.text), span);
      editor.selection = new vscode.Selection(r.start, r.end);
      editor.revealRange(r, vscode.TextEditorRevealType.InCenterIfOutsideViewport);
    },
    refit,
    async exportReport(specUri, format) {
      await exportReport(ctx, specUri, format);
    },
    async saveChart(specUri, format, name, data) {
      await saveChartImage(ctx, specUri, format, name, data);
    },
  };
}
