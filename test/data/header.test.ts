import fc from 'fast-check';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { parseCsvText } from '../../engine/data/csv';
import { detectDelimiter } from '../../engine/data/delimiter';
import { HEADER_MAX_BYTES, headerLookup, readHeader, readHeaderFile, readHeaderText } from '../../engine/data/header';

const dir = mkdtempSync(join(tmpdir(), 'lw-header-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('data/header readHeader', () => {
  it('honours the delimiter and decimal options (detection alone picks the comma here)', () => {
    const path = join(dir, 'semi.csv');
    writeFileSync(path, 'temp, degC, raw;time\n20,5;1\n');
    expect(readHeaderFile(path)?.headers).toEqual(['temp', 'degC', 'raw;time']);
    expect(readHeaderFile(path, { delimiter: ';' })?.headers).toEqual(['temp, degC, raw', 'time']);
    // with a decimal comma the comma is no candidate, so detection finds the semicolon
    expect(readHeaderFile(path, { decimal: ',' })).toEqual({ headers: ['temp, degC, raw', 'time'], delimiter: ';' });
  });

  it('reads a header of 100,000 columns whole, in 4 kB reads', () => {
    const path = join(dir, 'wide.csv');
    const names = Array.from({ length: 100_000 }, (_, j) => `column_${j}`);
    writeFileSync(path, `${names.join(',')}\r\n1,2\r\n`);
    const r = readHeader(path, { chunkSize: 4096 });
    expect(r.ok && r.info.headers.length).toBe(100_000);
    expect(r.ok && r.info.headers[99_999]).toBe('column_99999');
  });

  it('reads quoted names with line breaks, CR-only files and a BOM', () => {
    expect(readHeaderText('\uFEFF"temp\r(°C)";"a;b"\r1;2\r')).toEqual({ headers: ['temp\r(°C)', 'a;b'], delimiter: ';' });
    expect(readHeaderText('\r\n\r\nx\ty\r\n')).toEqual({ headers: ['x', 'y'], delimiter: '\t' });
    expect(readHeaderText('')).toBeNull();
  });

  it('says a header is too long instead of cutting it, and names missing files', () => {
    const path = join(dir, 'long.csv');
    writeFileSync(path, `x,${'y'.repeat(5000)}\n1,2\n`);
    const r = readHeader(path, { maxBytes: 4096, displayPath: 'long.csv' });
    expect(r).toEqual({ ok: false, reason: 'too_long', message: 'the header of long.csv does not end within its first 0.00390625 MiB; its columns are not checked (a header longer than that is taken as a broken file)' });
    expect(readHeader(path, { maxBytes: 8192 }).ok).toBe(true);
    expect(readHeader(join(dir, 'none.csv'), { displayPath: 'none.csv' })).toMatchObject({ ok: false, reason: 'unreadable', message: 'data file not found: none.csv' });
    expect(readHeader(dir)).toMatchObject({ ok: false, reason: 'unreadable' });
    expect(HEADER_MAX_BYTES).toBe(16 * 1024 * 1024);
  });

  it('headerLookup passes the options and caches per option set', () => {
    writeFileSync(join(dir, 'h.csv'), 'a,b,c;d\n1,2,3;4\n');
    const lookup = headerLookup(dir);
    expect(lookup('d', 'h.csv')).toEqual(['a', 'b', 'c;d']);
    expect(lookup('d', 'h.csv', { delimiter: ';' })).toEqual(['a,b,c', 'd']);
    expect(lookup('d', 'h.csv')).toEqual(['a', 'b', 'c;d']);
  });
});

describe('data/delimiter detectDelimiter and the scanner agree', () => {
  it('on random first lines (quotes, blank lines, every candidate)', () => {
    const piece = fc.constantFrom(',', ';', '\t', ' ', '"', '""', 'a', 'Ω', '\n', '\r\n', '\r', '1,5');
    fc.assert(
      fc.property(fc.array(piece, { maxLength: 20 }), fc.constantFrom<'.' | ','>('.', ','), (parts, decimal) => {
        const text = parts.join('') + '\nq\n';
        const r = parseCsvText(text, { decimal });
        // the scanner's pick is what the table says; unclosed quotes are errors, with no table to compare
        if (r.ok) expect(r.table.delimiter).toBe(detectDelimiter(text, decimal));
      }),
      { numRuns: 500 },
    );
  });
});
