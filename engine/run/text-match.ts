/**
 * Text values in a data source's `where` condition (`compound == "CPD-A"`,
 * parser/check-expr.ts decides when a quoted item is text): each comparison
 * of a column with a text value becomes a 0/1 pseudo-column, so the filter
 * compiler (numbers only) never sees text.
 *
 * Meaning, as LANGUAGE.md states it: a cell matches when its text, with the
 * spaces around it removed (as every cell is read), equals the text value with
 * the spaces around it removed; case and inner spaces count. A row whose cell
 * in that column is missing (empty, NA …) is left out and counted with the
 * dropped rows, for `!=` too (an unknown label is neither equal nor unequal).
 * A column that holds only numbers cannot be compared with text: that is an
 * error at the text value with the number form to write instead, never a
 * condition that silently keeps no row.
 */
import type { Expr } from '../../parser/plan';
import { mapLeaves } from '../../parser/plan-expr';
import { isMissingCell, type DataColumn, type DataTable } from '../data';
import { errorText } from '../messages';
import type { RunError } from '../result';

/** Prefix of the pseudo-columns (a CSV header holds no NUL, so they cannot clash). */
export const TEXT_MATCH_PREFIX = '\u0000text:';

/** `origin`: the file column each pseudo-column was made from (for the places of errors). */
export type TextMatch = { ok: true; filter: Expr; table: DataTable; origin: Map<string, string> } | { ok: false; errors: RunError[] };

/** `filter` with each text comparison replaced by `pseudo-column == 1` (or `!= 1`), and the table with those columns added. */
export function matchTextValues(filter: Expr, table: DataTable, file: string, fit: string): TextMatch {
  const added: DataColumn[] = [];
  const origin = new Map<string, string>();
  const errors: RunError[] = [];
  const rewrite = (e: Expr): Expr => {
    switch (e.kind) {
      case 'compare': {
        const text = e.left.kind === 'text' ? e.left : e.right.kind === 'text' ? e.right : null;
        const column = e.left.kind === 'column' ? e.left : e.right.kind === 'column' ? e.right : null;
        if (!text || text.kind !== 'text') return { ...e, left: rewrite(e.left), right: rewrite(e.right) } as Expr;
        if (!column || column.kind !== 'column') {
          errors.push({ code: 'text_compare', message: errorText.textCompare(text.value), ...(text.range ? { range: text.range } : {}), fit });
          return e;
        }
        const col = table.columns.find((c) => c.name === column.name);
        // a missing column is reported by the row selection, at its use
        if (!col) return { kind: 'compare', op: e.op, left: column, right: { kind: 'number', value: NaN }, range: e.range };
        if (col.text === null) {
          errors.push({ code: 'text_on_numbers', message: errorText.textOnNumbers(column.name, text.value, file), file, column: column.name, ...(text.range ? { range: text.range } : {}), fit });
          return e;
        }
        const name = `${TEXT_MATCH_PREFIX}${added.length}`;
        added.push(matchColumn(name, col.text, text.value.trim()));
        origin.set(name, column.name);
        return { kind: 'compare', op: e.op, left: { kind: 'column', name, ...(column.range ? { range: column.range } : {}) }, right: { kind: 'number', value: 1 }, range: e.range };
      }
      case 'not':
        return { ...e, arg: rewrite(e.arg) };
      case 'logic':
        return { ...e, left: rewrite(e.left), right: rewrite(e.right) };
      case 'chain':
        return { ...e, args: e.args.map(rewrite) };
      default:
        return mapLeaves(e, (x) => x);
    }
  };
  const out = rewrite(filter);
  if (errors.length) return { ok: false, errors };
  if (!added.length) return { ok: true, filter, table, origin };
  return { ok: true, filter: out, table: { ...table, headers: [...table.headers, ...added.map((c) => c.name)], columns: [...table.columns, ...added] }, origin };
}

/** 1 where the cell reads `text`, 0 where it reads something else, NaN where it is missing. */
function matchColumn(name: string, cells: readonly string[], text: string): DataColumn {
  const values = new Float64Array(cells.length);
  for (let i = 0; i < cells.length; i++) {
    const cell = cells[i];
    values[i] = isMissingCell(cell) ? NaN : cell === text ? 1 : 0;
  }
  return { name, values, text: null, nonNumeric: 0 };
}

/** Whether a column name is one of the pseudo-columns (views and errors never show them). */
export function isTextMatchColumn(name: string): boolean {
  return name.startsWith(TEXT_MATCH_PREFIX);
}
