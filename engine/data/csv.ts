/**
 * CSV text → column table, per RFC 4180 (quoted fields with embedded
 * delimiters, doubled quotes and line breaks; CRLF or LF line ends), plus a
 * leading UTF-8 byte-order mark, a header record, delimiter detection and an
 * optional decimal comma. Pure: no file access, so the editor can reuse it.
 *
 * Plain files (no quotes, consistent LF or CRLF, decimal point) are read by
 * the scanner in `csv-scan.ts`; everything else, and every file the scanner
 * declines, is tokenised by papaparse in step mode, one record at a time, so
 * only typed column arrays are kept, never an object per row. Both paths give
 * identical tables (differential property test in test/data/csv-scan.test.ts).
 */
import Papa from 'papaparse';
import { ColumnBuilder } from './column-builder';
import { scanPlainCsv } from './csv-scan';
import { delimiterName, detectDelimiter } from './delimiter';
import type { CsvOptions, CsvResult, DataError, DataTable, DecimalMark, Delimiter } from './types';

/** Counts line breaks up to an offset, incrementally (offsets only grow). */
class LineCounter {
  private pos = 0;
  private line = 1;
  private readonly breakChar: string;

  constructor(private readonly text: string) {
    // CR-only files (old Mac) count '\r'; LF and CRLF files count '\n'.
    this.breakChar = text.includes('\n') || !text.includes('\r') ? '\n' : '\r';
  }

  lineAt(offset: number): number {
    for (; this.pos < offset && this.pos < this.text.length; this.pos++) {
      if (this.text[this.pos] === this.breakChar) this.line++;
    }
    return this.line;
  }
}

/** Strips a leading UTF-8 byte-order mark (U+FEFF). */
export function stripBom(text: string): string {
  return text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
}

/**
 * Parses CSV text with a header record. Returns the table, or every located
 * error found (up to `maxErrors`). Never throws for bad input.
 */
export function parseCsvText(text: string, options: CsvOptions = {}): CsvResult {
  const file = options.file ?? '<text>';
  const decimal = options.decimal ?? '.';
  const maxErrors = options.maxErrors ?? 20;
  const body = stripBom(text);
  if (options.delimiter === ',' && decimal === ',') {
    return fail({ code: 'delimiter_conflict', file, message: 'the comma cannot be both the delimiter and the decimal mark; use delimiter ";" with decimal ","' });
  }
  if (body.trim() === '') return fail({ code: 'empty_file', file, message: `${file} is empty: expected a header line naming the columns` });
  const delimiter = options.delimiter ?? detectDelimiter(body, decimal);

  if (decimal === '.' && options.tokenizer !== 'papaparse') {
    const scanned = scanPlainCsv(body, delimiter);
    if (scanned !== null) return { ok: true, table: { headers: scanned.headers, delimiter, decimal, columns: scanned.columns, lines: scanned.lines, rowCount: scanned.rowCount } };
  }
  return parseWithPapa(body, delimiter, decimal, file, maxErrors);
}

/** The general path: papaparse in step mode, any RFC 4180 input. */
function parseWithPapa(body: string, delimiter: Delimiter, decimal: DecimalMark, file: string, maxErrors: number): CsvResult {
  const errors: DataError[] = [];
  const lines: number[] = [];
  const counter = new LineCounter(body);
  let headers: string[] | null = null;
  let builders: ColumnBuilder[] = [];
  let recordStart = 0;

  Papa.parse<string[]>(body, {
    delimiter,
    quoteChar: '"',
    escapeChar: '"',
    header: false,
    dynamicTyping: false,
    skipEmptyLines: false,
    step: (step) => {
      const line = counter.lineAt(recordStart);
      recordStart = step.meta.cursor;
      const fields = step.data;
      for (const e of step.errors) {
        if (errors.length < maxErrors) errors.push({ code: 'csv_syntax', file, row: line, message: `${file}:${line}: ${e.message}` });
      }
      if (fields.every((f) => f.trim() === '')) return; // blank line
      if (headers === null) {
        headers = fields.map((f) => f.trim());
        builders = headers.map((h) => new ColumnBuilder(h));
        return;
      }
      if (!fitsHeader(fields, headers.length)) {
        if (errors.length < maxErrors) {
          errors.push({
            code: 'ragged_row',
            file,
            row: line,
            message: `${file}:${line}: ${fields.length} fields where the header has ${headers.length} (${delimiterName(delimiter)}-separated)`,
          });
        }
        return;
      }
      for (let j = 0; j < builders.length; j++) builders[j].push(fields[j], decimal);
      lines.push(line);
    },
  });

  if (errors.length > 0) return { ok: false, errors };
  if (headers === null) return fail({ code: 'empty_file', file, message: `${file} has no header line` });
  const table: DataTable = {
    headers,
    delimiter,
    decimal,
    columns: builders.map((b) => b.finish()),
    lines: Int32Array.from(lines),
    rowCount: lines.length,
  };
  return { ok: true, table };
}

/** A record fits the header when it has as many fields, or more fields that are all empty (trailing delimiters). */
function fitsHeader(fields: string[], width: number): boolean {
  if (fields.length < width) return false;
  for (let j = width; j < fields.length; j++) if (fields[j].trim() !== '') return false;
  return true;
}

function fail(error: DataError): CsvResult {
  return { ok: false, errors: [error] };
}
