import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { contentSecurityPolicy, inlineScript, panelHtml } from '../../extension/panel/html';
import { ARTIFACTS, bundlePage } from './panel-harness';

describe('extension/panel/html', () => {
  it('writes the page script and style into the page: nothing for the page to fetch', () => {
    const html = panelHtml({ cspSource: 'https://x.example', nonce: 'N0nce', script: 'window.a = 1;', style: 'body { color: red; }' });
    expect(html).toContain('<script nonce="N0nce">window.a = 1;</script>');
    expect(html).toContain('<style nonce="N0nce">body { color: red; }</style>');
    expect(html).not.toMatch(/\b(src|href)=/);
    expect(contentSecurityPolicy('https://x.example', 'N0nce')).toContain("style-src https://x.example 'nonce-N0nce'");
  });

  it('keeps a </script inside the script from ending it early', () => {
    expect(inlineScript('const s = "</script>"; const r = /<\\/SCRIPT/;')).toBe('const s = "<\\/script>"; const r = /<\\/SCRIPT/;');
    const html = panelHtml({ cspSource: 'c', nonce: 'n', script: 'x = "</script><b>"', style: '' });
    expect(html.match(/<\/script>/g)).toHaveLength(1);
  });

  it('the bundled page holds no <!-- or <script (which would put the HTML parser in its escaped states)', async () => {
    const out = join(ARTIFACTS, 'panel-html-build');
    await bundlePage(out);
    const script = readFileSync(join(out, 'panel.js'), 'utf8');
    expect(script.length).toBeGreaterThan(10000);
    expect(script).not.toMatch(/<!--|<script/i);
    expect(readFileSync(join(out, 'panel.css'), 'utf8')).not.toMatch(/<\/style/i);
  });
});
