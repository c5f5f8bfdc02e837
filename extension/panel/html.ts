/**
 * The results panel's HTML shell with its Content Security Policy. Shared by
 * the extension (webview) and the browser test (served over local http with
 * the very same policy), so the test checks what users get.
 *
 * Policy: nothing by default; scripts only with this page's nonce (no
 * 'unsafe-inline', no 'unsafe-eval': charts use vega-interpreter); styles and
 * images only from the extension's dist/ (`cspSource`); `data:` images for
 * exported PNGs. No network origins.
 */

export interface PanelHtmlOptions {
  /** Origin(s) allowed for styles/images: `webview.cspSource` in VS Code. */
  cspSource: string;
  nonce: string;
  /** URL of dist/panel.js and dist/panel.css. */
  scriptUri: string;
  styleUri: string;
  /** Inline script run before panel.js (tests stub `acquireVsCodeApi` here); gets the nonce. */
  prelude?: string;
}

export function contentSecurityPolicy(cspSource: string, nonce: string): string {
  return [
    "default-src 'none'",
    `img-src ${cspSource} data:`,
    `style-src ${cspSource}`,
    `font-src ${cspSource}`,
    `script-src 'nonce-${nonce}'`,
  ].join('; ');
}

export function panelHtml(o: PanelHtmlOptions): string {
  const attr = (s: string) => s.replace(/&/g, '&amp;').replace(/"/g, '&quot;').replace(/</g, '&lt;');
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta http-equiv="Content-Security-Policy" content="${attr(contentSecurityPolicy(o.cspSource, o.nonce))}">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>Leastwise results</title>
<link rel="stylesheet" href="${attr(o.styleUri)}">
</head>
<body>
<div id="app" aria-live="polite"></div>
${o.prelude ? `<script nonce="${attr(o.nonce)}">${o.prelude.replace(/<\/script/gi, '<\\/script')}</script>\n` : ''}<script nonce="${attr(o.nonce)}" src="${attr(o.scriptUri)}"></script>
</body>
</html>
`;
}

/** 32 random alphanumerics (crypto-strength) for the CSP nonce. */
export function makeNonce(): string {
  const chars = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789';
  const bytes = new Uint8Array(32);
  globalThis.crypto.getRandomValues(bytes);
  return Array.from(bytes, (b) => chars[b % chars.length]).join('');
}
