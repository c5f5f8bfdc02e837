/**
 * Decimal alignment of a numeric table column in the results panel: the
 * cells keep the digits the CLI prints (engine/format.ts), and each gets the
 * padding that puts its decimal point under the others', so 0.9747 and
 * 0.400749 line up on the point rather than on their last digit. Cells are
 * right-aligned in a monospaced font (page.css `.num`); the padding is
 * figure spaces (U+2007, the width of a digit) after the number, and a
 * punctuation space (U+2008) for a missing decimal point. A cell that is not
 * a plain decimal number (`n/a`, `< 0.0001`, exponent notation, text) gets
 * none.
 *
 * Before alignment each numeric column takes one notation
 * (`panelNumberColumns`, engine/format.ts rule 6, as the CLI's tables do):
 * when one cell is in exponent notation, all are.
 *
 * Pure: strings in, numbers out.
 */
import { columnNotation } from '../../engine/format';

/** The rows with each numeric column (not the first, the row labels) in one notation (engine/format.ts `columnNotation`). */
export function panelNumberColumns(rows: readonly (readonly string[])[], numeric: (col: number) => boolean): string[][] {
  const out = rows.map((r) => [...r]);
  const cols = Math.max(0, ...rows.map((r) => r.length));
  for (let j = 1; j < cols; j++) {
    if (!numeric(j)) continue;
    const fixed = columnNotation(rows.map((r) => r[j] ?? ''));
    out.forEach((r, i) => {
      if (j < r.length) r[j] = fixed[i];
    });
  }
  return out;
}

const PLAIN = /^[-−+]?\d[\d,]*(\.\d+)?$/;

/** Digits after the decimal point of a plain decimal cell, or null for any other cell. */
export function fractionDigits(cell: string): number | null {
  const t = cell.trim();
  if (!PLAIN.test(t)) return null;
  const dot = t.indexOf('.');
  return dot < 0 ? 0 : t.length - dot - 1;
}

/** The padding each cell of a column needs after it: `digits` figure spaces, and `point` when it has no decimal point while others do. */
export function decimalPadding(cells: readonly string[]): { digits: number; point: boolean }[] {
  const fr = cells.map(fractionDigits);
  const max = Math.max(0, ...fr.map((f) => f ?? 0));
  const anyPoint = cells.some((c, i) => fr[i] !== null && c.includes('.'));
  return cells.map((c, i) => {
    const f = fr[i];
    if (f === null || max === 0) return { digits: 0, point: false };
    return { digits: max - f, point: anyPoint && !c.includes('.') };
  });
}

/** A cell's padding as text (the page draws it after the cell as generated content, page.css `.num[data-pad]`). */
export function paddingText(p: { digits: number; point: boolean }): string {
  return `${p.point ? '\u2008' : ''}${'\u2007'.repeat(p.digits)}`;
}
