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
import { bytesSource, readCsv, type ByteSource } from './csv';
import type { CsvOptions, DataError, DataTable } from './types';

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
  if (code === 'ENOENT') return { code: 'file_not_found', file, message: `data file not found: ${file}` };
  const reason = code === 'EISDIR' ? 'it is a folder' : e instanceof Error ? e.message : String(e);
  return { code: 'file_unreadable', file, message: `cannot read data file ${file}: ${reason}` };
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
