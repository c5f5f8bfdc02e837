/**
 * Selecting the rows a fit uses from a table: the named columns as numbers,
 * rows with a missing value in any of them dropped (and counted), then the
 * data source filter applied. Non-numeric cells in a used column are located
 * errors, never silently dropped.
 */
import { isMissingCell } from './cells';
import { cellLine, type DataColumn, type DataError, type DataTable } from './types';
import { columnText, dataPlace } from '../messages';

/** A compiled filter over the selected numeric columns: writes 1 (keep) or 0 per row. */
export type RowFilter = (cols: readonly Float64Array[], n: number, out: Float64Array) => void;

export interface SelectRequest {
  /** Columns read as numbers, in the order the caller wants them back. */
  numeric: readonly string[];
  /** Column read as text labels (e.g. the group-by column); may also be numeric. */
  label?: string;
  /** Filter over `numeric` columns (same order); rows where it gives 0 or NaN are left out. */
  filter?: RowFilter;
  /** File name for error locations. */
  file: string;
  /** Stop collecting cell errors after this many. Default 20. */
  maxErrors?: number;
}

export interface Selection {
  /** One array per `numeric` name, all of length `n`. */
  columns: Float64Array[];
  n: number;
  /** 1-based file line of each kept row. */
  lines: Int32Array;
  /** Labels of the `label` column for kept rows, or null. */
  labels: string[] | null;
  /** Rows dropped for a missing value in a used column. */
  dropped: number;
  /** 1-based file line of each dropped row, in file order (`dropped` of them). */
  droppedLines: Int32Array;
  /** Rows left out by the filter (not counted as dropped). */
  filteredOut: number;
  /** With `label`: the label of each row the filter left out (`filteredOut` of them), else null. */
  filteredLabels: string[] | null;
  /** With `label`: the label of each dropped row ('' when the label itself is missing), else null. */
  droppedLabels: string[] | null;
  /** The first row dropped for a missing value: its table row index and the first used column (header order) missing there. */
  firstDropped: { index: number; column: string } | null;
}

export type SelectResult = { ok: true; selection: Selection } | { ok: false; errors: DataError[] };

export function selectRows(table: DataTable, request: SelectRequest): SelectResult {
  const { file } = request;
  const maxErrors = request.maxErrors ?? 20;
  const errors: DataError[] = [];
  const found: DataColumn[] = [];
  for (const name of request.numeric) {
    const col = findColumn(table, name, file, errors);
    if (col) {
      found.push(col);
      collectNonNumeric(table, col, file, errors, maxErrors);
    }
  }
  const labelCol = request.label !== undefined ? findColumn(table, request.label, file, errors) : undefined;
  if (errors.length > 0) return { ok: false, errors };

  const total = table.rowCount;
  const present = new Uint8Array(total);
  let nPresent = 0;
  for (let i = 0; i < total; i++) {
    let ok = true;
    for (const col of found) {
      if (Number.isNaN(col.values[i])) {
        ok = false;
        break;
      }
    }
    if (ok && labelCol) ok = !isMissingCell(labelOf(labelCol, i));
    present[i] = ok ? 1 : 0;
    if (ok) nPresent++;
  }
  const dropped = total - nPresent;
  let firstDropped: Selection['firstDropped'] = null;
  const i0 = dropped > 0 ? present.indexOf(0) : -1;
  if (i0 >= 0) {
    const missingHere = table.columns.find((c) => (c === labelCol && isMissingCell(labelOf(c, i0))) || (found.includes(c) && Number.isNaN(c.values[i0])));
    if (missingHere) firstDropped = { index: i0, column: missingHere.name };
  }
  const droppedLines = new Int32Array(dropped);
  for (let i = 0, k = 0; i < total && k < dropped; i++) if (!present[i]) droppedLines[k++] = table.lines[i];
  const droppedLabels = labelCol ? [] as string[] : null;
  if (droppedLabels && labelCol) {
    for (let i = 0; i < total; i++) {
      if (!present[i]) {
        const l = labelOf(labelCol, i);
        droppedLabels.push(isMissingCell(l) ? '' : l);
      }
    }
  }
  let columns = found.map((col) => compact(col.values, present, nPresent));
  let keepIdx = indicesOf(present, nPresent);

  let filteredOut = 0;
  let filteredLabels: string[] | null = labelCol ? [] : null;
  if (request.filter && nPresent > 0) {
    const mask = new Float64Array(nPresent);
    request.filter(columns, nPresent, mask);
    const keep = new Uint8Array(nPresent);
    let nKeep = 0;
    for (let i = 0; i < nPresent; i++) {
      keep[i] = mask[i] !== 0 && !Number.isNaN(mask[i]) ? 1 : 0;
      nKeep += keep[i];
    }
    filteredOut = nPresent - nKeep;
    if (labelCol) filteredLabels = keepIdx.filter((_, i) => keep[i] === 0).map((i) => labelOf(labelCol, i));
    columns = columns.map((c) => compact(c, keep, nKeep));
    keepIdx = keepIdx.filter((_, i) => keep[i] === 1);
  }

  const n = keepIdx.length;
  const lines = new Int32Array(n);
  for (let i = 0; i < n; i++) lines[i] = table.lines[keepIdx[i]];
  const labels = labelCol ? keepIdx.map((i) => labelOf(labelCol, i)) : null;
  return { ok: true, selection: { columns, n, lines, labels, dropped, droppedLines, filteredOut, filteredLabels, droppedLabels, firstDropped } };
}

function findColumn(table: DataTable, name: string, file: string, errors: DataError[]): DataColumn | undefined {
  const matches = table.columns.filter((c) => c.name === name);
  if (matches.length === 1) return matches[0];
  if (matches.length === 0) {
    errors.push({
      code: 'missing_column',
      file,
      row: table.headerLine,
      column: name,
      message: columnText.missing(file, name, table.headers),
    });
  } else {
    errors.push({ code: 'duplicate_column', file, row: table.headerLine, field: table.headers.indexOf(name, table.headers.indexOf(name) + 1) + 1, column: name, message: columnText.duplicate(file, name, matches.length) });
  }
  return undefined;
}

function collectNonNumeric(table: DataTable, col: DataColumn, file: string, errors: DataError[], maxErrors: number): void {
  if (col.nonNumeric === 0 || col.text === null) return;
  const index = table.columns.indexOf(col);
  for (let i = 0; i < table.rowCount && errors.length < maxErrors; i++) {
    if (Number.isNaN(col.values[i]) && !isMissingCell(col.text[i])) {
      const row = cellLine(table, i, index);
      const value = col.text[i];
      const decimalComma = table.decimal === '.' && /^[+-]?\d+,\d+$/.test(value);
      errors.push({
        code: 'non_numeric_cell',
        file,
        row,
        field: index + 1,
        column: col.name,
        value,
        message: columnText.nonNumeric(dataPlace(file, row, index + 1), col.name, value, decimalComma),
      });
    }
  }
}

/** The label of row i of a column read as labels (a text cell, or a number written as JavaScript prints it); exported for engine/data/labels.ts. */
export function labelOf(col: DataColumn, i: number): string {
  if (col.text !== null) return col.text[i];
  const v = col.values[i];
  return Number.isNaN(v) ? '' : String(v);
}

function compact(values: Float64Array, keep: Uint8Array, count: number): Float64Array {
  const out = new Float64Array(count);
  let k = 0;
  for (let i = 0; i < keep.length; i++) if (keep[i]) out[k++] = values[i];
  return out;
}

function indicesOf(keep: Uint8Array, count: number): number[] {
  const out = new Array<number>(count);
  let k = 0;
  for (let i = 0; i < keep.length; i++) if (keep[i]) out[k++] = i;
  return out;
}
