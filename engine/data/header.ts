/**
 * Reading only the header of a CSV file: for the parser's column check and
 * editor completion, without reading whole data files.
 *
 * The header is read by the same scanner as the data (`csv-scan.ts`), so it
 * honours the data statement's options (`delimiter`, `decimal`, which also
 * steers delimiter detection) and quoted names, and it is read whole: bytes
 * are read until the header record ends, however wide it is, up to
 * HEADER_MAX_BYTES. A header that does not end within that many bytes is
 * reported as `too_long` (a message, not a cut header that would make real
 * columns "unknown").
 */
import { closeSync } from 'node:fs';
import { isAbsolute, resolve } from 'node:path';
import { bytesSource, runScanner, type ByteSource } from './csv';
import { CsvScanner } from './csv-scan';
import { fdSource, fileError, openForReading } from './load';
import { dataText } from '../messages';
import type { DecimalMark, Delimiter } from './types';

/**
 * Most bytes read to find the end of a header: 16 MiB, room for about a
 * million columns of 15-character names; anything longer is taken as a
 * broken file rather than read on (the editor reads headers as you type).
 */
export const HEADER_MAX_BYTES = 16 * 1024 * 1024;

export interface HeaderInfo {
  headers: string[];
  delimiter: Delimiter;
}

export interface HeaderOptions {
  delimiter?: Delimiter;
  decimal?: DecimalMark;
  /** Most bytes read before giving up. Default HEADER_MAX_BYTES. */
  maxBytes?: number;
  /** Bytes per read. Default 64 KiB (most headers end in the first read). */
  chunkSize?: number;
}

/** A header, or why there is none: the file cannot be read, holds no header, or its header is longer than the cap. */
export type HeaderResult =
  | { ok: true; info: HeaderInfo }
  | { ok: false; reason: 'unreadable' | 'empty' | 'too_long' | 'syntax'; message: string };

function scanHeader(source: ByteSource, file: string, options: HeaderOptions): HeaderResult {
  const maxBytes = options.maxBytes ?? HEADER_MAX_BYTES;
  const scanner = new CsvScanner({ delimiter: options.delimiter, decimal: options.decimal ?? '.', file, maxErrors: 1, headerOnly: true });
  const run = runScanner(scanner, source, { maxBytes, chunkSize: options.chunkSize ?? 65536 });
  const info = scanner.headerInfo();
  if (info) return { ok: true, info: { headers: info.headers, delimiter: info.delimiter } };
  if (run.capped) return { ok: false, reason: 'too_long', message: dataText.headerTooLong(file, maxBytes) };
  if (scanner.errors.length) return { ok: false, reason: 'syntax', message: scanner.errors[0].message };
  return { ok: false, reason: 'empty', message: dataText.emptyFile(file) };
}

/** Column names from the first non-blank record of CSV text; null when there is none. */
export function readHeaderText(text: string, options: HeaderOptions = {}): HeaderInfo | null {
  const r = scanHeader(bytesSource(new TextEncoder().encode(text)), '<text>', options);
  return r.ok ? r.info : null;
}

/** The header of a CSV file, or why there is none (never throws). */
export function readHeader(path: string, options: HeaderOptions & { displayPath?: string } = {}): HeaderResult {
  const file = options.displayPath ?? path;
  let fd: number | null = null;
  try {
    fd = openForReading(path);
    return scanHeader(fdSource(fd), file, options);
  } catch (e) {
    return { ok: false, reason: 'unreadable', message: fileError(e, file).message };
  } finally {
    if (fd !== null) closeSync(fd);
  }
}

/** Column names of a CSV file; null when the file cannot be read, has no header, or its header is too long (see `readHeader`). */
export function readHeaderFile(path: string, options: HeaderOptions = {}): HeaderInfo | null {
  const r = readHeader(path, options);
  return r.ok ? r.info : null;
}

/**
 * A `headers` callback for the parser's CheckContext: column names of a data
 * statement's file, resolved against `baseDir` (the spec's folder), read with
 * the statement's delimiter and decimal options; undefined when the file
 * cannot be read, so the parser treats unknown names as columns.
 */
export function headerLookup(baseDir: string): (dataName: string, path: string, options?: { delimiter?: Delimiter; decimal?: DecimalMark }) => string[] | undefined {
  const cache = new Map<string, string[] | undefined>();
  return (_dataName, path, options = {}) => {
    const full = isAbsolute(path) ? path : resolve(baseDir, path);
    const key = `${options.delimiter ?? ''}\u0000${options.decimal ?? ''}\u0000${full}`;
    if (!cache.has(key)) cache.set(key, readHeaderFile(full, options)?.headers);
    return cache.get(key);
  };
}
