/**
 * Workspace Trust. In Restricted Mode (untrusted folder) the editing support
 * stays on: highlighting, diagnostics (parser checks and CSV header checks,
 * which only read a file's first line), completion, hover, outline, quick
 * fixes. Fitting is off: a fit reads whole data files and runs evaluator
 * code generated from the spec, so it needs a trusted workspace.
 * package.json declares this as `capabilities.untrustedWorkspaces: limited`.
 */
import * as vscode from 'vscode';

/** The refusal shown when `action` is asked for in Restricted Mode. */
export function untrustedMessage(action: 'fit' | 'export'): string {
  return (
    `Leastwise does not ${action} in Restricted Mode: a fit reads the data files and runs evaluator code generated from the spec. ` +
    `Trust this workspace to ${action}; editing support keeps working without trust.`
  );
}

/** True when the workspace is trusted; otherwise explains why `action` is off and offers the trust editor. */
export async function requireTrust(action: 'fit' | 'export' | 'fit on save'): Promise<boolean> {
  if (vscode.workspace.isTrusted) return true;
  if (action === 'fit on save') return false; // silent: the setting itself is restricted
  const pick = await vscode.window.showWarningMessage(untrustedMessage(action), 'Manage Workspace Trust');
  if (pick) void vscode.commands.executeCommand('workbench.trust.manage');
  return false;
}
