/**
 * Reference reader for the differential tests and benchmark #5: CSV text
 * tokenised by papaparse (step mode, one record at a time), cells given their
 * meaning by the same documented rules (engine/data/cells.ts) in plain
 * arrays, independent of the product's scanner and column builder.
 *
 * Valid as an oracle for files with one line-end style, LF or CRLF
 * (papaparse guesses one style per file, and this line counter counts LF).
 * Errors are given as code and line only: the product's messages differ.
 */
import Papa from 'papaparse';
import { isMissingCell, parseNumberCell } from '../../engine/data/cells';
import { detectDelimiter } from '../../engine/data/delimiter';
import type { DataColumn, DecimalMark, Delimiter } from '../../engine/data/types';

export interface OracleTable {
  headers: string[];
  delimiter: Delimiter;
  columns: DataColumn[];
  lines: number[];
}

export type OracleResult = { ok: true; table: OracleTable } | { ok: false; errors: { code: string; row: number }[] };

class OracleColumn {
  values: number[] = [];
  text: string[] | null = null;
  nonNumeric = 0;
  constructor(readonly name: string) {}

  push(cell: string, decimal: DecimalMark): void {
    const x = parseNumberCell(cell, decimal);
    if (Number.isNaN(x) && !isMissingCell(cell)) {
      this.nonNumeric++;
      this.text ??= this.values.map((v) => (Number.isNaN(v) ? '' : String(v)));
    }
    this.values.push(x);
    this.text?.push(cell.trim());
  }

  finish(): DataColumn {
    return { name: this.name, values: Float64Array.from(this.values), text: this.text, nonNumeric: this.nonNumeric };
  }
}

export function papaRead(text: string, options: { delimiter?: Delimiter; decimal?: DecimalMark } = {}): OracleResult {
  const decimal = options.decimal ?? '.';
  const body = text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
  const delimiter = options.delimiter ?? detectDelimiter(body, decimal);
  const errors: { code: string; row: number }[] = [];
  const lines: number[] = [];
  let headers: string[] | null = null;
  let columns: OracleColumn[] = [];
  let recordStart = 0;
  let counted = 0;
  let line = 1;
  const lineAt = (offset: number) => {
    for (; counted < offset; counted++) if (body[counted] === '\n') line++;
    return line;
  };
  Papa.parse<string[]>(body, {
    delimiter,
    quoteChar: '"',
    escapeChar: '"',
    header: false,
    dynamicTyping: false,
    skipEmptyLines: false,
    step: (step) => {
      const at = lineAt(recordStart);
      recordStart = step.meta.cursor;
      const fields = step.data;
      for (const _ of step.errors) errors.push({ code: 'csv_syntax', row: at });
      if (fields.every((f) => f.trim() === '')) return;
      if (headers === null) {
        headers = fields.map((f) => f.trim());
        columns = headers.map((h) => new OracleColumn(h));
        return;
      }
      const width = headers.length;
      const fits = fields.length >= width && fields.slice(width).every((f) => f.trim() === '');
      if (!fits) {
        errors.push({ code: 'ragged_row', row: at });
        return;
      }
      for (let j = 0; j < width; j++) columns[j].push(fields[j], decimal);
      lines.push(at);
    },
  });
  if (errors.length > 0) return { ok: false, errors };
  if (headers === null) return { ok: false, errors: [{ code: 'empty_file', row: 1 }] };
  return { ok: true, table: { headers, delimiter, columns: columns.map((c) => c.finish()), lines } };
}
