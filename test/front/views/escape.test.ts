import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import MarkdownIt from 'markdown-it';
import { chartLabel, CLEAR_LINE, escapeControls, inlineText, mdCode, mdFence, mdHref, mdText, quoted, terminalSafe } from '../../../engine/front/views/escape';
import { TERMINAL_UNSAFE } from '../../fixtures/hostile-names';

const markdown = new MarkdownIt({ html: true, linkify: false });
/** Text content of rendered HTML (tags dropped, the entities markdown-it writes resolved). */
const textOf = (html: string) => html.replace(/<[^>]+>/g, '').replace(/&lt;/g, '<').replace(/&gt;/g, '>').replace(/&quot;/g, '"').replace(/&#39;/g, "'").replace(/&amp;/g, '&');
const anyText = fc.string({ unit: fc.oneof(fc.constantFrom('\\', '`', '*', '_', '[', ']', '(', ')', '|', '<', '>', '&', '#', '!', '~', '"', "'", ' ', '\n', 'a', 'b', '1', '\u2028', '&amp;', '&#x41;', '<b>'), fc.string({ minLength: 1, maxLength: 1 })), maxLength: 40 });

describe('views/escape terminal text', () => {
  it('escapes terminal controls, separators and bidi overrides as \\uXXXX; keeps tab and line feed', () => {
    expect(escapeControls('a\u001b]0;title\u0007b')).toBe('a\\u001b]0;title\\u0007b');
    expect(escapeControls('x\u001b[2Jy')).toBe('x\\u001b[2Jy');
    expect(escapeControls('cr\rback\b\b')).toBe('cr\\u000dback\\u0008\\u0008');
    expect(escapeControls('ls\u2028ps\u2029')).toBe('ls\\u2028ps\\u2029');
    expect(escapeControls('\u202eevil\u202c \u2066i\u2069 \u200f')).toBe('\\u202eevil\\u202c \\u2066i\\u2069 \\u200f');
    expect(escapeControls('\u009b31m del\u007f')).toBe('\\u009b31m del\\u007f');
    expect(escapeControls('tab\tnew\nline é μ')).toBe('tab\tnew\nline é μ');
    expect(inlineText('two\nlines\tcol')).toBe('two\\u000alines\\u0009col');
    expect(quoted('two\nlines \u001b[2J')).toBe('"two\\u000alines \\u001b[2J"');
  });

  it('leaves no unsafe character in any text, and leaves JSON valid and equal', () => {
    fc.assert(fc.property(fc.string({ unit: 'binary', maxLength: 60 }), (s) => {
      expect(TERMINAL_UNSAFE.test(escapeControls(s))).toBe(false);
      const json = JSON.stringify({ s, list: [s] });
      expect(JSON.parse(terminalSafe(json))).toEqual({ s, list: [s] });
    }), { numRuns: 2000, seed: 42 });
  });

  it("keeps the progress line's own clear-line prefix and nothing else", () => {
    expect(terminalSafe(`${CLEAR_LINE}fit f [a\u001b[2J]: 3 of 9`)).toBe(`${CLEAR_LINE}fit f [a\\u001b[2J]: 3 of 9`);
    expect(terminalSafe(`x${CLEAR_LINE}`)).toBe('x\\u000d\\u001b[2K');
    expect(terminalSafe(CLEAR_LINE)).toBe(CLEAR_LINE);
  });
});

describe('views/escape chart labels', () => {
  it('only the names Vega cannot take as a label change, invisibly', () => {
    for (const n of ['constructor', 'toString', 'valueOf', 'hasOwnProperty', '__proto__', 'isPrototypeOf']) {
      expect(chartLabel(n)).not.toBe(n);
      expect(chartLabel(n).replace(/\u2060/g, '')).toBe(n);
    }
    for (const n of ['then', 'time_min', 'a\\b', '${x}', 'constructor ', '']) expect(chartLabel(n)).toBe(n);
  });
});

describe('views/escape Markdown', () => {
  it('plain text renders as exactly that text, with no element of its own', () => {
    fc.assert(fc.property(anyText, (s) => {
      const html = markdown.render(`para ${mdText(s)} end`);
      expect(html.startsWith('<p>') && html.trimEnd().endsWith('</p>'), html).toBe(true);
      expect(html.replace(/^<p>|<\/p>\s*$/g, ''), html).not.toMatch(/<[a-z]/i);
      expect(textOf(html).trim()).toBe(`para ${s.replace(/\r\n?|\n|\u2028|\u2029/g, ' ')} end`);
    }), { numRuns: 1500, seed: 7 });
  });

  it('in a table cell it stays one cell', () => {
    fc.assert(fc.property(anyText, anyText, (a, b) => {
      const html = markdown.render(`| h1 | h2 |\n| --- | --- |\n| ${mdText(a)} | ${mdText(b)} |\n`);
      expect((html.match(/<td>/g) ?? []).length).toBe(2);
    }), { numRuns: 800, seed: 8 });
  });

  it('a code span shows its text literally, backticks and all', () => {
    fc.assert(fc.property(anyText, (s) => {
      const flat = s.replace(/\r\n?|\n|\u2028|\u2029/g, ' ');
      if (flat.trim() === '') return;
      const html = markdown.render(`x ${mdCode(s)} y`);
      const code = /<code>([\s\S]*)<\/code>/.exec(html);
      expect(code, html).not.toBeNull();
      expect(textOf(code![1])).toBe(flat);
    }), { numRuns: 1500, seed: 9 });
  });

  it('a fenced block cannot be closed by its content', () => {
    for (const s of ['```', 'a\n```\n<script>x</script>', '````\n```', '~~~']) {
      const html = markdown.render(mdFence(s, 'text').join('\n'));
      expect(html.match(/<pre>/g)).toHaveLength(1);
      expect(textOf(html).replace(/\n+$/, '')).toBe(s);
    }
  });

  it('a link destination keeps spaces and parentheses inside the link', () => {
    const html = markdown.render(`![t](${mdHref('my (1) report-charts/f-a_b~0a1b2c3d-fit.svg')})`);
    expect(decodeURIComponent(/src="([^"]*)"/.exec(html)![1])).toBe('my (1) report-charts/f-a_b~0a1b2c3d-fit.svg');
  });
});
