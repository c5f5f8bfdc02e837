/**
 * What the panel says about the rows a fit did not use, next to n: the
 * engine's account and wording (result.ts `rowAccount`, engine/front/views/rows.ts:
 * rows removed by `where`, with an empty or NA cell, without a group label,
 * with weight 0), with the file lines of rows with weight 0 (drawn hollow:
 * result.ts `excluded`) and of rows dropped for an empty cell (the
 * `rows_dropped` warning), e.g. "n = 28 fitted (of 31 rows: 1 with an empty
 * or NA cell (line 27), 2 with weight 0 (lines 10, 22), drawn hollow)".
 *
 * Pure: no vscode, no DOM.
 */
import type { FitResult } from '../../engine/result';
import { accountOf, leftOutClause, leftOutTotal, nSentence, type ReasonDetail } from '../../engine/front/views/rows';

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
  return { total: leftOutTotal(accountOf(f)), weightZero, emptyCells: { count, lines: lines.length === count ? lines : [] } };
}

function lineList(lines: readonly number[]): string {
  if (!lines.length) return '';
  const shown = lines.slice(0, LINES_NAMED).join(', ') + (lines.length > LINES_NAMED ? ', …' : '');
  return ` (line${lines.length === 1 ? '' : 's'} ${shown})`;
}

/**
 * The rows left out as the engine words them (engine/front/views/rows.ts `leftOutClause`), with the file lines
 * of rows with weight 0 and empty cells: "of 31 rows: 1 with an empty or NA cell (line 27), 2 with weight 0
 * (lines 10, 22), drawn hollow", or null when none.
 */
export function leftOutSentence(f: FitResult): string | null {
  return leftOutClause(accountOf(f), reasonDetail(f));
}

function reasonDetail(f: FitResult): ReasonDetail {
  const l = leftOutRows(f);
  return { missing_cell: lineList(l.emptyCells.lines), weight_zero: `${lineList(l.weightZero)}, drawn hollow` };
}

/** The header line, the CLI's n sentence with the lines: "n = 28 fitted (of 31 rows: …)". */
export function rowsLine(f: FitResult): string {
  return nSentence(accountOf(f), reasonDetail(f));
}
