/**
 * The results panels, one per spec (several side by side): `createOrShow`
 * opens or reveals the panel of the model's spec,
 * `revive` re-attaches it after a reload (WebviewPanelSerializer; the page
 * restores its own saved state), `dispose` closes it. Messages are typed
 * both ways (protocol.ts) and checked with guards on arrival. The page's
 * script and style are written into its HTML under a strict CSP (html.ts);
 * the webview may load files only from dist/ (localResourceRoots).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import * as vscode from 'vscode';
import type { LwContext } from '../context';
import { panelHtml, makeNonce } from './html';
import { chartsForKey, type PanelModel } from '../logic/panel-model';
import { isFromPage, isPageState, type FromPage, type ToPage } from '../logic/panel-protocol';

export const VIEW_TYPE = 'leastwise.results';

let page: { script: string; style: string } | undefined;
/** dist/panel.js and dist/panel.css, read once: written into each panel's page (html.ts says why). */
function pageFiles(ctx: LwContext): { script: string; style: string } {
  page ??= {
    script: readFileSync(ctx.ext.asAbsolutePath(join('dist', 'panel.js')), 'utf8'),
    style: readFileSync(ctx.ext.asAbsolutePath(join('dist', 'panel.css')), 'utf8'),
  };
  return page;
}

/** What the panel asks of the rest of the extension (kept out of this class to avoid import cycles). */
export interface PanelActions {
  openRow(specUri: vscode.Uri, fit: string, group: string | undefined, row: number): Promise<void>;
  reveal(specUri: vscode.Uri, fit: string, param?: string): Promise<void>;
  refit(specUri: vscode.Uri): Promise<void>;
  exportReport(specUri: vscode.Uri, format: 'markdown' | 'json' | 'svg'): Promise<void>;
  /** Save a chart image the page drew (save dialog, the export guard). */
  saveChart(specUri: vscode.Uri, format: 'png' | 'svg', name: string, data: string): Promise<void>;
}

export class ResultsPanel {
  /** Open panels by spec uri (a restored panel whose state held no model is kept under '' until it shows one). */
  private static readonly panels = new Map<string, ResultsPanel>();
  /** The panel last shown or focused. */
  private static instance: ResultsPanel | undefined;
  private readonly disposables: vscode.Disposable[] = [];
  private ready = false;
  private queue: ToPage[] = [];
  /** The last `show`, re-sent when a page (re)loads with nothing queued. */
  private latest: ToPage | undefined;
  /** Spec whose results are shown. */
  specUri: vscode.Uri | undefined;

  static get current(): ResultsPanel | undefined {
    return ResultsPanel.instance;
  }

  /** The open panel of the spec `uri`, if any. */
  static forSpec(uri: vscode.Uri): ResultsPanel | undefined {
    return ResultsPanel.panels.get(uri.toString());
  }

  /** Every open panel. */
  static all(): ResultsPanel[] {
    return [...new Set(ResultsPanel.panels.values())];
  }

  /** Opens the panel of `model`'s spec (or reveals it) and shows `model`, focusing fit key `focus`; without a model, the current panel. */
  static createOrShow(ctx: LwContext, actions: PanelActions, model?: PanelModel, focus?: string, preserveFocus = false): ResultsPanel {
    let p = model ? ResultsPanel.panels.get(model.specUri) : ResultsPanel.instance;
    if (p) p.panel.reveal(p.panel.viewColumn, preserveFocus);
    else {
      // beside the other specs' panels when some are open, else beside the editor
      const columns = ResultsPanel.all().map((x) => x.panel.viewColumn ?? 0).filter((c) => c > 0);
      const viewColumn = columns.length ? Math.max(...columns) + 1 : vscode.ViewColumn.Beside;
      const panel = vscode.window.createWebviewPanel(VIEW_TYPE, 'Leastwise Results', { viewColumn, preserveFocus }, ResultsPanel.options(ctx));
      p = new ResultsPanel(ctx, actions, panel);
    }
    if (model) p.show(model, focus);
    return p;
  }

  /** Re-attaches a panel restored by VS Code after a reload. */
  static revive(ctx: LwContext, actions: PanelActions, panel: vscode.WebviewPanel, state: unknown): ResultsPanel {
    panel.webview.options = ResultsPanel.options(ctx);
    const spec = isPageState(state) && state.model ? state.model.specUri : '';
    // a second restored panel of one spec (should not happen) replaces the first
    ResultsPanel.panels.get(spec)?.dispose();
    const p = new ResultsPanel(ctx, actions, panel);
    if (spec) {
      p.specUri = vscode.Uri.parse(spec);
      panel.title = `Results: ${state && isPageState(state) && state.model ? state.model.specName : ''}`;
    }
    p.register(spec);
    return p;
  }

  private register(key: string): void {
    for (const [k, v] of ResultsPanel.panels) if (v === this && k !== key) ResultsPanel.panels.delete(k);
    ResultsPanel.panels.set(key, this);
  }

  private static options(ctx: LwContext): vscode.WebviewPanelOptions & vscode.WebviewOptions {
    return {
      enableScripts: true,
      retainContextWhenHidden: false,
      enableFindWidget: true,
      localResourceRoots: [vscode.Uri.joinPath(ctx.ext.extensionUri, 'dist')],
    };
  }

  private constructor(private readonly ctx: LwContext, private readonly actions: PanelActions, readonly panel: vscode.WebviewPanel) {
    ResultsPanel.instance = this;
    panel.iconPath = vscode.Uri.joinPath(ctx.ext.extensionUri, 'extension', 'media', 'icon.png');
    panel.webview.html = panelHtml({ cspSource: panel.webview.cspSource, nonce: makeNonce(), ...pageFiles(ctx) });
    this.disposables.push(
      panel.onDidDispose(() => this.dispose()),
      // a hidden webview is torn down (no retained context): queue until its page says `ready` again
      panel.onDidChangeViewState((e) => {
        if (!e.webviewPanel.visible) this.ready = false;
        if (e.webviewPanel.active) ResultsPanel.instance = this;
      }),
      panel.webview.onDidReceiveMessage((msg: unknown) => {
        if (isFromPage(msg)) void this.handle(msg).catch((e) => ctx.log.error(`panel message ${msg.type}: ${String(e)}`));
        else ctx.log.warn(`panel sent an unknown message: ${JSON.stringify(msg)?.slice(0, 200)}`);
      }),
    );
  }

  show(model: PanelModel, focus?: string): void {
    this.specUri = vscode.Uri.parse(model.specUri);
    this.register(model.specUri);
    ResultsPanel.instance = this;
    this.latest = { type: 'show', model, focus };
    this.panel.title = `Results: ${model.specName}`;
    this.post({ type: 'show', model, focus });
  }

  post(msg: ToPage): void {
    if (!this.ready) {
      // keep only the latest 'show' and what came after it
      if (msg.type === 'show') this.queue = [];
      this.queue.push(msg);
      return;
    }
    void this.panel.webview.postMessage(msg);
  }

  private async handle(msg: FromPage): Promise<void> {
    const spec = this.specUri;
    switch (msg.type) {
      case 'ready': {
        this.ready = true;
        const queued = this.queue.splice(0);
        if (!queued.some((m) => m.type === 'show') && this.latest) queued.unshift(this.latest);
        for (const m of queued) void this.panel.webview.postMessage(m);
        return;
      }
      case 'log':
        if (msg.level === 'error') this.ctx.log.error(`[panel] ${msg.message}`);
        else this.ctx.log.info(`[panel] ${msg.message}`);
        return;
      case 'copy':
        await vscode.env.clipboard.writeText(msg.text);
        void vscode.window.setStatusBarMessage(`Leastwise: copied ${msg.what} (${msg.text.split('\n').length - 2} rows, tab-separated)`, 5000);
        this.ctx.log.info(`copied ${msg.what} to the clipboard (${msg.text.length} characters)`);
        return;
      case 'requestCharts': {
        const run = spec ? this.ctx.runs.get(spec)?.run : undefined;
        this.post({ type: 'charts', key: msg.key, charts: run ? chartsForKey(run, msg.key) : null });
        return;
      }
    }
    if (!spec) return;
    switch (msg.type) {
      case 'openRow':
        return this.actions.openRow(spec, msg.fit, msg.group, msg.row);
      case 'reveal':
        return this.actions.reveal(spec, msg.fit, msg.param);
      case 'refit':
        return this.actions.refit(spec);
      case 'export':
        return this.actions.exportReport(spec, msg.format);
      case 'saveChart':
        return this.actions.saveChart(spec, msg.format, msg.name, msg.data);
    }
  }

  private disposed = false;

  dispose(): void {
    if (this.disposed) return;
    this.disposed = true;
    if (ResultsPanel.instance === this) ResultsPanel.instance = undefined;
    for (const [k, v] of ResultsPanel.panels) if (v === this) ResultsPanel.panels.delete(k);
    for (const d of this.disposables.splice(0)) d.dispose();
    this.panel.dispose();
  }
}
