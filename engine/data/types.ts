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
  /**
   * Which reader tokenises the text. Default `'auto'`: the plain-file scanner
   * (`csv-scan.ts`) when it accepts the file, else papaparse. `'papaparse'`
   * always uses papaparse (the reference path, for tests and benchmarks).
   */
  tokenizer?: CsvTokenizer;
}

export type CsvTokenizer = 'auto' | 'papaparse';

export function isCsvTokenizer(value: unknown): value is CsvTokenizer {
  return value === 'auto' || value === 'papaparse';
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
  | 'no_rows';

/** A located data problem; `row` is the 1-based line in the file. */
export interface DataError {
  code: DataErrorCode;
  message: string;
  file: string;
  row?: number;
  column?: string;
  /** The offending cell text, when a cell is at fault. */
  value?: string;
}

export type CsvResult = { ok: true; table: DataTable } | { ok: false; errors: DataError[] };
