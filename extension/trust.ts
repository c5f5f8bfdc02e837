/**
 * Workspace Trust. In Restricted Mode (untrusted folder) the editing support
 * stays on: highlighting, diagnostics (parser checks and CSV header checks,
 * which read only the header of data files inside the workspace folders, see
 * logic/data-files.ts), completion, hover, outline, quick fixes. Fitting,
 * exporting and "New Spec from CSV" are off: a fit reads whole data files and
 * runs evaluator code generated from the spec, an export writes files, and a
 * new spec reads a whole data file and writes a spec, so they need a trusted
 * workspace. package.json declares this as
 * `capabilities.untrustedWorkspaces: limited`.
 */
import * as vscode from 'vscode';

/** What Restricted Mode refuses, with the reason its message gives. */
const REFUSED = {
  fit: { verb: 'fit', reason: 'a fit reads the data files and runs evaluator code generated from the spec' },
  export: { verb: 'export', reason: 'a fit reads the data files and runs evaluator code generated from the spec' },
  newSpec: { verb: 'create specs from CSV files', reason: 'that reads a whole data file and writes a new spec next to it' },
} as const;

export type TrustedAction = keyof typeof REFUSED;

/** The refusal shown when `action` is asked for in Restricted Mode. */
export function untrustedMessage(action: TrustedAction): string {
  const { verb, reason } = REFUSED[action];
  return `Leastwise does not ${verb} in Restricted Mode: ${reason}. Trust this workspace to ${verb}; editing support keeps working without trust.`;
}

/** True when the workspace is trusted; otherwise explains why `action` is off and offers the trust editor. */
export async function requireTrust(action: TrustedAction | 'fit on save'): Promise<boolean> {
  if (vscode.workspace.isTrusted) return true;
  if (action === 'fit on save') return false; // silent: the setting itself is restricted
  const pick = await vscode.window.showWarningMessage(untrustedMessage(action), 'Manage Workspace Trust');
  if (pick) void vscode.commands.executeCommand('workbench.trust.manage');
  return false;
}
