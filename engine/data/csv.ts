/**
 * CSV → column table: drives the chunked scanner (`csv-scan.ts`) from a
 * byte source (a file, a buffer, text). Pure apart from the source the
 * caller passes, so the editor can reuse it.
 *
 * Streaming: bytes are read into one buffer of `chunkSize` (default 1 MiB);
 * after each read the scanner takes the complete records, and the cut-off
 * rest moves to the front for the next read. When a single record fills the
 * whole buffer, the buffer doubles, so a record of any length costs linear
 * time. Memory: the buffer plus the columns, never the file's text.
 */
import { CsvScanner } from './csv-scan';
import { dataText } from '../messages';
import type { CsvOptions, CsvResult, DataError, DataTable } from './types';

/** Reads up to `length` bytes into buf at `offset`; returns how many (0 at the end). */
export type ByteSource = (buf: Uint8Array, offset: number, length: number) => number;

export const DEFAULT_CHUNK_SIZE = 1 << 20;

export interface ScanRun {
  /** Bytes read from the source. */
  bytes: number;
  /** The scan stopped at `maxBytes` before it was done. */
  capped: boolean;
}

/**
 * Feeds `source` to `scanner` until the input ends or the scanner is done.
 * `onBytes` sees every byte read, in order (for hashing). With `maxBytes`,
 * reading stops after that many bytes (`capped` when the scanner wanted more).
 */
export function runScanner(
  scanner: CsvScanner,
  source: ByteSource,
  options: { chunkSize?: number; onBytes?: (bytes: Uint8Array) => void; maxBytes?: number } = {},
): ScanRun {
  const chunk = Math.max(1, Math.floor(options.chunkSize ?? DEFAULT_CHUNK_SIZE));
  const maxBytes = options.maxBytes ?? Infinity;
  let buf = new Uint8Array(Math.max(1, Math.min(chunk, maxBytes)));
  let len = 0;
  let total = 0;
  /** The last scan consumed nothing: fill the whole buffer before scanning again. */
  let stalled = false;
  for (;;) {
    if (len === buf.length) {
      // One record fills the buffer: double it (linear total cost for a record of any length).
      const grown = new Uint8Array(buf.length * 2);
      grown.set(buf.subarray(0, len));
      buf = grown;
    }
    let eof = false;
    do {
      const want = Math.min(buf.length - len, stalled ? Infinity : chunk, maxBytes - total);
      if (want <= 0) return { bytes: total, capped: true }; // at the cap with the scanner wanting more
      const got = source(buf, len, want);
      if (got <= 0) {
        eof = true;
        break;
      }
      options.onBytes?.(buf.subarray(len, len + got));
      len += got;
      total += got;
    } while (stalled && len < buf.length);
    const used = scanner.scan(buf, len, eof);
    if (scanner.done || eof) return { bytes: total, capped: false };
    stalled = used === 0;
    if (used > 0) {
      buf.copyWithin(0, used, len);
      len -= used;
    }
  }
}

/** A byte source over an in-memory array. */
export function bytesSource(bytes: Uint8Array): ByteSource {
  let at = 0;
  return (buf, offset, length) => {
    const k = Math.min(length, bytes.length - at);
    buf.set(bytes.subarray(at, at + k), offset);
    at += k;
    return k;
  };
}

/**
 * Reads a CSV file's records with a header. Returns the table, or every
 * located error found (up to `maxErrors`). Never throws for bad input.
 */
export function readCsv(source: ByteSource, options: CsvOptions & { onBytes?: (bytes: Uint8Array) => void; sizeHint?: number } = {}): CsvResult & { bytes: number } {
  const file = options.file ?? '<text>';
  const decimal = options.decimal ?? '.';
  if (options.delimiter === ',' && decimal === ',') {
    return { ok: false, errors: [{ code: 'delimiter_conflict', file, message: dataText.delimiterConflict }], bytes: 0 };
  }
  const scanner = new CsvScanner({ delimiter: options.delimiter, decimal, file, maxErrors: options.maxErrors ?? 20, sizeHint: options.sizeHint });
  const run = runScanner(scanner, source, { chunkSize: options.chunkSize, onBytes: options.onBytes });
  if (scanner.errors.length > 0) return { ok: false, errors: scanner.errors, bytes: run.bytes };
  const scanned = scanner.table();
  if (scanned === null) {
    // line 1 is where the header was expected
    const error: DataError = { code: 'empty_file', file, row: 1, message: scanner.onlyDelimiters ? dataText.noHeader(file) : dataText.emptyFile(file) };
    return { ok: false, errors: [error], bytes: run.bytes };
  }
  const table: DataTable = { ...scanned, decimal };
  return { ok: true, table, bytes: run.bytes };
}

/**
 * The header and at most `maxRows` data rows from the start of `source`,
 * reading at most `maxBytes` (`new` and the editor's "New Spec from CSV",
 * which need the columns and a sample of rows for starting values, never the
 * whole file). A record cut by `maxBytes` is not read (it is not the end of
 * the input), so a source holding only the first `maxBytes` bytes of a longer
 * file gives the same rows as the file. `complete` is true when the input
 * ended within the sample with fewer than `maxRows` rows (every row was read;
 * a file of exactly `maxRows` rows counts as sampled).
 */
export function readCsvHead(source: ByteSource, options: CsvOptions & { maxRows: number; maxBytes: number }): CsvResult & { complete: boolean } {
  const file = options.file ?? '<text>';
  const decimal = options.decimal ?? '.';
  if (options.delimiter === ',' && decimal === ',') return { ok: false, errors: [{ code: 'delimiter_conflict', file, message: dataText.delimiterConflict }], complete: false };
  const scanner = new CsvScanner({ delimiter: options.delimiter, decimal, file, maxErrors: options.maxErrors ?? 20, maxRows: options.maxRows });
  const run = runScanner(scanner, source, { chunkSize: Math.min(options.chunkSize ?? DEFAULT_CHUNK_SIZE, options.maxBytes), maxBytes: options.maxBytes });
  if (scanner.errors.length > 0) return { ok: false, errors: scanner.errors, complete: false };
  const scanned = scanner.table();
  if (scanned === null) {
    const message = run.capped ? dataText.headTooLong(file, options.maxBytes) : scanner.onlyDelimiters ? dataText.noHeader(file) : dataText.emptyFile(file);
    return { ok: false, errors: [{ code: 'empty_file', file, row: 1, message }], complete: false };
  }
  return { ok: true, table: { ...scanned, decimal }, complete: !run.capped && !scanner.rowLimitReached };
}

/** CSV from bytes (UTF-8, optional byte-order mark). */
export function parseCsvBytes(bytes: Uint8Array, options: CsvOptions = {}): CsvResult {
  const { bytes: _read, ...result } = readCsv(bytesSource(bytes), options);
  return result;
}

/** CSV from text (encoded as UTF-8 first; a leading U+FEFF is skipped like a byte-order mark). */
export function parseCsvText(text: string, options: CsvOptions = {}): CsvResult {
  return parseCsvBytes(new TextEncoder().encode(text), options);
}

/** Strips a leading UTF-8 byte-order mark (U+FEFF). */
export function stripBom(text: string): string {
  return text.charCodeAt(0) === 0xfeff ? text.slice(1) : text;
}
