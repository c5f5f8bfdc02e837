/**
 * User text at the boundaries where it is shown: terminals, chart labels,
 * Markdown and HTML. Names of columns, groups, fits and files and the text of
 * CSV cells come from files someone else may have written; each boundary gets
 * them in a form that shows them as written and cannot act as anything else.
 */

import { escapeControls } from '../../../parser/printable';

// The terminal primitives live with the parser (its messages quote user names with them); re-exported here for the views.
export { escapeControls, inlineText, quoted } from '../../../parser/printable';

/** The progress line's own control sequence (engine/front/cli/progress.ts): carriage return, erase the line. */
export const CLEAR_LINE = '\r\x1b[2K';

/**
 * A chunk of CLI output made safe for a terminal: `escapeControls`, except a
 * leading `CLEAR_LINE`, which only the progress line writes (any user text in
 * the chunk after it is escaped; the sequence alone can only blank the line
 * the cursor is on).
 */
export function terminalSafe(chunk: string): string {
  if (chunk.startsWith(CLEAR_LINE)) return CLEAR_LINE + escapeControls(chunk.slice(CLEAR_LINE.length));
  return escapeControls(chunk);
}

/**
 * Object.prototype's property names: Vega's runtime reads a label equal to
 * one of its methods as an operator reference and fails, and Vega-Lite drops
 * an axis title `__proto__` (measured with vega 6.4.0, vega-lite 6.5.0).
 */
const PROTOTYPE_NAMES: ReadonlySet<string> = new Set(Object.getOwnPropertyNames(Object.prototype));

/** U+2060 WORD JOINER: zero width, no line break opportunity. */
const INVISIBLE = '\u2060';

/**
 * A user name as the text of a chart label (axis or chart title). Labels are
 * plain strings in the Vega-Lite spec, never field names or expression
 * source; one quirk remains: a label exactly equal to a property name of
 * Object.prototype (`constructor`, `toString`, `valueOf`, `__proto__`, …)
 * breaks the view or vanishes (see `PROTOTYPE_NAMES`). Such a label gets an
 * invisible U+2060 appended, so it still reads as written.
 */
export function chartLabel(text: string): string {
  return PROTOTYPE_NAMES.has(text) ? text + INVISIBLE : text;
}

/** Text for HTML element content and attribute values: & < > " ' as entities. */
export function htmlText(text: string): string {
  return text.replace(/[&<>"']/g, (c) => `&#${c.charCodeAt(0)};`);
}

/**
 * Plain text for Markdown running text (headings, paragraphs, list items,
 * table cells), shown as written: `&` and `<` as entities (so a name like
 * `<script>` or `<img onerror=…>` stays text in every renderer); the
 * punctuation that could start emphasis, code, table cells, strikethrough or
 * a heading's closing run backslash-escaped (CommonMark §2.4 lets any ASCII
 * punctuation be escaped), except `_` between two letters or digits, which
 * never emphasises (`conc_mg_L` stays readable); a `(` right after `]`
 * escaped, so `[x](http://…)` or `![x](…)` never becomes a link or an image
 * (brackets alone stay: the report defines no link references, so `[S50]`
 * is text); line breaks as spaces (a table row or list item is one line);
 * other control characters as `escapeControls` writes them (a report read
 * with `cat` must not drive the terminal). Text that starts a line is not
 * expected here (line-start markers such as `-` or `1.` are not escaped).
 */
export function mdText(text: string): string {
  return escapeControls(text.replace(/\r\n?|\n|\u2028|\u2029/g, ' '))
    .replace(/[\\`*|~#]/g, (c) => `\\${c}`)
    .replace(/\]\(/g, ']\\(')
    .replace(/_/g, (c, i: number, s: string) => (/[A-Za-z0-9]/.test(s.charAt(i - 1)) && /[A-Za-z0-9]/.test(s.charAt(i + 1)) ? c : '\\_'))
    .replace(/&/g, '&amp;')
    .replace(/</g, '&lt;');
}

/** Plain text for the text of a link or image (`[…]`): `mdText`, with brackets escaped too. */
export function mdLinkText(text: string): string {
  return mdText(text).replace(/[[\]]/g, (c) => `\\${c}`);
}

/** Text that is already Markdown (our own markup, or user text passed through `mdText`/`mdCode`). */
export interface Markdown {
  readonly md: string;
}

export const md = (markdown: string): Markdown => ({ md: markdown });

/** A plain string escaped with `mdText`, or Markdown as it is. */
export function mdOf(x: string | Markdown): string {
  return typeof x === 'string' ? mdText(x) : x.md;
}

/**
 * A fenced code block showing `text` literally (CommonMark §4.5): the fence
 * is a run of backticks longer than any run inside, so no line can close it;
 * control characters written as `escapeControls` does.
 */
export function mdFence(text: string, info = ''): string[] {
  let longest = 2;
  for (const run of text.match(/`+/g) ?? []) longest = Math.max(longest, run.length);
  const fence = '`'.repeat(longest + 1);
  return [fence + info, ...text.split(/\r\n?|\n/).map(escapeControls), fence];
}

/** A Markdown link destination: percent-encoded, parentheses too (they would end the link). */
export function mdHref(href: string): string {
  return encodeURI(href).replace(/\(/g, '%28').replace(/\)/g, '%29');
}

/**
 * A Markdown code span showing `text` literally (CommonMark §6.1): delimited
 * by a run of backticks longer than any run inside it, padded with spaces
 * when the text starts or ends with a backtick or a space; line breaks as
 * spaces. Inside a code span nothing else is interpreted, so no other escape
 * is needed (a `|` in a table cell is the exception GitHub's tables make: it
 * is written `\|`, which GitHub removes again).
 */
export function mdCode(text: string, inTable = false): string {
  const flat = escapeControls(text.replace(/\r\n?|\n|\u2028|\u2029/g, ' '));
  let longest = 0;
  for (const run of flat.match(/`+/g) ?? []) longest = Math.max(longest, run.length);
  const fence = '`'.repeat(longest + 1);
  const pad = flat.startsWith('`') || flat.endsWith('`') || (flat.startsWith(' ') && flat.endsWith(' ') && flat.trim() !== '') ? ' ' : '';
  const body = inTable ? flat.replace(/\|/g, '\\|') : flat;
  return `${fence}${pad}${body}${pad}${fence}`;
}
