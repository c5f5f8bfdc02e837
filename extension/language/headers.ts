/**
 * Reads the header line of each data file a spec names, for the checker's
 * column check, completion and the "file not found" diagnostic. A local
 * file is read until its header ends, at most 16 MiB (engine/data `readHeaderFile`);
 * other file systems go through `vscode.workspace.fs`. Results are cached by
 * file, modification time and size.
 */
import * as vscode from 'vscode';
import { readHeaderFile, readHeaderText } from '../../engine/data';
import type { DataFileStatus, HeaderRequest } from '../logic/analysis';

/** Bytes read from non-local files before taking the header. */
const REMOTE_HEADER_BYTES = 65536;

interface Cached {
  mtime: number;
  size: number;
  delimiter?: string;
  headers: string[] | null;
}

export class HeaderReader {
  private cache = new Map<string, Cached>();

  /** Forget cached headers (a CSV changed). */
  clear(uri?: vscode.Uri): void {
    if (uri) this.cache.delete(uri.toString());
    else this.cache.clear();
  }

  async status(specUri: vscode.Uri, req: HeaderRequest): Promise<DataFileStatus> {
    const base: DataFileStatus = { name: req.name, path: req.path, state: 'unknown', pathSpan: req.pathSpan };
    const uri = resolveDataUri(specUri, req.path);
    if (!uri) return base;
    let stat: vscode.FileStat;
    try {
      stat = await vscode.workspace.fs.stat(uri);
    } catch {
      return { ...base, state: 'missing' };
    }
    if (stat.type & vscode.FileType.Directory) return { ...base, state: 'unreadable' };
    const key = uri.toString();
    const hit = this.cache.get(key);
    if (hit && hit.mtime === stat.mtime && hit.size === stat.size && hit.delimiter === req.delimiter) {
      return hit.headers ? { ...base, state: 'found', headers: hit.headers } : { ...base, state: 'unreadable' };
    }
    const opts = { delimiter: req.delimiter, decimal: req.decimal };
    let headers: string[] | null = null;
    if (uri.scheme === 'file') headers = readHeaderFile(uri.fsPath, opts)?.headers ?? null;
    else {
      try {
        const bytes = await vscode.workspace.fs.readFile(uri);
        headers = readHeaderText(Buffer.from(bytes.subarray(0, REMOTE_HEADER_BYTES)).toString('utf8'), opts)?.headers ?? null;
      } catch {
        headers = null;
      }
    }
    this.cache.set(key, { mtime: stat.mtime, size: stat.size, delimiter: req.delimiter, headers });
    return headers ? { ...base, state: 'found', headers } : { ...base, state: 'unreadable' };
  }
}

/** The data file's uri: relative paths against the spec's folder; untitled specs have none. */
export function resolveDataUri(specUri: vscode.Uri, path: string): vscode.Uri | undefined {
  if (specUri.scheme === 'untitled') return undefined;
  if (/^([A-Za-z]:[\\/]|\/)/.test(path)) return specUri.scheme === 'file' ? vscode.Uri.file(path) : specUri.with({ path });
  return vscode.Uri.joinPath(specUri, '..', path.replace(/\\/g, '/'));
}
