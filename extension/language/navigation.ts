/**
 * Navigation providers: go to definition (parameters, constants, data, fits;
 * a column name opens its CSV at the header), document symbols (outline) and
 * code lenses above each fit ("Fit", and "Show results" once it has run).
 */
import * as vscode from 'vscode';
import { SELECTOR, type LwContext } from '../context';
import { definitionAt, documentSymbols, fitLenses, type LsqSymbol, type SymbolKind } from '../logic/symbols';
import { resolveDataUri } from '../state/headers';
import { lineIndex, toRange } from './convert';
import type { LineIndex } from '../../parser/source';

const SYMBOL_KIND: Record<SymbolKind, vscode.SymbolKind> = {
  data: vscode.SymbolKind.File,
  constant: vscode.SymbolKind.Constant,
  fit: vscode.SymbolKind.Function,
  parameter: vscode.SymbolKind.Variable,
  query: vscode.SymbolKind.Event,
  expectation: vscode.SymbolKind.Boolean,
};

function toSymbol(idx: LineIndex, s: LsqSymbol): vscode.DocumentSymbol {
  const sym = new vscode.DocumentSymbol(s.name || '?', s.detail, SYMBOL_KIND[s.kind], toRange(idx, s.span), toRange(idx, s.nameSpan));
  sym.children = s.children.map((c) => toSymbol(idx, c));
  return sym;
}

export function registerNavigation(ctx: LwContext): void {
  const lensChanged = new vscode.EventEmitter<void>();
  ctx.ext.subscriptions.push(
    lensChanged,
    ctx.runs.onDidChange(() => lensChanged.fire()),
    vscode.languages.registerDefinitionProvider(SELECTOR, {
      async provideDefinition(doc, pos) {
        const analysis = await ctx.analyses.get(doc);
        const d = definitionAt(analysis, doc.offsetAt(pos));
        if (!d) return undefined;
        if (d.kind === 'spec') return new vscode.Location(doc.uri, toRange(lineIndex(analysis, analysis.text), d.span));
        const csv = resolveDataUri(doc.uri, d.path);
        if (!csv) return undefined;
        // the column's position in the header line, read under the editor's rules (inside the
        // workspace, regular files, capped, asynchronous: logic/data-files.ts)
        const head = await ctx.analyses.headers.headerLine(doc.uri, d.path);
        if (head === undefined) return undefined;
        const col = Math.max(0, head.indexOf(d.column));
        return new vscode.Location(csv, new vscode.Range(0, col, 0, col + d.column.length));
      },
    }),
    vscode.languages.registerDocumentSymbolProvider(SELECTOR, {
      async provideDocumentSymbols(doc) {
        const analysis = await ctx.analyses.get(doc);
        const idx = lineIndex(analysis, analysis.text);
        return documentSymbols(analysis).map((s) => toSymbol(idx, s));
      },
    }),
    vscode.languages.registerCodeLensProvider(SELECTOR, {
      onDidChangeCodeLenses: lensChanged.event,
      async provideCodeLenses(doc) {
        const analysis = await ctx.analyses.get(doc);
        const idx = lineIndex(analysis, analysis.text);
        const run = ctx.runs.get(doc.uri)?.run;
        return fitLenses(analysis).flatMap(({ fit, span }) => {
          const at = toRange(idx, { start: span.start, end: span.start });
          const lenses = [new vscode.CodeLens(at, { title: '$(play) Fit', tooltip: `Fit ${fit}`, command: 'leastwise.fitAtCursor', arguments: [doc.uri, fit] })];
          if (run?.fits.some((f) => f.name === fit)) {
            lenses.push(new vscode.CodeLens(at, { title: 'Show results', tooltip: `Show the results of ${fit}`, command: 'leastwise.showResults', arguments: [doc.uri, fit] }));
          }
          return lenses;
        });
      },
    }),
  );
}
