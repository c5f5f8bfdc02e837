/**
 * Reading only the header of a CSV file: for the parser's column check and
 * editor completion, without reading whole data files.
 */
import { closeSync, readSync } from 'node:fs';
import { isAbsolute, resolve } from 'node:path';
import Papa from 'papaparse';
import { openInputSync } from '../io/input';
import { stripBom } from './csv';
import { detectDelimiter } from './delimiter';
import type { DecimalMark, Delimiter } from './types';

export interface HeaderInfo {
  headers: string[];
  delimiter: Delimiter;
}

/** Column names from the first non-blank record of CSV text; null when there is none. */
export function readHeaderText(text: string, options: { delimiter?: Delimiter; decimal?: DecimalMark } = {}): HeaderInfo | null {
  const body = stripBom(text);
  const delimiter = options.delimiter ?? detectDelimiter(body, options.decimal ?? '.');
  let headers: string[] | null = null;
  const parser = Papa.parse<string[]>(body, {
    delimiter,
    quoteChar: '"',
    escapeChar: '"',
    skipEmptyLines: 'greedy',
    step: (step, handle) => {
      headers = step.data.map((f) => f.trim());
      handle.abort();
    },
  });
  void parser;
  return headers === null ? null : { headers, delimiter };
}

/**
 * Column names of a CSV file, reading at most `maxBytes` (default 65536) from
 * its start. Returns null when the file cannot be read or has no header.
 */
export function readHeaderFile(path: string, options: { delimiter?: Delimiter; decimal?: DecimalMark; maxBytes?: number } = {}): HeaderInfo | null {
  const maxBytes = options.maxBytes ?? 65536;
  let fd: number | null = null;
  try {
    fd = openInputSync(path); // regular files only: a named pipe must not block
    const buffer = Buffer.alloc(maxBytes);
    const size = readSync(fd, buffer, 0, maxBytes, 0);
    let text = buffer.subarray(0, size).toString('utf8');
    if (size === maxBytes) {
      // Cut at the last line break so a partial record is not taken as the header.
      const cut = Math.max(text.lastIndexOf('\n'), text.lastIndexOf('\r'));
      if (cut > 0) text = text.slice(0, cut);
    }
    return readHeaderText(text, options);
  } catch {
    return null;
  } finally {
    if (fd !== null) closeSync(fd);
  }
}

/**
 * A `headers` callback for the parser's CheckContext: column names of a data
 * statement's file, resolved against `baseDir` (the spec's folder); undefined
 * when the file cannot be read, so the parser treats unknown names as columns.
 */
export function headerLookup(baseDir: string): (dataName: string, path: string) => string[] | undefined {
  const cache = new Map<string, string[] | undefined>();
  return (_dataName, path) => {
    const full = isAbsolute(path) ? path : resolve(baseDir, path);
    if (!cache.has(full)) cache.set(full, readHeaderFile(full)?.headers);
    return cache.get(full);
  };
}
