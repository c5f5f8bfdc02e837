/**
 * The results panel's HTML shell with its Content Security Policy. Shared by
 * the extension (webview) and the browser test (served over local http with
 * the very same policy), so the test checks what users get.
 *
 * Policy: nothing by default; scripts only with this page's nonce (no
 * 'unsafe-inline', no 'unsafe-eval': charts use vega-interpreter); styles
 * with the nonce or from the extension's dist/ (`cspSource`), images from
 * dist/; `data:` images for exported PNGs. No network origins.
 *
 * The page's script and style sheet (dist/panel.js, dist/panel.css) are
 * written into the page, not linked: in VS Code for the Web a webview's own
 * files are fetched through the webview's service worker, and after a window
 * reload with several panels side by side that worker sometimes does not yet
 * answer, so the requests went to the network (net::ERR_NAME_NOT_RESOLVED for
 * *.vscode-resource.vscode-cdn.net in the end-to-end test) and the page could
 * stay empty. Written into the page, nothing is fetched.
 */

export interface PanelHtmlOptions {
  /** Origin(s) allowed for styles/images: `webview.cspSource` in VS Code. */
  cspSource: string;
  nonce: string;
  /** Text of dist/panel.js and dist/panel.css, written into the page. */
  script: string;
  style: string;
  /** Inline script run before panel.js (tests stub `acquireVsCodeApi` here); gets the nonce. */
  prelude?: string;
}

export function contentSecurityPolicy(cspSource: string, nonce: string): string {
  return [
    "default-src 'none'",
    `img-src ${cspSource} data:`,
    `style-src ${cspSource} 'nonce-${nonce}'`,
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
<style nonce="${attr(o.nonce)}">${o.style.replace(/<\/style/gi, '<\\/style')}</style>
</head>
<body>
<div id="app" aria-live="polite"></div>
${o.prelude ? `<script nonce="${attr(o.nonce)}">${inlineScript(o.prelude)}</script>\n` : ''}<script nonce="${attr(o.nonce)}">${inlineScript(o.script)}</script>
</body>
</html>
`;
}

/**
 * Script text safe inside `<script>…</script>`: `</script` would end the element early, so it is written `<\/script`
 * (the same characters to JavaScript inside a string or a regular expression, the only places it can stand).
 * `<!--` followed by `<script` would put the HTML parser in its double-escaped state; the page test checks that the
 * bundle holds neither (test/extension/panel-html.test.ts).
 */
export function inlineScript(text: string): string {
  return text.replace(/<\/script/gi, '<\\/script');
}

/** 32 random alphanumerics (crypto-strength) for the CSP nonce. */
export function makeNonce(): string {
  const chars = 'ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789';
  const bytes = new Uint8Array(32);
  globalThis.crypto.getRandomValues(bytes);
  return Array.from(bytes, (b) => chars[b % chars.length]).join('');
}
