/**
 * What the panel says about the rows a fit did not use, next to n: rows with
 * weight 0 (drawn, not fitted: result.ts `excluded`) and rows dropped for an
 * empty or NA cell (`rowsDropped`, their file lines in the `rows_dropped`
 * warning), e.g. "n = 28 · 3 rows left out: 2 with weight 0 (lines 10, 22),
 * 1 with an empty or NA cell (line 27)". Rows a data statement's `where`
 * removes belong to the data set, not to the fit, and are not counted here.
 *
 * Pure: no vscode, no DOM.
 */
import type { FitResult } from '../../engine/result';
import { formatInteger } from '../../engine/format';

/** File lines named before "…". */
const LINES_NAMED = 8;

export interface LeftOut {
  /** All rows left out. */
  total: number;
  weightZero: number[];
  /** Count of rows dropped for empty cells (their lines when known). */
  emptyCells: { count: number; lines: number[] };
}

export function leftOutRows(f: FitResult): LeftOut {
  const weightZero = f.excluded?.reason === 'weight_zero' ? [...f.excluded.row] : [];
  const zero = new Set(weightZero);
  const lines = [...new Set(f.warnings.filter((w) => w.code === 'rows_dropped').flatMap((w) => w.rows ?? []))].filter((r) => !zero.has(r)).sort((a, b) => a - b);
  const count = f.rowsDropped;
  return { total: weightZero.length + count, weightZero, emptyCells: { count, lines: lines.length === count ? lines : [] } };
}

function lineList(lines: readonly number[]): string {
  if (!lines.length) return '';
  const shown = lines.slice(0, LINES_NAMED).join(', ') + (lines.length > LINES_NAMED ? ', …' : '');
  return ` (line${lines.length === 1 ? '' : 's'} ${shown})`;
}

/** "3 rows left out: 2 with weight 0 (lines 10, 22), 1 with an empty or NA cell (line 27)", or null when none. */
export function leftOutSentence(f: FitResult): string | null {
  const l = leftOutRows(f);
  if (l.total === 0) return null;
  const parts: string[] = [];
  if (l.weightZero.length) parts.push(`${formatInteger(l.weightZero.length)} with weight 0${lineList(l.weightZero)}, drawn hollow`);
  if (l.emptyCells.count) parts.push(`${formatInteger(l.emptyCells.count)} with an empty or NA cell${lineList(l.emptyCells.lines)}`);
  return `${formatInteger(l.total)} row${l.total === 1 ? '' : 's'} left out: ${parts.join('; ')}`;
}

/** The header line: "n = 28 · 3 rows left out: …" (n alone when nothing was left out). */
export function rowsLine(f: FitResult): string {
  const s = leftOutSentence(f);
  return `n = ${formatInteger(f.goodness.n)}${s ? `, ${s}` : ''}`;
}
