/**
 * The extension's commands, as one table `CommandId → handler`. Titles and
 * the "Leastwise" category live in package.json (`contributes.commands`).
 * Handlers accept the arguments VS Code passes from menus and code lenses
 * (a document uri, a fit name) and fall back to the active editor.
 */
import * as vscode from 'vscode';
import { isSpec, specDocument, type LwContext } from './context';
import { exportReport } from './export/report';
import { fitDocument } from './fit/service';
import { enclosingFit } from './logic/declarations';
import { newSpecFromCsv } from './new-spec';
import { panelActions } from './panel/actions';
import { ResultsPanel, VIEW_TYPE } from './panel/panel';
import { isPageState, EXPORT_FORMATS, type ExportFormat } from './logic/panel-protocol';
import { requireTrust } from './trust';

export type CommandId =
  | 'leastwise.fitFile'
  | 'leastwise.fitAtCursor'
  | 'leastwise.showResults'
  | 'leastwise.exportReport'
  | 'leastwise.newSpecFromCsv';

type Handler = (ctx: LwContext, ...args: unknown[]) => Promise<unknown>;

const NO_SPEC = 'Leastwise: open a .lsq spec first (or pick one in the Explorer).';

async function fitAndShow(ctx: LwContext, doc: vscode.TextDocument, fits?: string[]): Promise<boolean> {
  const stored = await fitDocument(ctx, doc, { fits });
  if (!stored) return false;
  ResultsPanel.createOrShow(ctx, actions(ctx), stored.model, fits?.[0], true);
  return true;
}

function actions(ctx: LwContext) {
  return panelActions(ctx, async (spec) => {
    await fitAndShow(ctx, await vscode.workspace.openTextDocument(spec));
  });
}

export const COMMANDS: Record<CommandId, Handler> = {
  async 'leastwise.fitFile'(ctx, uri) {
    const doc = await specDocument(uri);
    if (!doc) return void vscode.window.showInformationMessage(NO_SPEC);
    return fitAndShow(ctx, doc);
  },

  async 'leastwise.fitAtCursor'(ctx, uri, fitName) {
    const doc = await specDocument(uri);
    if (!doc) return void vscode.window.showInformationMessage(NO_SPEC);
    let fit = typeof fitName === 'string' ? fitName : undefined;
    if (!fit) {
      const editor = vscode.window.activeTextEditor;
      const analysis = await ctx.analyses.get(doc);
      const offset = editor && editor.document === doc ? doc.offsetAt(editor.selection.active) : 0;
      fit = enclosingFit(analysis, offset) ?? nearestFitAbove(analysis.plan.fits.map((f) => ({ name: f.name, start: f.range.start.offset })), offset);
    }
    if (!fit) return void vscode.window.showInformationMessage('Leastwise: place the cursor inside a fit { … } block.');
    return fitAndShow(ctx, doc, [fit]);
  },

  async 'leastwise.showResults'(ctx, uri, fitName) {
    const doc = uri ? await specDocument(uri) : undefined;
    const active = vscode.window.activeTextEditor?.document;
    const specUri = doc?.uri ?? (isSpec(active) ? active.uri : undefined) ?? ctx.runs.last;
    const stored = specUri ? ctx.runs.get(specUri) : undefined;
    if (!stored) {
      const open = specUri ? ResultsPanel.forSpec(specUri) : ResultsPanel.current;
      if (open) return void open.panel.reveal();
      const name = specUri ? specUri.path.split('/').pop() : 'this spec';
      const pick = specUri && vscode.workspace.isTrusted ? await vscode.window.showInformationMessage(`Leastwise: no results for ${name} yet.`, 'Fit Now') : undefined;
      if (pick && specUri) await COMMANDS['leastwise.fitFile'](ctx, specUri);
      else if (!specUri) void vscode.window.showInformationMessage(NO_SPEC);
      return;
    }
    ResultsPanel.createOrShow(ctx, actions(ctx), stored.model, typeof fitName === 'string' ? fitName : undefined);
  },

  async 'leastwise.exportReport'(ctx, uri, format) {
    if (!(await requireTrust('export'))) return;
    const doc = uri ? await specDocument(uri) : undefined;
    const active = vscode.window.activeTextEditor?.document;
    const specUri = doc?.uri ?? (isSpec(active) ? active.uri : undefined) ?? ResultsPanel.current?.specUri ?? ctx.runs.last;
    if (!specUri) return void vscode.window.showInformationMessage(NO_SPEC);
    const fmt = (EXPORT_FORMATS as readonly unknown[]).includes(format) ? (format as ExportFormat) : undefined;
    return exportReport(ctx, specUri, fmt);
  },

  async 'leastwise.newSpecFromCsv'(ctx, uri) {
    return newSpecFromCsv(ctx, uri);
  },
};

function nearestFitAbove(fits: { name: string; start: number }[], offset: number): string | undefined {
  return fits.filter((f) => f.start <= offset).sort((a, b) => b.start - a.start)[0]?.name;
}

export function registerCommands(ctx: LwContext): void {
  for (const [id, handler] of Object.entries(COMMANDS) as [CommandId, Handler][]) {
    ctx.ext.subscriptions.push(vscode.commands.registerCommand(id, (...args: unknown[]) =>
      handler(ctx, ...args).catch((e: unknown) => {
        ctx.log.error(`${id} failed: ${e instanceof Error ? e.stack ?? e.message : String(e)}`);
        void vscode.window.showErrorMessage(`Leastwise: ${id.replace('leastwise.', '')} failed: ${e instanceof Error ? e.message : String(e)}`);
      })));
  }
}

/** Restores the results panel after a reload (the page brings back its own state). */
export function registerPanelSerializer(ctx: LwContext): void {
  ctx.ext.subscriptions.push(vscode.window.registerWebviewPanelSerializer(VIEW_TYPE, {
    async deserializeWebviewPanel(panel, state) {
      ResultsPanel.revive(ctx, actions(ctx), panel, isPageState(state) ? state : undefined);
    },
  }));
}

/** `leastwise.fitOnSave`: fit a spec when it is saved (trusted workspaces only). */
export function registerFitOnSave(ctx: LwContext): void {
  ctx.ext.subscriptions.push(vscode.workspace.onDidSaveTextDocument(async (doc) => {
    if (!isSpec(doc) || !vscode.workspace.getConfiguration('leastwise', doc.uri).get<boolean>('fitOnSave', false)) return;
    if (!(await requireTrust('fit on save'))) return;
    const stored = await fitDocument(ctx, doc, { quiet: true });
    if (stored) ResultsPanel.forSpec(doc.uri)?.show(stored.model);
  }));
}

/** Keeps an open results panel informed while its spec is being fitted. */
export function registerPanelSync(ctx: LwContext): void {
  ctx.ext.subscriptions.push(ctx.runs.onDidChange(({ uri, state, message }) => {
    const p = ResultsPanel.forSpec(uri);
    if (!p) return;
    const specName = uri.path.split('/').pop() ?? 'spec';
    if (state === 'running') p.post({ type: 'busy', specName, text: message ?? '' });
    else if (state === 'failed') p.post({ type: 'failed', specName, message: message ?? 'the fit could not run' });
    else if (state === 'cancelled') p.post({ type: 'failed', specName, message: 'fit cancelled; the results shown are from the previous run' });
  }));
}
