/**
 * User text made safe for display on one terminal line: the parser's
 * messages quote names with it, and the views (engine/front/views/escape.ts)
 * and the CLI's located lines build on it.
 */

/**
 * Characters a terminal may act on, or that disguise the order of text: C0
 * controls except tab and line feed, DEL, C1 controls (U+0080–U+009F, among
 * them the 8-bit CSI), the line and paragraph separators U+2028/U+2029, and
 * the bidirectional marks, embeddings, overrides and isolates (U+061C,
 * U+200E, U+200F, U+202A–U+202E, U+2066–U+2069; the "Trojan Source" set of
 * Boucher and Anderson, 2021).
 */
const UNSAFE = /[\u0000-\u0008\u000b-\u001f\u007f-\u009f\u061c\u200e\u200f\u2028\u2029\u202a-\u202e\u2066-\u2069]/g;

const hex4 = (c: string): string => `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`;

/**
 * `text` with every character of `UNSAFE` written as `\uXXXX` (ESC as
 * `\u001b`, CR as `\u000d`). The same escape is valid inside a JSON string
 * and means the same character there, so JSON output stays valid and equal
 * (JSON.stringify already escapes C0 controls; the others it leaves raw).
 */
export function escapeControls(text: string): string {
  UNSAFE.lastIndex = 0;
  return UNSAFE.test(text) ? text.replace(UNSAFE, hex4) : text;
}

/**
 * User text for one line of terminal text (a table cell, a label in a
 * heading): `escapeControls`, and line feed and tab as `\u000a`, `\u0009`
 * too, so a label cannot start a line of its own or break a column.
 */
export function inlineText(text: string): string {
  return escapeControls(text).replace(/[\n\t]/g, hex4);
}


/**
 * User text (a cell, a column name) quoted inside a one-line message:
 * `inlineText` between double quotes, so a line break inside a quoted CSV
 * cell cannot split a message in the terminal, the editor's problem list,
 * JSON or a report.
 */
export function quoted(text: string): string {
  return `"${inlineText(text)}"`;
}
