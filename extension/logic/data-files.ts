/**
 * How the editor reads data files for diagnostics, completion, hover and Go
 * to Definition (no vscode here; extension/state/headers.ts supplies the
 * workspace folders). The rules, in Restricted Mode and trusted workspaces
 * alike:
 * - only files whose real location (symbolic links resolved) lies inside a
 *   workspace folder are read; others stay "not checked", with a note;
 * - only regular files (engine/io: stat, O_NONBLOCK open, fstat), so a named
 *   pipe or a device never freezes the extension host;
 * - everything asynchronously, on libuv's thread pool (fs.promises), never a
 *   synchronous read on the extension host's thread;
 * - only the header: bytes are read in 64 KiB chunks until the first complete
 *   record, at most HEADER_CAP_BYTES (1 MiB); a wider header is "not
 *   checked" rather than cut (cutting would turn real columns into unknown
 *   names).
 */
import { realpath, stat } from 'node:fs/promises';
import { basename, dirname, isAbsolute, join, relative, resolve } from 'node:path';
import { readHeaderText } from '../../engine/data';
import { InputError, readInputHead } from '../../engine/io';
import type { DataFileStatus, HeaderRequest } from './analysis';

/** Most bytes read to find a data file's header (1 MiB: a header of 10,000 columns of 100 characters fits). */
export const HEADER_CAP_BYTES = 1 << 20;

/** Bytes per read while looking for the end of the header. */
export const HEADER_CHUNK_BYTES = 64 * 1024;

export const dataFileText = {
  outside: 'its columns are not checked: the file is outside the workspace folders, and the editor reads only files inside them',
  tooWide: (cap: number) => `its columns are not checked: the header line is longer than ${Math.round(cap / 1024)} KiB, the most the editor reads`,
  noHeader: 'it has no header line',
  missing: (path: string) => `data file "${path}" not found (paths are relative to the spec's folder)`,
  unreadable: (path: string, reason: string) => `data file "${path}" cannot be read: ${reason}`,
  notChecked: (path: string, note: string) => `data file "${path}": ${note}`,
};

/**
 * True once `bytes` hold a complete first record: a line break outside double
 * quotes after some content (blank lines before the header are skipped, as
 * engine/data `readHeaderText` skips them).
 */
export function firstRecordComplete(bytes: Uint8Array): boolean {
  let quoted = false;
  let content = false;
  for (let i = 0; i < bytes.length; i++) {
    const b = bytes[i];
    if (b === 0x22) {
      quoted = !quoted;
      content = true;
    } else if (!quoted && (b === 0x0a || b === 0x0d)) {
      if (content) return true;
    } else if (b !== 0x20 && b !== 0x09 && !quoted) content = true;
  }
  return false;
}

/** `child` lies in `folder` (both real, absolute paths). */
export function isInside(child: string, folder: string): boolean {
  const rel = relative(folder, child);
  return rel === '' || (!rel.startsWith('..') && !isAbsolute(rel));
}

/** The real location of `path`; for a missing file the real location of its folder plus its name. */
async function realOf(path: string): Promise<{ real: string; exists: boolean }> {
  try {
    return { real: await realpath(path), exists: true };
  } catch {
    const parent = dirname(path);
    if (parent === path) return { real: path, exists: false };
    return { real: join((await realOf(parent)).real, basename(path)), exists: false };
  }
}

/** Real paths of workspace folders, for `locateDataFile`. */
export async function realFolders(folders: readonly string[]): Promise<string[]> {
  return Promise.all(folders.map(async (f) => (await realOf(resolve(f))).real));
}

export type Located = { inside: true; real: string; exists: boolean } | { inside: false };

/** Where a data file really is, and whether the editor may read it (inside one of `folders`, real paths). */
export async function locateDataFile(path: string, folders: readonly string[]): Promise<Located> {
  const { real, exists } = await realOf(resolve(path));
  return folders.some((f) => isInside(real, f)) ? { inside: true, real, exists } : { inside: false };
}

/** A file's modification time and size, to reuse a header read before (only called for files inside the workspace). */
export async function fileStamp(real: string): Promise<string | null> {
  try {
    const st = await stat(real);
    return `${st.mtimeMs}:${st.size}:${st.ino}`;
  } catch {
    return null;
  }
}

export interface HeaderRead {
  state: DataFileStatus['state'];
  headers?: string[];
  /** The header record's first line (Go to Definition places the cursor on a column in it). */
  line?: string;
  /** Why the file was not read, or not whole (`unreadable` and `unknown`). */
  reason?: string;
}

/** Read the header of the data file at real path `real` (already located inside the workspace). */
export async function readDataHeader(real: string, req: Pick<HeaderRequest, 'delimiter' | 'decimal'>, cap = HEADER_CAP_BYTES): Promise<HeaderRead> {
  let head: { bytes: Buffer; capped: boolean };
  try {
    head = await readInputHead(real, { maxBytes: cap, chunkBytes: HEADER_CHUNK_BYTES, enough: firstRecordComplete });
  } catch (e) {
    const err = e instanceof InputError ? e : new InputError('EIO', String(e));
    return err.code === 'ENOENT' ? { state: 'missing' } : { state: 'unreadable', reason: err.message };
  }
  if (head.capped) return { state: 'unknown', reason: dataFileText.tooWide(cap) };
  const text = head.bytes.toString('utf8');
  const info = readHeaderText(text, { delimiter: req.delimiter, decimal: req.decimal });
  if (!info) return { state: 'unreadable', reason: dataFileText.noHeader };
  const body = text.replace(/^\uFEFF/, '').replace(/^(\s*[\r\n])+/, '');
  return { state: 'found', headers: info.headers, line: body.split(/\r\n|\r|\n/)[0] };
}
