import { createHash } from 'node:crypto';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { readHeaderFile, readHeaderText } from '../../engine/data/header';
import { loadDataFile } from '../../engine/data/load';
import { parseCsvBytes } from '../../engine/data/csv';

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
    // the hash covers the UTF-8 bytes of the text
    expect(r.ok && r.data.sha256).toBe(createHash('sha256').update('a\n4\n').digest('hex'));
  });

  it('streams a file in small chunks: same table, same SHA-256 as one read', () => {
    const path = join(dir, 'chunks.csv');
    const rows = Array.from({ length: 3000 }, (_, i) => `S${i % 7},"t ${i}\r\nΩ",${i * 0.25}`).join('\r\n');
    writeFileSync(path, `\uFEFFsite,note,value\r\n${rows}\r\n`);
    const small = loadDataFile(path, { chunkSize: 7 });
    const whole = loadDataFile(path);
    expect(small.ok && whole.ok).toBe(true);
    if (!small.ok || !whole.ok) return;
    expect(small.data.sha256).toBe(createHash('sha256').update(readFileSync(path)).digest('hex'));
    expect(small.data.sha256).toBe(whole.data.sha256);
    expect(small.data.bytes).toBe(readFileSync(path).length);
    expect(Array.from(small.data.table.columns[2].values)).toEqual(Array.from(whole.data.table.columns[2].values));
    expect(small.data.table.columns[1].text).toEqual(whole.data.table.columns[1].text);
    expect(small.data.table.lines[2999]).toBe(2 + 2 * 2999);
    // columns reserved from the file size (loadDataFile) hold the same as columns grown in blocks (no size known)
    const blocks = parseCsvBytes(readFileSync(path));
    expect(blocks.ok).toBe(true);
    if (!blocks.ok) return;
    expect(Array.from(blocks.table.columns[2].values)).toEqual(Array.from(small.data.table.columns[2].values));
    expect(Array.from(blocks.table.lines)).toEqual(Array.from(small.data.table.lines));
    expect(small.data.table.columns[2].values.buffer.byteLength).toBeLessThan(1.1 * 3000 * 8);
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
