/**
 * Reading a CSV data file (read-only) and recording its provenance: the
 * SHA-256 of the bytes as read (node:crypto) and the row count.
 */
import { createHash } from 'node:crypto';
import { readInputSync } from '../io/input';
import { parseCsvText } from './csv';
import type { CsvOptions, DataError, DataTable } from './types';

/** Reads a file's bytes (or text); the default is `readInputSync` (engine/io: regular files only). Injected by tests and the editor. */
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

/**
 * Loads a CSV file. `displayPath` names the file in error messages (default
 * `path`). Never throws for a missing or unreadable file: those are errors.
 */
export function loadDataFile(
  path: string,
  options: Omit<CsvOptions, 'file'> & { displayPath?: string; readFile?: FileReader } = {},
): LoadResult {
  const file = options.displayPath ?? path;
  const reader: FileReader = options.readFile ?? readInputSync;
  let content: Buffer | string;
  try {
    content = reader(path);
  } catch (e) {
    const code = (e as { code?: unknown }).code;
    if (code === 'ENOENT') {
      return { ok: false, errors: [{ code: 'file_not_found', file, message: `data file not found: ${file}` }] };
    }
    const reason = code === 'EISDIR' ? 'it is a folder' : e instanceof Error ? e.message : String(e);
    return { ok: false, errors: [{ code: 'file_unreadable', file, message: `cannot read data file ${file}: ${reason}` }] };
  }
  const text = typeof content === 'string' ? content : content.toString('utf8');
  const parsed = parseCsvText(text, { delimiter: options.delimiter, decimal: options.decimal, maxErrors: options.maxErrors, tokenizer: options.tokenizer, file });
  if (!parsed.ok) return parsed;
  return {
    ok: true,
    data: { table: parsed.table, sha256: sha256Hex(content), bytes: typeof content === 'string' ? Buffer.byteLength(content) : content.length },
  };
}
