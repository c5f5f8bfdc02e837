/**
 * Loading the data sources a run needs, each file once, read-only, with its
 * SHA-256 and row count for provenance. Paths are relative to the spec's folder.
 */
import { isAbsolute, resolve } from 'node:path';
import type { DataSource } from '../../parser/plan';
import { loadDataFile, type DataTable, type FileReader } from '../data';
import type { Provenance, RunError } from '../result';
import { dataErrorToRunError } from './fit-data';

export interface LoadedSource {
  source: DataSource;
  table: DataTable;
}

export interface LoadedSources {
  tables: Map<string, LoadedSource>;
  provenance: Provenance['data'];
  errors: RunError[];
  /** Sources that failed to load (their fits are skipped). */
  failed: Set<string>;
}

export function loadSources(sources: readonly DataSource[], baseDir: string, readFile?: FileReader): LoadedSources {
  const out: LoadedSources = { tables: new Map(), provenance: [], errors: [], failed: new Set() };
  for (const source of sources) {
    const path = isAbsolute(source.path) ? source.path : resolve(baseDir, source.path);
    const loaded = loadDataFile(path, {
      displayPath: source.path,
      readFile,
      ...(source.delimiter !== undefined ? { delimiter: source.delimiter } : {}),
      ...(source.decimal !== undefined ? { decimal: source.decimal } : {}),
    });
    if (!loaded.ok) {
      out.failed.add(source.name);
      // file-level errors point at the data statement; cell errors also carry the file line
      for (const e of loaded.errors) out.errors.push(dataErrorToRunError(e, source.range));
      continue;
    }
    out.tables.set(source.name, { source, table: loaded.data.table });
    out.provenance.push({ name: source.name, path: source.path, sha256: loaded.data.sha256, rows: loaded.data.table.rowCount });
  }
  return out;
}
