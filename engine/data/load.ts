/**
 * Reading a CSV data file (read-only) and recording its provenance: the
 * SHA-256 of the bytes as read (node:crypto) and the row count.
 *
 * The file is streamed: read in chunks (`CsvOptions.chunkSize`, default
 * 1 MiB) that go both to the hash and to the scanner, so a file of any size
 * whose columns fit in memory loads (its text is never held whole).
 */
import { createHash } from 'node:crypto';
import { closeSync, fstatSync, readSync } from 'node:fs';
import { openInputSync } from '../io/input';
import { bytesSource, readCsv, readCsvHead, type ByteSource } from './csv';
import type { CsvOptions, DataError, DataTable } from './types';
import { columnText } from '../messages';

/** Reads a file's bytes (or text) in one piece. Injected by tests and the editor; without it the file is streamed. */
export type FileReader = (path: string) => Buffer | string;

export interface LoadedData {
  table: DataTable;
  /** Hex SHA-256 of the file bytes (of the UTF-8 encoding when the reader returns text). */
  sha256: string;
  bytes: number;
}

export type LoadResult = { ok: true; data: LoadedData } | { ok: false; errors: DataError[] };

export function sha256Hex(content: Buffer | string): string {
  return createHash('sha256').update(content).digest('hex');
}

/** Why a file could not be opened or read, as a located error (never thrown). */
export function fileError(e: unknown, file: string): DataError {
  const code = (e as { code?: unknown }).code;
  if (code === 'ENOENT') return { code: 'file_not_found', file, message: columnText.fileNotFound(file) };
  const reason = code === 'EISDIR' ? columnText.isFolder : e instanceof Error ? e.message : String(e);
  return { code: 'file_unreadable', file, message: columnText.fileUnreadable(file, reason) };
}

/** Opens `path` for reading: only a regular file is opened (engine/io: a named pipe, device or folder is refused before any byte is read). */
export function openForReading(path: string): number {
  return openInputSync(path);
}

/** Sequential reads from an open file descriptor. */
export function fdSource(fd: number): ByteSource {
  return (buf, offset, length) => readSync(fd, buf, offset, length, null);
}

/**
 * Loads a CSV file. `displayPath` names the file in error messages (default
 * `path`). Never throws for a missing or unreadable file: those are errors.
 */
export function loadDataFile(
  path: string,
  options: Omit<CsvOptions, 'file'> & { displayPath?: string; readFile?: FileReader } = {},
): LoadResult {
  const file = options.displayPath ?? path;
  const { displayPath: _display, readFile, ...csv } = options;
  const hash = createHash('sha256');
  const onBytes = (b: Uint8Array) => hash.update(b);
  let parsed: ReturnType<typeof readCsv>;
  if (readFile) {
    let content: Buffer | string;
    try {
      content = readFile(path);
    } catch (e) {
      return { ok: false, errors: [fileError(e, file)] };
    }
    const bytes = typeof content === 'string' ? Buffer.from(content, 'utf8') : content;
    parsed = readCsv(bytesSource(bytes), { ...csv, file, onBytes, sizeHint: bytes.length });
  } else {
    let fd: number | null = null;
    try {
      fd = openForReading(path);
      parsed = readCsv(fdSource(fd), { ...csv, file, onBytes, sizeHint: fstatSync(fd).size });
    } catch (e) {
      return { ok: false, errors: [fileError(e, file)] };
    } finally {
      if (fd !== null) closeSync(fd);
    }
  }
  if (!parsed.ok) return { ok: false, errors: parsed.errors };
  return { ok: true, data: { table: parsed.table, sha256: hash.digest('hex'), bytes: parsed.bytes } };
}

/**
 * A sample of a CSV file for starting a spec (`new`, the editor's "New Spec
 * from CSV"): the header and the first SAMPLE_ROWS data rows, reading at most
 * SAMPLE_MAX_BYTES. Starting values need a few thousand rows, not the file;
 * a 1 GiB file costs the same as a small one.
 */
export const SAMPLE_ROWS = 10_000;
/** Most bytes read for a sample: room for a header as long as `check` reads (header.ts HEADER_MAX_BYTES) and then rows. */
export const SAMPLE_MAX_BYTES = 16 * 1024 * 1024;

export type SampleResult = { ok: true; table: DataTable; complete: boolean } | { ok: false; errors: DataError[] };

/** The start of a CSV file as a table (synchronous, streamed: reading stops at the last row sampled). Never throws. */
export function sampleDataFile(path: string, options: Omit<CsvOptions, 'file'> & { displayPath?: string; maxRows?: number; maxBytes?: number } = {}): SampleResult {
  const file = options.displayPath ?? path;
  const { displayPath: _display, maxRows, maxBytes, ...csv } = options;
  let fd: number | null = null;
  try {
    fd = openForReading(path);
    const r = readCsvHead(fdSource(fd), { ...csv, file, maxRows: maxRows ?? SAMPLE_ROWS, maxBytes: maxBytes ?? SAMPLE_MAX_BYTES });
    return r.ok ? { ok: true, table: r.table, complete: r.complete } : { ok: false, errors: r.errors };
  } catch (e) {
    return { ok: false, errors: [fileError(e, file)] };
  } finally {
    if (fd !== null) closeSync(fd);
  }
}

/**
 * The same sample from the first bytes of a file read elsewhere (the editor
 * reads them asynchronously with engine/io `readInputHead`): `more` says the
 * file goes on after them, so a record they cut off is not taken as a row.
 */
export function sampleFromBytes(bytes: Uint8Array, more: boolean, options: CsvOptions & { maxRows?: number } = {}): SampleResult {
  const { maxRows, ...csv } = options;
  const r = readCsvHead(bytesSource(bytes), { ...csv, maxRows: maxRows ?? SAMPLE_ROWS, maxBytes: more ? bytes.length : Infinity });
  return r.ok ? { ok: true, table: r.table, complete: r.complete } : { ok: false, errors: r.errors };
}
