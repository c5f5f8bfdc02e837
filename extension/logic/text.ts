/**
 * Small text helpers shared by the editor features: words at an offset, line
 * bounds, and offset spans. Offsets are 0-based UTF-16 indices into the spec
 * text, the same unit as `Position.offset` in the plan and `document.offsetAt`.
 */
import type { Range } from '../../parser/plan';

/** A half-open span `[start, end)` of offsets. */
export interface Span {
  start: number;
  end: number;
}

const WORD_CHAR = /[A-Za-z0-9_]/;

/** Span of `range` in offsets. */
export function spanOf(range: Range): Span {
  return { start: range.start.offset, end: Math.max(range.start.offset, range.end.offset) };
}

/** True when `offset` lies inside `span` (end inclusive, so a cursor right after a word counts). */
export function contains(span: Span, offset: number): boolean {
  return offset >= span.start && offset <= span.end;
}

/** The identifier under or just before `offset`, or null. A quoted name `"a b"` is returned without quotes. */
export function wordAt(text: string, offset: number): { word: string; span: Span; quoted: boolean } | null {
  const quoted = quotedNameAt(text, offset);
  if (quoted) return quoted;
  let start = offset;
  while (start > 0 && WORD_CHAR.test(text[start - 1])) start--;
  let end = offset;
  while (end < text.length && WORD_CHAR.test(text[end])) end++;
  if (start === end || /[0-9]/.test(text[start])) return null;
  return { word: text.slice(start, end), span: { start, end }, quoted: false };
}

/** A `"..."` on the line of `offset` that encloses it. */
function quotedNameAt(text: string, offset: number): { word: string; span: Span; quoted: boolean } | null {
  const { start: ls, end: le } = lineBounds(text, offset);
  const line = text.slice(ls, le);
  const re = /"([^"\r\n]*)"/g;
  for (let m = re.exec(line); m; m = re.exec(line)) {
    const s = ls + m.index;
    const e = s + m[0].length;
    if (offset > s && offset < e) return { word: m[1], span: { start: s, end: e }, quoted: true };
  }
  return null;
}

/** Offsets of the start and end (before the line break) of the line holding `offset`. */
export function lineBounds(text: string, offset: number): Span {
  let start = Math.min(offset, text.length);
  while (start > 0 && text[start - 1] !== '\n' && text[start - 1] !== '\r') start--;
  let end = Math.max(start, Math.min(offset, text.length));
  while (end < text.length && text[end] !== '\n' && text[end] !== '\r') end++;
  return { start, end };
}

/** The first line of `span`, trimmed of trailing blanks (for placing a diagnostic on a statement's first line). */
export function firstLine(text: string, span: Span): Span {
  const line = lineBounds(text, span.start);
  let end = Math.min(line.end, Math.max(span.end, span.start));
  while (end > span.start && /\s/.test(text[end - 1])) end--;
  return { start: span.start, end: end > span.start ? end : line.end };
}

/** Text of the line holding `offset`, up to `offset` (what the user typed so far on that line). */
export function linePrefix(text: string, offset: number): string {
  return text.slice(lineBounds(text, offset).start, offset);
}

/** Text with `#` comments blanked out (same length), so scanners ignore braces and words in comments. */
export function blankComments(text: string): string {
  return text.replace(/("[^"\r\n]*")|#[^\r\n]*/g, (m, str: string | undefined) => (str ? m : ' '.repeat(m.length)));
}
