/** Hover provider: logic/hover.ts Markdown, with the spec's last run for estimates. */
import * as vscode from 'vscode';
import { SELECTOR, type LwContext } from '../context';
import { hoverAt } from '../logic/hover';
import { lineIndex, toRange } from './convert';

export function registerHover(ctx: LwContext): void {
  ctx.ext.subscriptions.push(vscode.languages.registerHoverProvider(SELECTOR, {
    async provideHover(doc, pos) {
      const analysis = await ctx.analyses.get(doc);
      const h = hoverAt(analysis, doc.offsetAt(pos), ctx.runs.get(doc.uri)?.run);
      if (!h) return undefined;
      return new vscode.Hover(new vscode.MarkdownString(h.markdown), toRange(lineIndex(analysis, analysis.text), h.span));
    },
  }));
}
