/**
 * Data tables read from CSV files: one typed array per column, never one
 * object per row. Shared by the engine (fits) and the editor (completion).
 */

export type Delimiter = ',' | ';' | '\t';
export type DecimalMark = '.' | ',';

export function isDelimiter(value: unknown): value is Delimiter {
  return value === ',' || value === ';' || value === '\t';
}

export function isDecimalMark(value: unknown): value is DecimalMark {
  return value === '.' || value === ',';
}

/** Options of CSV reading. */
export interface CsvOptions {
  /** Field delimiter. Default: detected from the header line (see `detectDelimiter`). */
  delimiter?: Delimiter;
  /** Decimal mark of numeric cells. Default `.`. */
  decimal?: DecimalMark;
  /** File name used in error locations. Default `"<text>"`. */
  file?: string;
  /** Stop collecting cell errors after this many. Default 20. */
  maxErrors?: number;
  /** Bytes per read when streaming a file (`loadDataFile`). Default 1 MiB. */
  chunkSize?: number;
}

export interface DataColumn {
  name: string;
  /** Numeric value per data row; NaN where the cell is missing or not a number. */
  values: Float64Array;
  /**
   * Cell text per data row, kept only for columns holding at least one cell
   * that is neither a number nor a missing marker (text columns, e.g. a group label).
   * Numeric cells read before the first text cell are given as `String(value)`.
   */
  text: string[] | null;
  /** Count of cells that are neither numbers nor missing markers. */
  nonNumeric: number;
}

export interface DataTable {
  headers: string[];
  delimiter: Delimiter;
  decimal: DecimalMark;
  columns: DataColumn[];
  /**
   * 1-based line in the file where each data record starts. The header is
   * line 1, so without quoted line breaks or blank lines the first record is line 2.
   */
  lines: Int32Array;
  rowCount: number;
  /** File line of the header record (1 unless blank lines come first). */
  headerLine: number;
  /**
   * For records that span several lines (a line break inside a quoted cell):
   * the file line where each of their cells starts, by row index. Other rows
   * start and end on `lines[row]`.
   */
  cellLines: Map<number, Int32Array>;
}

/** File line where cell (row, column index) starts. */
export function cellLine(table: DataTable, row: number, column: number): number {
  return table.cellLines.get(row)?.[column] ?? table.lines[row];
}

/** Codes of data errors (stable; tests and views key on them). */
export type DataErrorCode =
  | 'file_not_found'
  | 'file_unreadable'
  | 'empty_file'
  | 'delimiter_conflict'
  | 'csv_syntax'
  | 'ragged_row'
  | 'missing_column'
  | 'duplicate_column'
  | 'non_numeric_cell'
  | 'no_rows'
  | 'header_too_long';

/** A located data problem; `row` is the 1-based line in the file, `field` the 1-based column number in it. */
export interface DataError {
  code: DataErrorCode;
  message: string;
  file: string;
  row?: number;
  /** 1-based field number of the cell at fault in its record (the column of `file:line:column`). */
  field?: number;
  /** Column name, when the place is a column of the header. */
  column?: string;
  /** The offending cell text, when a cell is at fault. */
  value?: string;
}

export type CsvResult = { ok: true; table: DataTable } | { ok: false; errors: DataError[] };
