/**
 * Reads the header line of each data file a spec names, for the checker's
 * column check, completion, hover, Go to Definition and the "file not found"
 * diagnostic, under the rules of logic/data-files.ts: only files inside the
 * workspace folders, only regular files, only the header (at most
 * HEADER_CAP_BYTES), asynchronously. Local files go through engine/io;
 * other file systems through `vscode.workspace.fs` (stat first: files larger
 * than the cap are not read there, since that API reads whole files).
 * Results are cached by file, modification time and size.
 */
import * as vscode from 'vscode';
import { distinctLabels, parseCsvText, readColumnLabels, readHeaderText } from '../../engine/data';
import type { DataFileStatus, HeaderRequest } from '../logic/analysis';
import { dataFileText, fileStamp, HEADER_CAP_BYTES, locateDataFile, readDataHeader, realFolders, type HeaderRead } from '../logic/data-files';

export class HeaderReader implements vscode.Disposable {
  private cache = new Map<string, { stamp: string; delimiter?: string; decimal?: string; labelColumns?: string; read: HeaderRead & { labels?: Record<string, string[]> } }>();
  private folders: Promise<string[]> | null = null;
  private readonly watch: vscode.Disposable;

  constructor() {
    this.watch = vscode.workspace.onDidChangeWorkspaceFolders(() => {
      this.folders = null;
      this.cache.clear();
    });
  }

  dispose(): void {
    this.watch.dispose();
  }

  /** Forget cached headers (a CSV changed). */
  clear(uri?: vscode.Uri): void {
    if (uri) this.cache.delete(uri.toString());
    else this.cache.clear();
  }

  private localFolders(): Promise<string[]> {
    this.folders ??= realFolders((vscode.workspace.workspaceFolders ?? []).filter((f) => f.uri.scheme === 'file').map((f) => f.uri.fsPath));
    return this.folders;
  }

  async status(specUri: vscode.Uri, req: HeaderRequest): Promise<DataFileStatus> {
    const base: DataFileStatus = { name: req.name, path: req.path, state: 'unknown', pathSpan: req.pathSpan };
    const uri = resolveDataUri(specUri, req.path);
    if (!uri) return base;
    const read = await this.read(uri, req);
    return { ...base, state: read.state, ...(read.headers ? { headers: read.headers } : {}), ...(read.reason ? { reason: read.reason } : {}), ...(read.labels ? { labels: read.labels } : {}) };
  }

  /** The first line of the data file's header, when the rules let it be read (Go to Definition). */
  async headerLine(specUri: vscode.Uri, path: string): Promise<string | undefined> {
    const uri = resolveDataUri(specUri, path);
    return uri ? (await this.read(uri, { name: '', path })).line : undefined;
  }

  private async read(uri: vscode.Uri, req: HeaderRequest): Promise<HeaderRead & { labels?: Record<string, string[]> }> {
    return uri.scheme === 'file' ? this.readLocal(uri, req) : this.readRemote(uri, req);
  }

  private async readLocal(uri: vscode.Uri, req: HeaderRequest): Promise<HeaderRead & { labels?: Record<string, string[]> }> {
    const where = await locateDataFile(uri.fsPath, await this.localFolders());
    if (!where.inside) return { state: 'unknown', reason: dataFileText.outside };
    if (!where.exists) return { state: 'missing' };
    const stamp = await fileStamp(where.real);
    if (stamp === null) return { state: 'missing' };
    const key = uri.toString();
    const hit = this.cache.get(key);
    const labelColumns = (req.labelColumns ?? []).join('\u0000');
    if (hit && hit.stamp === stamp && hit.delimiter === req.delimiter && hit.decimal === req.decimal && hit.labelColumns === labelColumns) return hit.read;
    const header = await readDataHeader(where.real, req);
    // the labels of the per columns (completion of FIT." and the checker's unknown_group), files up to LABEL_EDITOR_MAX_BYTES
    const read = header.state === 'found' && req.labelColumns?.length ? { ...header, labels: labelsOf(req, (c) => readColumnLabels(where.real, c, { delimiter: req.delimiter, decimal: req.decimal, maxBytes: LABEL_EDITOR_MAX_BYTES })) } : header;
    this.cache.set(key, { stamp, delimiter: req.delimiter, decimal: req.decimal, labelColumns, read });
    return read;
  }

  private async readRemote(uri: vscode.Uri, req: HeaderRequest): Promise<HeaderRead & { labels?: Record<string, string[]> }> {
    if (!vscode.workspace.getWorkspaceFolder(uri)) return { state: 'unknown', reason: dataFileText.outside };
    let st: vscode.FileStat;
    try {
      st = await vscode.workspace.fs.stat(uri);
    } catch {
      return { state: 'missing' };
    }
    if (!(st.type & vscode.FileType.File)) return { state: 'unreadable', reason: st.type & vscode.FileType.Directory ? 'it is a folder, not a regular file (only regular files are read)' : 'it is not a regular file (only regular files are read)' };
    const stamp = `${st.mtime}:${st.size}`;
    const key = uri.toString();
    const hit = this.cache.get(key);
    const labelColumns = (req.labelColumns ?? []).join('\u0000');
    if (hit && hit.stamp === stamp && hit.delimiter === req.delimiter && hit.decimal === req.decimal && hit.labelColumns === labelColumns) return hit.read;
    let read: HeaderRead & { labels?: Record<string, string[]> };
    if (st.size > HEADER_CAP_BYTES) read = { state: 'unknown', reason: dataFileText.tooWide(HEADER_CAP_BYTES) };
    else {
      try {
        const text = Buffer.from(await vscode.workspace.fs.readFile(uri)).toString('utf8');
        const info = readHeaderText(text, { delimiter: req.delimiter, decimal: req.decimal });
        read = info ? { state: 'found', headers: info.headers, line: text.replace(/^\uFEFF/, '').split(/\r\n|\r|\n/)[0] } : { state: 'unreadable', reason: dataFileText.noHeader };
        if (info && req.labelColumns?.length) {
          const parsed = parseCsvText(text, { ...(req.delimiter ? { delimiter: req.delimiter } : {}), ...(req.decimal ? { decimal: req.decimal } : {}) });
          read = { ...read, labels: labelsOf(req, (c) => (parsed.ok ? distinctLabels(parsed.table, c) : undefined)) };
        }
      } catch (e) {
        read = { state: 'unreadable', reason: e instanceof Error ? e.message : String(e) };
      }
    }
    this.cache.set(key, { stamp, delimiter: req.delimiter, decimal: req.decimal, labelColumns, read });
    return read;
  }
}

/** Largest local data file whose labels the editor reads (the whole file, synchronously, cached by stamp): 8 MiB. */
const LABEL_EDITOR_MAX_BYTES = 8 * 1024 * 1024;

/** The labels of each requested column that could be read. */
function labelsOf(req: HeaderRequest, read: (column: string) => string[] | undefined): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const c of req.labelColumns ?? []) {
    const l = read(c);
    if (l) out[c] = l;
  }
  return out;
}

/** The data file's uri: relative paths against the spec's folder; untitled specs have none. */
export function resolveDataUri(specUri: vscode.Uri, path: string): vscode.Uri | undefined {
  if (specUri.scheme === 'untitled') return undefined;
  if (/^([A-Za-z]:[\\/]|\/)/.test(path)) return specUri.scheme === 'file' ? vscode.Uri.file(path) : specUri.with({ path });
  return vscode.Uri.joinPath(specUri, '..', path.replace(/\\/g, '/'));
}
