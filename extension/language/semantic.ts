/** Semantic tokens from the real lexer (`lexTokens`), refined by the plan (logic/semantic.ts). */
import * as vscode from 'vscode';
import { lexTokens } from '../../parser';
import { SELECTOR, type LwContext } from '../context';
import { semanticTokens, TOKEN_MODIFIERS, TOKEN_TYPES } from '../logic/semantic';
import { lineIndex } from './convert';

export const LEGEND = new vscode.SemanticTokensLegend([...TOKEN_TYPES], [...TOKEN_MODIFIERS]);

export function registerSemanticTokens(ctx: LwContext): void {
  ctx.ext.subscriptions.push(vscode.languages.registerDocumentSemanticTokensProvider(SELECTOR, {
    async provideDocumentSemanticTokens(doc) {
      const analysis = await ctx.analyses.get(doc);
      const idx = lineIndex(analysis, analysis.text);
      const builder = new vscode.SemanticTokensBuilder(LEGEND);
      for (const t of semanticTokens(analysis, lexTokens(analysis.text))) {
        const a = idx.position(t.start);
        const b = idx.position(t.end);
        // tokens never span lines except comments; split a multi-line token at its first line
        const length = a.line === b.line ? b.column - a.column : analysis.text.slice(t.start).search(/[\r\n]|$/);
        if (length <= 0) continue;
        const mods = t.modifiers.reduce((m, x) => m | (1 << TOKEN_MODIFIERS.indexOf(x)), 0);
        builder.push(a.line - 1, a.column - 1, length, TOKEN_TYPES.indexOf(t.type), mods);
      }
      return builder.build();
    },
  }, LEGEND));
}
