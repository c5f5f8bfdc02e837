/**
 * Hostile names through the views: every chart is drawn (Vega-Lite compiles
 * and Vega renders), axis titles show the names as written, the Markdown
 * report keeps its structure and its HTML (checked by rendering it with
 * markdown-it, a CommonMark implementation), and chart file names stay
 * unique per group.
 */
import { describe, expect, it } from 'vitest';
import MarkdownIt from 'markdown-it';
import { chartSpecs, chartFileName, fileStem } from '../../../engine/front/views/charts';
import { renderSvg } from '../../../engine/front/views/svg';
import { markdownReport } from '../../../engine/front/views/markdown';
import { runText } from '../../../engine/front/views/text';
import { chartLabel, escapeControls } from '../../../engine/front/views/escape';
import type { FitResult } from '../../../engine/result';
import { lineData, lineFit, runOf } from '../../fixtures/line-fit';
import { HOSTILE_COLUMNS, HOSTILE_LABELS, TERMINAL_UNSAFE } from '../../fixtures/hostile-names';
import { findAll, parseXml } from './xml';

const d = lineData(12, 3);
const fitWith = (o: { predictor?: string; response?: string; group?: string; name?: string }): FitResult =>
  lineFit({ name: o.name ?? 'cal', x: d.x, y: d.y, predictor: o.predictor ?? 'x', response: o.response ?? 'y', ...(o.group !== undefined ? { group: o.group } : {}) });

/** SVG text content as the XML parser returns it (entities resolved). */
const unescapeXml = (s: string) => s.replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&apos;/g, "'").replace(/&#(\d+);/g, (_, n) => String.fromCharCode(Number(n))).replace(/&amp;/g, '&');
// text and the lines of a wrapped title (tspan)
const texts = (svg: string) => findAll(parseXml(svg), (e) => e.name === 'text' || e.name === 'tspan').map((t) => unescapeXml(t.text));

describe('views with hostile names', () => {
  it('every chart is drawn with hostile predictor and response names, and its axis titles read as written', async () => {
    for (const name of HOSTILE_COLUMNS) {
      for (const fit of [fitWith({ predictor: name }), fitWith({ response: name })]) {
        const specs = chartSpecs(fit);
        expect(specs.length, name).toBe(5);
        // the name is label text only: never a field of the data
        expect(JSON.stringify(specs.map((s) => s.spec)).includes(`"field":${JSON.stringify(name)}`), name).toBe(false);
        // the charts whose axes carry the name (the others show only fixed axis titles: drawn in the next test)
        for (const c of specs.filter((s) => s.id === 'fit' || (s.id === 'residuals-predictor' && fit.predictor === name))) {
          const svg = await renderSvg(c.spec);
          parseXml(svg);
          expect(texts(svg), `${name} in ${c.id}`).toContain(chartLabel(name));
        }
      }
    }
  }, 120_000);

  it('hostile fit names and group labels: charts drawn, titles carry the label as written', async () => {
    for (const [k, label] of HOSTILE_LABELS.entries()) {
      const fit = fitWith({ group: label, name: k % 2 ? 'constructor' : '__proto__' });
      // every chart for a few labels, the first chart for the rest (the label is in each title alike)
      const specs = chartSpecs(fit);
      for (const c of k < 3 ? specs : specs.slice(0, 1)) {
        const svg = await renderSvg(c.spec);
        parseXml(svg);
        expect(c.title).toContain(label);
        expect(texts(svg).some((t) => t.includes(`(${label})`.replace(/[\u0000-\u001f]/g, '')) || t.includes(label.split(/\s/)[0])), JSON.stringify(label)).toBe(true);
      }
    }
  }, 120_000);

  it('chart file names are unique per group, stable, and made of safe characters', () => {
    const labels = [...HOSTILE_LABELS, 'a b', 'a_b', 'a/b', 'A', 'a', 'A1', 'a1', '', ' ', '..', '.hidden', '-x', 'x'.repeat(300), 'x'.repeat(301), 'con', 'nul'];
    const names = labels.map((g) => chartFileName(fitWith({ group: g }), 'fit'));
    expect(new Set(names).size).toBe(labels.length);
    for (const n of names) {
      expect(n).toMatch(/^[A-Za-z0-9_][A-Za-z0-9_.~-]*\.svg$/);
      expect(n.length).toBeLessThan(120);
    }
    expect(chartFileName(fitWith({ group: 'a b' }), 'fit')).toBe(chartFileName(fitWith({ group: 'a b' }), 'fit'));
    expect(chartFileName(fitWith({ group: 'b02' }), 'normal-qq')).toBe('cal-b02-normal-qq.svg'); // plain names unchanged
    expect(chartFileName(fitWith({ group: 'S50' }), 'fit')).toBe('cal-S50-fit.svg');
    expect(fileStem('a_b')).toBe('a_b');
    expect(fileStem('a b')).toMatch(/^a_b~[0-9a-f]{8}$/);
  });

  it('the Markdown report keeps its tables and HTML: hostile labels render as text, as written', () => {
    const fits = HOSTILE_LABELS.map((g) => fitWith({ group: g, response: 'temp|C', predictor: '<b>x</b>' }));
    const single = fitWith({ name: 'other', response: '*r*', predictor: '[p](http://example.invalid)' });
    const charts = [...fits, single].map((f) => [{ title: `${f.name}${f.group !== undefined ? ` (${f.group})` : ''}: data and fitted curve`, href: `r (1)-charts/${chartFileName(f, 'fit')}` }]);
    const md = markdownReport(runOf([...fits, single]), { charts, about: 'Spec comment with ``` a fence\n<script>alert(1)</script>\n```' });
    const html = new MarkdownIt({ html: true, linkify: false }).render(md);
    // no HTML from user text: every tag in the output is one Markdown itself makes
    const tags = new Set([...html.matchAll(/<\/?([a-zA-Z][a-zA-Z0-9]*)/g)].map((m) => m[1].toLowerCase()));
    for (const t of tags) expect(['h1', 'h2', 'h3', 'p', 'blockquote', 'table', 'thead', 'tbody', 'tr', 'th', 'td', 'ul', 'li', 'code', 'pre', 'img', 'strong', 'em'], t).toContain(t);
    expect(html).not.toMatch(/<script/i);
    expect(html).not.toMatch(/<a\s/i); // no link from a name like [p](http://…)
    // images: only chart links of the fits shown in full, one per "Charts" section, with their paths intact
    const imgs = [...html.matchAll(/<img src="([^"]*)"/g)].map((m) => decodeURIComponent(m[1]));
    expect(imgs.length).toBe(html.split('<h3>Charts</h3>').length - 1);
    expect(imgs.length).toBeGreaterThan(0);
    for (const src of imgs) expect(charts.map((c) => c[0].href)).toContain(src);
    // every table row has as many cells as its header
    for (const table of html.split('<table>').slice(1)) {
      const body = table.split('</table>')[0];
      const rows = body.split('<tr>').slice(1).map((r: string) => (r.match(/<t[hd][ >]/g) ?? []).length);
      expect(new Set(rows).size, body.slice(0, 200)).toBe(1);
    }
    // the group table shows each label as written (line breaks read as spaces)
    const text = html.replace(/<[^>]+>/g, '').replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&#39;/g, "'").replace(/&amp;/g, '&');
    for (const g of HOSTILE_LABELS) expect(text, JSON.stringify(g)).toContain(escapeControls(g.replace(/\r\n?|\n|\u2028|\u2029/g, ' ')));
    expect(TERMINAL_UNSAFE.test(md.replace(/\n/g, ''))).toBe(false); // safe to read with cat
    expect(text).toContain('Spec comment with ``` a fence\n<script>alert(1)</script>\n```');
  });

  it('the text summary shows labels with control characters escaped and its columns aligned', () => {
    const fits = HOSTILE_LABELS.map((g) => fitWith({ group: g }));
    const text = runText(runOf(fits));
    expect(TERMINAL_UNSAFE.test(text)).toBe(false);
    expect(text).toContain('esc\\u001b[2J');
    expect(text).toContain('title\\u001b]0;pwned\\u0007');
    const table = text.split('\n').filter((l) => /^ {2}\S/.test(l));
    const rule = table.find((l) => /^ {2}-+ {2}/.test(l))!;
    const nCol = rule.indexOf('  -', 2) + 2; // where the second column starts
    for (const l of table.slice(table.indexOf(rule) + 1, table.indexOf(rule) + 1 + fits.length)) expect(l.charAt(nCol - 1), l).toBe(' ');
  });
});
