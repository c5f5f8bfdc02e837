/**
 * Results panel page script (bundled to dist/panel.js, runs inside the
 * webview). Receives `ToPage` messages, keeps its state with
 * `vscode.setState` so the panel comes back after a reload, and reports
 * clicks (`FromPage`). See protocol.ts for the messages and view/ for drawing.
 */
import './page.css';
import { isPageState, isToPage, type FromPage, type PageState } from '../../logic/panel-protocol';
import { render, type AppState, type ChartChoice } from './app';

interface VsCodeApi {
  postMessage(msg: unknown): void;
  getState(): unknown;
  setState(state: unknown): void;
}
declare function acquireVsCodeApi(): VsCodeApi;

const vscode = acquireVsCodeApi();
const root = document.getElementById('app') ?? document.body;
const saved = vscode.getState();
const state: AppState = isPageState(saved) ? { model: saved.model, selected: saved.selected, residualKind: saved.residualKind ?? {}, xScale: saved.xScale ?? {} } : { residualKind: {}, xScale: {} };

function post(msg: FromPage): void {
  vscode.postMessage(msg);
}

function save(): void {
  const s: PageState = { model: state.model, selected: state.selected, residualKind: state.residualKind, xScale: state.xScale };
  vscode.setState(s);
}

const host = {
  post,
  select(key: string): void {
    state.selected = key;
    save();
    draw();
  },
  choose(key: string, choice: ChartChoice): void {
    if (choice.residual) state.residualKind = { ...state.residualKind, [key]: choice.residual };
    if (choice.xScale) state.xScale = { ...state.xScale, [key]: choice.xScale };
    save();
    draw();
  },
};

function draw(): void {
  try {
    render(root, state, host);
  } catch (e) {
    post({ type: 'log', level: 'error', message: `render failed: ${e instanceof Error ? e.stack ?? e.message : String(e)}` });
  }
}

window.addEventListener('message', (event: MessageEvent) => {
  const msg: unknown = event.data;
  if (!isToPage(msg)) return;
  switch (msg.type) {
    case 'show':
      state.model = msg.model;
      state.selected = msg.focus ?? state.selected;
      state.banner = undefined;
      save();
      draw();
      break;
    case 'busy':
      state.banner = { kind: 'busy', text: `Fitting ${msg.specName}… ${msg.text}` };
      draw();
      break;
    case 'failed':
      state.banner = { kind: 'failed', text: `${msg.specName}: ${msg.message}` };
      draw();
      break;
    case 'charts': {
      const f = state.model?.fits.find((x) => x.key === msg.key);
      if (f) {
        f.charts = msg.charts ?? [];
        if (!msg.charts) state.banner = { kind: 'failed', text: 'These charts are no longer in memory: run the fit again to see them.' };
        save();
        draw();
      }
      break;
    }
  }
});

// Redraw the charts in the new colours when VS Code switches the theme.
new MutationObserver(() => draw()).observe(document.body, { attributes: true, attributeFilter: ['class'] });
window.addEventListener('error', (e) => post({ type: 'log', level: 'error', message: `page error: ${e.message}` }));

draw();
post({ type: 'ready' });
