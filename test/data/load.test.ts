import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { headerLookup, readHeaderFile, readHeaderText } from '../../engine/data/header';
import { loadDataFile } from '../../engine/data/load';

const dir = mkdtempSync(join(tmpdir(), 'lw-data-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('data/load loadDataFile', () => {
  it('loads a file and records the SHA-256 of its bytes without changing it', () => {
    const path = join(dir, 'a.csv');
    const bytes = Buffer.from('\uFEFFx;y\r\n1,5;2\r\n', 'utf8');
    writeFileSync(path, bytes);
    const r = loadDataFile(path, { decimal: ',' });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    // general-purpose check: node:crypto over the bytes read back independently
    expect(r.data.sha256).toBe(createHash('sha256').update(readFileSync(path)).digest('hex'));
    expect(r.data.bytes).toBe(bytes.length);
    expect(Array.from(r.data.table.columns[0].values)).toEqual([1.5]);
    expect(readFileSync(path).equals(bytes)).toBe(true);
  });

  it('returns a located error for a missing file', () => {
    const r = loadDataFile(join(dir, 'nope.csv'), { displayPath: 'nope.csv' });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors[0]).toMatchObject({ code: 'file_not_found', file: 'nope.csv' });
  });

  it('reports a folder as unreadable', () => {
    const r = loadDataFile(dir);
    expect(!r.ok && r.errors[0].code).toBe('file_unreadable');
  });

  it('uses an injected reader', () => {
    const r = loadDataFile('virtual.csv', { readFile: () => 'a\n4\n' });
    expect(r.ok && Array.from(r.data.table.columns[0].values)).toEqual([4]);
  });
});

describe('data/header readHeaderText / readHeaderFile', () => {
  it('reads only the header, with quotes and BOM', () => {
    expect(readHeaderText('\uFEFF"temp (°C)";"a;b"\n1;2\n')).toEqual({ headers: ['temp (°C)', 'a;b'], delimiter: ';' });
    expect(readHeaderText('')).toBeNull();
  });

  it('reads the header of a large file from its first bytes', () => {
    const path = join(dir, 'big.csv');
    writeFileSync(path, 'time,value\n' + '1,2\n'.repeat(50000));
    expect(readHeaderFile(path, { maxBytes: 1024 })?.headers).toEqual(['time', 'value']);
    expect(readHeaderFile(join(dir, 'missing.csv'))).toBeNull();
  });
});

describe('data/header headerLookup', () => {
  it('resolves data paths against the spec folder and answers undefined for missing files', () => {
    writeFileSync(join(dir, 'h.csv'), 'a;b;c\n1;2;3\n');
    const lookup = headerLookup(dir);
    expect(lookup('d', 'h.csv')).toEqual(['a', 'b', 'c']);
    expect(lookup('d', join(dir, 'h.csv'))).toEqual(['a', 'b', 'c']);
    expect(lookup('e', 'absent.csv')).toBeUndefined();
  });
});
