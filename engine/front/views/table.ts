/**
 * Aligned plain-text tables and Markdown tables from rows of strings.
 * Widths count Unicode code points (good enough for the symbols we print:
 * ², χ, −, ±, …).
 */

export type Align = 'left' | 'right';

import { inlineText, mdOf, type Markdown } from './escape';
import { columnNotation, isFixedCell } from '../../format';

const width = (s: string): number => [...s].length;

/**
 * Appends items (a line, or a list of lines) to `lines` and returns it.
 * Unlike `lines.push(...list)`, any length works: a call takes at most about
 * 10⁵ arguments (a table of 200,000 predictions or groups would overflow).
 */
export function append(lines: string[], ...items: (string | readonly string[])[]): string[] {
  for (const item of items) {
    if (typeof item === 'string') lines.push(item);
    else for (const line of item) lines.push(line);
  }
  return lines;
}

/** Largest value of `xs` (-Infinity when empty), for lists of any length. */
export function maxOf(xs: Iterable<number>): number {
  let m = -Infinity;
  for (const x of xs) if (x > m) m = x;
  return m;
}

/**
 * The right-aligned (number) columns of `rows` in one notation each (engine/format.ts rule 6,
 * `columnNotation`); left-aligned columns (names, notes) as they are.
 */
export function numberColumns<T extends string | Markdown>(rows: T[][], cols: number, al: (c: number) => Align): T[][] {
  const out = rows.map((r) => [...r]);
  for (let c = 0; c < cols; c++) {
    if (al(c) !== 'right') continue;
    const idx = rows.map((r, i) => (typeof r[c] === 'string' ? i : -1)).filter((i) => i >= 0);
    const fixed = columnNotation(idx.map((i) => rows[i][c] as string));
    idx.forEach((i, k) => (out[i][c] = fixed[k] as T));
  }
  return out;
}

/**
 * Fixed-notation cells of one column padded after the number so their decimal points line up when right-aligned
 * (`0.056 ` over `1.0048`); a number without a point among numbers with one gets a space for it. Other cells as they are.
 */
export function alignDecimals(cells: readonly string[]): string[] {
  const frac = cells.map((c) => (isFixedCell(c) ? (c.includes('.') ? c.length - c.indexOf('.') - 1 : 0) : -1));
  const max = Math.max(0, ...frac);
  if (max === 0) return [...cells];
  return cells.map((c, i) => (frac[i] < 0 ? c : c + ' '.repeat(max - frac[i] + (c.includes('.') ? 0 : 1))));
}

function pad(s: string, w: number, align: Align): string {
  const fill = ' '.repeat(Math.max(0, w - width(s)));
  return align === 'right' ? fill + s : s + fill;
}

/**
 * Lines of an aligned table: a header row, a rule of dashes, then the rows.
 * Columns are separated by two spaces; `align` defaults to left for the first
 * column and right for the others (numbers). Trailing spaces are trimmed.
 */
export function textTable(headers: string[], rows: string[][], align?: Align[], indent = '  ', opts: { mixed?: boolean } = {}): string[] {
  const cols = headers.length;
  const al = (c: number): Align => align?.[c] ?? (c === 0 ? 'left' : 'right');
  // user text (group labels, names) with control characters escaped before widths are measured (escape.ts)
  rows = rows.map((r) => r.map((cell) => inlineText(cell ?? '')));
  headers = headers.map(inlineText);
  // each number column in one notation, fixed ones aligned on the decimal point (engine/format.ts rule 6)
  // (`mixed`: rows of different quantities, e.g. the summary across groups, keep each value's own notation)
  if (!opts.mixed) rows = numberColumns(rows, cols, al);
  for (let c = 0; c < cols; c++) {
    if (al(c) !== 'right') continue;
    const aligned = alignDecimals(rows.map((r) => r[c] ?? ''));
    rows.forEach((r, i) => (r[c] = aligned[i]));
  }
  const w = headers.map((h, c) => Math.max(width(h), maxOf(rows.map((r) => width(r[c] ?? '')))));
  const line = (cells: string[]): string =>
    (indent + cells.map((cell, c) => pad(cell ?? '', w[c], al(c))).join('  ')).replace(/\s+$/, '');
  return [
    line(headers),
    (indent + w.map((n) => '-'.repeat(n)).join('  ')).replace(/\s+$/, ''),
    ...rows.map((r) => line(Array.from({ length: cols }, (_, c) => r[c] ?? ''))),
  ];
}

/** A Markdown table cell: plain text escaped (escape.ts `mdText`, which also escapes `|`), Markdown as it is. */
export function mdCell(s: string | Markdown): string {
  return mdOf(s);
}

/**
 * Lines of a GitHub-flavoured Markdown table; `align` as in textTable. Plain
 * string cells and headers are text (escaped); cells made with `md()` are
 * Markdown and must not contain a bare `|` (escape.ts `mdCode(text, true)`).
 */
export function markdownTable(headers: string[], rows: (string | Markdown)[][], align?: Align[], opts: { mixed?: boolean } = {}): string[] {
  const al = (c: number): Align => align?.[c] ?? (c === 0 ? 'left' : 'right');
  // each number column in one notation (engine/format.ts rule 6); `mixed`: a list of different quantities (the
  // goodness of fit) keeps each value's own notation, as the CLI's list and the panel's do
  if (!opts.mixed) rows = numberColumns(rows, headers.length, al);
  return [
    `| ${headers.map(mdCell).join(' | ')} |`,
    `|${headers.map((_, c) => (al(c) === 'right' ? ' ---: ' : ' --- ')).join('|')}|`,
    ...rows.map((r) => `| ${headers.map((_, c) => mdCell(r[c] ?? '')).join(' | ')} |`),
  ];
}
