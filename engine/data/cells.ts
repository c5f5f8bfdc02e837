/**
 * Reading one CSV cell as a number. Strict: a cell is a number only when the
 * whole trimmed cell matches the decimal pattern below, so `12 kg`, `1,234.5`
 * (thousands separator) or `inf` are text, not numbers.
 */
import type { DecimalMark } from './types';

const DOT_NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const COMMA_NUMBER = /^[+-]?(?:\d+,?\d*|,\d+)(?:[eE][+-]?\d+)?$/;

/**
 * Missing-value markers (compared case-insensitively after trimming):
 * the empty cell, `NA`, `N/A` and `NaN`. Rows with a missing value in a
 * used column are dropped and counted.
 */
const MISSING = new Set(['', 'na', 'n/a', 'nan']);

export function isMissingCell(cell: string): boolean {
  const t = cell.trim();
  return t.length <= 3 && MISSING.has(t.toLowerCase());
}

/** The number in `cell`, or NaN when the cell is missing or not a number. */
export function parseNumberCell(cell: string, decimal: DecimalMark): number {
  const t = cell.trim();
  if (decimal === ',') {
    return COMMA_NUMBER.test(t) ? finiteOrNaN(Number(t.replace(',', '.'))) : NaN;
  }
  return DOT_NUMBER.test(t) ? finiteOrNaN(Number(t)) : NaN;
}

/** Overflowing literals such as `1e999` are not usable numbers; they count as text. */
function finiteOrNaN(x: number): number {
  return Number.isFinite(x) ? x : NaN;
}
