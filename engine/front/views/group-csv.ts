/**
 * Text outputs of a group table: CSV (RFC 4180 quoting, `.` decimal mark,
 * shortest round-trip number text, empty cell for a missing value) and JSON.
 */
import type { GroupRow, GroupTable } from '../../groups/table';

/** The row's cells in `table.columns` order (flags joined with `;`). */
export function rowCells(table: GroupTable, row: GroupRow): (string | number | null)[] {
  const cells: (string | number | null)[] = [row.group, row.n];
  table.parameters.forEach((_, j) => cells.push(row.estimates[j], row.stderrs[j]));
  cells.push(row.r2, row.chi2Reduced, row.stop, row.flags.join(';'));
  return cells;
}

/** One CSV field: quoted when it holds the delimiter, a quote, or a line break (RFC 4180 §2). */
export function csvField(value: string | number | null): string {
  if (value === null) return '';
  const text = typeof value === 'number' ? (Number.isFinite(value) ? String(value) : '') : value;
  return /[",\r\n]/.test(text) ? `"${text.replace(/"/g, '""')}"` : text;
}

function csvLine(cells: readonly (string | number | null)[]): string {
  return cells.map(csvField).join(',');
}

/** The per-group table as CSV, header line first, lines ended by `\n`. */
export function toCsv(table: GroupTable): string {
  const lines = [csvLine(table.columns.map((c) => c.key))];
  for (const row of table.rows) lines.push(csvLine(rowCells(table, row)));
  return lines.join('\n') + '\n';
}

/** The summary across groups as CSV: one line per parameter (and `r2`). */
export function summaryToCsv(table: GroupTable): string {
  const s = table.summary;
  const header = ['statistic', 'count', 'median', 'q1', 'q3', 'iqr', 'min', 'max'];
  const lines = [csvLine(header)];
  for (const p of [...s.parameters, { name: 'r2', ...s.r2 }]) {
    lines.push(csvLine([p.name, p.count, p.median, p.q1, p.q3, p.iqr, p.min, p.max]));
  }
  return lines.join('\n') + '\n';
}

/** The table as pretty JSON (it holds only JSON-safe values). */
export function toJson(table: GroupTable): string {
  return JSON.stringify(table, null, 2) + '\n';
}
