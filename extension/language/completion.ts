/** Completion provider: logic/completion.ts items mapped to vscode.CompletionItem. */
import * as vscode from 'vscode';
import { SELECTOR, type LwContext } from '../context';
import { completionsAt, type CompletionKind, type LsqCompletion } from '../logic/completion';

const KIND: Record<CompletionKind, vscode.CompletionItemKind> = {
  keyword: vscode.CompletionItemKind.Keyword,
  function: vscode.CompletionItemKind.Function,
  parameter: vscode.CompletionItemKind.Variable,
  column: vscode.CompletionItemKind.Field,
  constant: vscode.CompletionItemKind.Constant,
  data: vscode.CompletionItemKind.Module,
  fit: vscode.CompletionItemKind.Class,
  statistic: vscode.CompletionItemKind.Property,
  value: vscode.CompletionItemKind.EnumMember,
  file: vscode.CompletionItemKind.File,
};

export function toCompletionItem(c: LsqCompletion): vscode.CompletionItem {
  const item = new vscode.CompletionItem(c.label, KIND[c.kind]);
  if (c.detail) item.detail = c.detail;
  if (c.sortText) item.sortText = c.sortText;
  if (c.documentation) item.documentation = new vscode.MarkdownString(c.documentation);
  if (c.snippet) item.insertText = new vscode.SnippetString(c.snippet);
  else if (c.insertText) item.insertText = c.insertText;
  return item;
}

/** CSV files near the spec, as paths relative to its folder (for `data x = "`); none for a spec outside the workspace folders. */
async function csvFilesNear(doc: vscode.TextDocument): Promise<string[]> {
  if (doc.uri.scheme === 'untitled' || !vscode.workspace.getWorkspaceFolder(doc.uri)) return [];
  const dir = vscode.Uri.joinPath(doc.uri, '..');
  const out: string[] = [];
  const walk = async (uri: vscode.Uri, prefix: string, depth: number): Promise<void> => {
    let entries: [string, vscode.FileType][] = [];
    try {
      entries = await vscode.workspace.fs.readDirectory(uri);
    } catch {
      return;
    }
    for (const [name, type] of entries) {
      if (type & vscode.FileType.Directory) {
        // linked folders may lead out of the workspace: not listed
        if (depth > 0 && !(type & vscode.FileType.SymbolicLink) && !name.startsWith('.') && name !== 'node_modules') await walk(vscode.Uri.joinPath(uri, name), `${prefix}${name}/`, depth - 1);
      } else if (/\.(csv|tsv|txt)$/i.test(name)) out.push(`${prefix}${name}`);
      if (out.length >= 200) return;
    }
  };
  await walk(dir, '', 2);
  return out;
}

export function registerCompletion(ctx: LwContext): void {
  ctx.ext.subscriptions.push(vscode.languages.registerCompletionItemProvider(SELECTOR, {
    async provideCompletionItems(doc, pos) {
      const analysis = await ctx.analyses.get(doc);
      const offset = doc.offsetAt(pos);
      const inPath = /^\s*data\s+\w+\s*=\s*"[^"]*$/.test(doc.lineAt(pos.line).text.slice(0, pos.character));
      const items = completionsAt(analysis, offset, { csvFiles: inPath ? await csvFilesNear(doc) : [] });
      return items.map(toCompletionItem);
    },
  }, '.', '"'));
}
