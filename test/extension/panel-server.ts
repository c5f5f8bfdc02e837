/**
 * Serves the results page (a built panel.js + panel.css, written into the
 * page) from a local http server inside the same HTML shell and CSP as the
 * webview (panel/html.ts),
 * standing in for VS Code: `acquireVsCodeApi` records posted messages and
 * saved state, and the theme's `--vscode-*` variables and body class are set
 * the way the workbench sets them. CSP violations are collected in-page.
 * Used by the panel tests (panel-harness.ts) and benchmark 10; no esbuild
 * here, so the bundled benchmark script carries it.
 */
import { readFileSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import { join } from 'node:path';
import { makeNonce, panelHtml } from '../../extension/panel/html';

export type ThemeName = 'light' | 'dark' | 'high-contrast';

/** A subset of the variables VS Code puts on the webview's <html> (values of the default themes). */
export const THEMES: Record<ThemeName, { bodyClass: string; vars: Record<string, string> }> = {
  light: {
    bodyClass: 'vscode-light',
    vars: {
      'font-family': '"DejaVu Sans", "Liberation Sans", sans-serif', 'font-size': '13px', 'editor-font-family': '"DejaVu Sans Mono", monospace',
      foreground: '#3b3b3b', 'editor-background': '#ffffff', 'editor-foreground': '#3b3b3b', descriptionForeground: '#717171',
      'panel-border': '#e5e5e5', 'button-background': '#005fb8', 'button-foreground': '#ffffff', 'button-secondaryBackground': '#e5e5e5',
      'button-secondaryForeground': '#3b3b3b', 'list-hoverBackground': '#f2f2f2', 'list-activeSelectionBackground': '#e8e8e8',
      'list-activeSelectionForeground': '#000000', focusBorder: '#005fb8', errorForeground: '#f85149', 'editorWarning-foreground': '#bf8803',
      'testing-iconPassed': '#388a34', 'editorHoverWidget-background': '#f8f8f8', 'editorHoverWidget-border': '#c8c8c8',
      'charts-blue': '#1a85ff', 'charts-orange': '#d18616', 'charts-red': '#e51400', 'charts-green': '#388a34', 'charts-yellow': '#bf8803', 'charts-purple': '#652d90',
    },
  },
  dark: {
    bodyClass: 'vscode-dark',
    vars: {
      'font-family': '"DejaVu Sans", "Liberation Sans", sans-serif', 'font-size': '13px', 'editor-font-family': '"DejaVu Sans Mono", monospace',
      foreground: '#cccccc', 'editor-background': '#1f1f1f', 'editor-foreground': '#cccccc', descriptionForeground: '#9d9d9d',
      'panel-border': '#2b2b2b', 'button-background': '#0078d4', 'button-foreground': '#ffffff', 'button-secondaryBackground': '#313131',
      'button-secondaryForeground': '#cccccc', 'list-hoverBackground': '#2a2d2e', 'list-activeSelectionBackground': '#04395e',
      'list-activeSelectionForeground': '#ffffff', focusBorder: '#0078d4', errorForeground: '#f85149', 'editorWarning-foreground': '#cca700',
      'testing-iconPassed': '#73c991', 'editorHoverWidget-background': '#202020', 'editorHoverWidget-border': '#454545',
      'charts-blue': '#3794ff', 'charts-orange': '#d18616', 'charts-red': '#f14c4c', 'charts-green': '#89d185', 'charts-yellow': '#cca700', 'charts-purple': '#b180d7',
    },
  },
  'high-contrast': {
    bodyClass: 'vscode-high-contrast',
    vars: {
      'font-family': '"DejaVu Sans", "Liberation Sans", sans-serif', 'font-size': '13px', 'editor-font-family': '"DejaVu Sans Mono", monospace',
      foreground: '#ffffff', 'editor-background': '#000000', 'editor-foreground': '#ffffff', descriptionForeground: '#ffffff',
      'panel-border': '#6fc3df', contrastBorder: '#6fc3df', contrastActiveBorder: '#f38518', 'button-background': '#000000', 'button-foreground': '#ffffff',
      'button-border': '#6fc3df', focusBorder: '#f38518', errorForeground: '#f48771', 'editorWarning-foreground': '#ffd370', 'testing-iconPassed': '#73c991',
      'editorHoverWidget-background': '#0c141f', 'editorHoverWidget-border': '#6fc3df',
      'charts-blue': '#3794ff', 'charts-orange': '#d18616', 'charts-red': '#f14c4c', 'charts-green': '#89d185', 'charts-yellow': '#cca700', 'charts-purple': '#b180d7',
    },
  },
};

/** Script run before panel.js: stub of the webview API, the theme, and a CSP violation log. */
function prelude(theme: ThemeName, savedState: unknown): string {
  const t = THEMES[theme];
  return `
window.__posted = []; window.__csp = []; window.__state = ${JSON.stringify(savedState ?? null)};
document.addEventListener('securitypolicyviolation', (e) => window.__csp.push(e.violatedDirective + ' ' + e.blockedURI));
window.acquireVsCodeApi = () => ({
  postMessage: (m) => window.__posted.push(m),
  getState: () => window.__state,
  setState: (s) => { window.__state = s; },
});
const vars = ${JSON.stringify(t.vars)};
for (const [k, v] of Object.entries(vars)) document.documentElement.style.setProperty('--vscode-' + k, v);
document.body.className = ${JSON.stringify(t.bodyClass)};
document.body.dataset.vscodeThemeKind = ${JSON.stringify(t.bodyClass)};
`;
}

export interface PanelServer {
  url(theme: ThemeName, savedState?: unknown): string;
  close(): Promise<void>;
}

/** Serves `/?theme=…&state=<id>` (the HTML shell) and the bundle files from `bundleDir`. */
export function servePanel(bundleDir: string): Promise<PanelServer> {
  const states = new Map<string, unknown>();
  let next = 0;
  let origin = '';
  const server: Server = createServer((req, res) => {
    const u = new URL(req.url ?? '/', origin);
    if (u.pathname === '/') {
      const theme = (u.searchParams.get('theme') ?? 'light') as ThemeName;
      const state = states.get(u.searchParams.get('state') ?? '');
      // the page's script and style written into it, as the webview gets them (html.ts)
      const html = panelHtml({ cspSource: origin, nonce: makeNonce(), script: readFileSync(join(bundleDir, 'panel.js'), 'utf8'), style: readFileSync(join(bundleDir, 'panel.css'), 'utf8'), prelude: prelude(theme, state) });
      res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' });
      res.end(html);
      return;
    }
    if (u.pathname === '/favicon.ico') {
      // browsers ask for it by themselves; a webview never shows one
      res.writeHead(204);
      res.end();
      return;
    }
    // nothing else is served: the page fetches no file of its own
    res.writeHead(404);
    res.end();
  });
  return new Promise((ok) => {
    server.listen(0, '127.0.0.1', () => {
      const addr = server.address();
      origin = `http://127.0.0.1:${typeof addr === 'object' && addr ? addr.port : 0}`;
      ok({
        url(theme, savedState) {
          const id = savedState === undefined ? '' : String(++next);
          if (id) states.set(id, savedState);
          return `${origin}/?theme=${theme}${id ? `&state=${id}` : ''}`;
        },
        close: () => new Promise<void>((done) => server.close(() => done())),
      });
    });
  });
}

/** Chromium flags of the vscode-web recipe (README), for a sandbox-less container without GPU. */
export const CHROMIUM_ARGS = [
  '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
  '--disable-background-networking', '--disable-component-update', '--disable-sync',
  '--disable-dev-shm-usage',
  '--host-resolver-rules=MAP * ~NOTFOUND, EXCLUDE localhost, EXCLUDE 127.0.0.1',
];
