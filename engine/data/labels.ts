/**
 * The group labels of a data file: the distinct values of one column, read as
 * the runner reads a `per COLUMN` column (engine/data/select.ts `labelOf`:
 * text cells as written, numbers as JavaScript prints them, missing cells
 * left out), before any `where` filter. For the checker's `unknown_group`
 * (parser/check-groups.ts) and editor completion of `FIT."` (extension/logic/
 * completion.ts), both through one `labelLookup`.
 *
 * Reading labels reads the whole file, so it is capped: files over
 * LABEL_MAX_BYTES give no labels (unknown; the run still checks them).
 */
import { statSync } from 'node:fs';
import { isAbsolute, resolve } from 'node:path';
import { isMissingCell } from './cells';
import { loadDataFile } from './load';
import { labelOf } from './select';
import type { DataTable, DecimalMark, Delimiter } from './types';

/** Largest file read for its labels: 32 MiB (a few hundred thousand rows; the editor reads them as you type). */
export const LABEL_MAX_BYTES = 32 * 1024 * 1024;

/** Distinct labels of `column` in first-seen order; undefined when the table has no such column (or it is ambiguous). */
export function distinctLabels(table: DataTable, column: string): string[] | undefined {
  const cols = table.columns.filter((c) => c.name === column);
  if (cols.length !== 1) return undefined;
  const seen = new Set<string>();
  for (let i = 0; i < table.rowCount; i++) {
    const l = labelOf(cols[0], i);
    if (!isMissingCell(l)) seen.add(l);
  }
  return [...seen];
}

/** The labels of `column` in the CSV file at `path`; undefined when it cannot be read, is too large or lacks the column. */
export function readColumnLabels(path: string, column: string, options: { delimiter?: Delimiter; decimal?: DecimalMark; maxBytes?: number } = {}): string[] | undefined {
  try {
    if (statSync(path).size > (options.maxBytes ?? LABEL_MAX_BYTES)) return undefined;
  } catch {
    return undefined;
  }
  const loaded = loadDataFile(path, { ...(options.delimiter ? { delimiter: options.delimiter } : {}), ...(options.decimal ? { decimal: options.decimal } : {}) });
  return loaded.ok ? distinctLabels(loaded.data.table, column) : undefined;
}

/** A cached `CheckContext.groupLabels` for specs in `baseDir`. */
export function labelLookup(baseDir: string): (dataName: string, path: string, column: string, options?: { delimiter?: Delimiter; decimal?: DecimalMark }) => string[] | undefined {
  const cache = new Map<string, string[] | undefined>();
  return (_dataName, path, column, options = {}) => {
    const full = isAbsolute(path) ? path : resolve(baseDir, path);
    const key = `${options.delimiter ?? ''}\u0000${options.decimal ?? ''}\u0000${column}\u0000${full}`;
    if (!cache.has(key)) cache.set(key, readColumnLabels(full, column, options));
    return cache.get(key);
  };
}
