/**
 * Leastwise for VS Code: the `.lsq` language (highlighting, diagnostics,
 * completion, hover, navigation, quick fixes), fitting in a worker, and the
 * results panel. `activate` builds the shared context and registers each part.
 */
import type * as vscode from 'vscode';
import { createContext } from './context';
import { registerCommands, registerFitOnSave, registerPanelSerializer, registerPanelSync } from './commands';
import { cancelAllFits } from './fit/service';
import { registerCompletion } from './language/completion';
import { registerDiagnostics } from './language/diagnostics';
import { registerHover } from './language/hover';
import { registerNavigation } from './language/navigation';
import { registerQuickFixes } from './language/quickfix';
import { registerSemanticTokens } from './language/semantic';
import { registerStatusBar } from './status-bar';

export function activate(context: vscode.ExtensionContext): void {
  const ctx = createContext(context);
  registerDiagnostics(ctx);
  registerSemanticTokens(ctx);
  registerCompletion(ctx);
  registerHover(ctx);
  registerNavigation(ctx);
  registerQuickFixes(ctx);
  registerCommands(ctx);
  registerPanelSerializer(ctx);
  registerPanelSync(ctx);
  registerFitOnSave(ctx);
  registerStatusBar(ctx);
  ctx.log.info('Leastwise activated');
}

export function deactivate(): void {
  cancelAllFits();
}
