/**
 * The results panel (one per window): `createOrShow` opens or reveals it,
 * `revive` re-attaches it after a reload (WebviewPanelSerializer; the page
 * restores its own saved state), `dispose` closes it. Messages are typed
 * both ways (protocol.ts) and checked with guards on arrival. The webview
 * may load files only from dist/ (localResourceRoots) under a strict CSP
 * (html.ts).
 */
import * as vscode from 'vscode';
import type { LwContext } from '../context';
import { panelHtml, makeNonce } from './html';
import { chartsForKey, type PanelModel } from '../logic/panel-model';
import { isFromPage, isPageState, type FromPage, type ToPage } from '../logic/panel-protocol';

export const VIEW_TYPE = 'leastwise.results';

/** What the panel asks of the rest of the extension (kept out of this class to avoid import cycles). */
export interface PanelActions {
  openRow(specUri: vscode.Uri, fit: string, group: string | undefined, row: number): Promise<void>;
  reveal(specUri: vscode.Uri, fit: string, param?: string): Promise<void>;
  refit(specUri: vscode.Uri): Promise<void>;
  exportReport(specUri: vscode.Uri, format: 'markdown' | 'json' | 'svg'): Promise<void>;
}

export class ResultsPanel {
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

  /** Opens the panel (or reveals it) and shows `model`, focusing fit key `focus`. */
  static createOrShow(ctx: LwContext, actions: PanelActions, model?: PanelModel, focus?: string, preserveFocus = false): ResultsPanel {
    let p = ResultsPanel.instance;
    if (p) p.panel.reveal(undefined, preserveFocus);
    else {
      const panel = vscode.window.createWebviewPanel(VIEW_TYPE, 'Leastwise Results', { viewColumn: vscode.ViewColumn.Beside, preserveFocus }, ResultsPanel.options(ctx));
      p = new ResultsPanel(ctx, actions, panel);
    }
    if (model) p.show(model, focus);
    return p;
  }

  /** Re-attaches a panel restored by VS Code after a reload. */
  static revive(ctx: LwContext, actions: PanelActions, panel: vscode.WebviewPanel, state: unknown): ResultsPanel {
    ResultsPanel.instance?.dispose();
    panel.webview.options = ResultsPanel.options(ctx);
    const p = new ResultsPanel(ctx, actions, panel);
    if (isPageState(state) && state.model) p.specUri = vscode.Uri.parse(state.model.specUri);
    return p;
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
    const dist = vscode.Uri.joinPath(ctx.ext.extensionUri, 'dist');
    panel.iconPath = vscode.Uri.joinPath(ctx.ext.extensionUri, 'extension', 'media', 'icon.png');
    panel.webview.html = panelHtml({
      cspSource: panel.webview.cspSource,
      nonce: makeNonce(),
      scriptUri: panel.webview.asWebviewUri(vscode.Uri.joinPath(dist, 'panel.js')).toString(),
      styleUri: panel.webview.asWebviewUri(vscode.Uri.joinPath(dist, 'panel.css')).toString(),
    });
    this.disposables.push(
      panel.onDidDispose(() => this.dispose()),
      // a hidden webview is torn down (no retained context): queue until its page says `ready` again
      panel.onDidChangeViewState((e) => {
        if (!e.webviewPanel.visible) this.ready = false;
      }),
      panel.webview.onDidReceiveMessage((msg: unknown) => {
        if (isFromPage(msg)) void this.handle(msg).catch((e) => ctx.log.error(`panel message ${msg.type}: ${String(e)}`));
        else ctx.log.warn(`panel sent an unknown message: ${JSON.stringify(msg)?.slice(0, 200)}`);
      }),
    );
  }

  show(model: PanelModel, focus?: string): void {
    this.specUri = vscode.Uri.parse(model.specUri);
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
    }
  }

  private disposed = false;

  dispose(): void {
    if (this.disposed) return;
    this.disposed = true;
    if (ResultsPanel.instance === this) ResultsPanel.instance = undefined;
    for (const d of this.disposables.splice(0)) d.dispose();
    this.panel.dispose();
  }
}
