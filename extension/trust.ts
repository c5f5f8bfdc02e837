/**
 * Workspace Trust. In Restricted Mode (untrusted folder) the editing support
 * stays on: highlighting, diagnostics (parser checks and CSV header checks,
 * which only read a file's first line), completion, hover, outline, quick
 * fixes. Fitting is off: a fit reads whole data files and runs evaluator
 * code generated from the spec, so it needs a trusted workspace.
 * package.json declares this as `capabilities.untrustedWorkspaces: limited`.
 */
import * as vscode from 'vscode';

export const UNTRUSTED_MESSAGE =
  'Leastwise does not fit in Restricted Mode: a fit reads the data files and runs evaluator code generated from the spec. ' +
  'Trust this workspace to fit; editing support keeps working without trust.';

/** True when the workspace is trusted; otherwise explains why `action` is off and offers the trust editor. */
export async function requireTrust(action: 'fit' | 'export' | 'fit on save'): Promise<boolean> {
  if (vscode.workspace.isTrusted) return true;
  if (action === 'fit on save') return false; // silent: the setting itself is restricted
  const pick = await vscode.window.showWarningMessage(UNTRUSTED_MESSAGE, 'Manage Workspace Trust');
  if (pick) void vscode.commands.executeCommand('workbench.trust.manage');
  return false;
}
