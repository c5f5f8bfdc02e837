import { describe, expect, it } from 'vitest';
import { parseCsvText } from '../../engine/data/csv';
import type { DataTable } from '../../engine/data/types';

function table(text: string, options = {}): DataTable {
  const r = parseCsvText(text, options);
  if (!r.ok) throw new Error(JSON.stringify(r.errors));
  return r.table;
}
const col = (t: DataTable, name: string) => Array.from(t.columns.find((c) => c.name === name)!.values);

describe('data/csv parseCsvText (RFC 4180)', () => {
  it('reads a header and numeric columns into Float64Arrays', () => {
    const t = table('x,y\n1,2\n3,4.5\n');
    expect(t.headers).toEqual(['x', 'y']);
    expect(t.columns[0].values).toBeInstanceOf(Float64Array);
    expect(col(t, 'x')).toEqual([1, 3]);
    expect(col(t, 'y')).toEqual([2, 4.5]);
    expect(Array.from(t.lines)).toEqual([2, 3]);
    expect(t.rowCount).toBe(2);
  });

  it('RFC 4180 §2.1/2.2: last record with or without a trailing line break', () => {
    expect(col(table('x\n1\n2'), 'x')).toEqual([1, 2]);
    expect(col(table('x\n1\n2\n'), 'x')).toEqual([1, 2]);
  });

  it('RFC 4180 §2.5: quoted fields, including quoted numbers', () => {
    const t = table('"x","y"\n"1","2"\n');
    expect(t.headers).toEqual(['x', 'y']);
    expect(col(t, 'y')).toEqual([2]);
  });

  it('RFC 4180 §2.6: embedded commas and line breaks inside quotes', () => {
    const t = table('label,y\n"a, b",1\n"two\nlines",2\nc,3\n');
    const label = t.columns[0];
    expect(label.text).toEqual(['a, b', 'two\nlines', 'c']);
    expect(col(t, 'y')).toEqual([1, 2, 3]);
    // the record after the quoted line break starts on file line 5
    expect(Array.from(t.lines)).toEqual([2, 3, 5]);
  });

  it('RFC 4180 §2.7: doubled quotes inside a quoted field', () => {
    const t = table('name,y\n"the ""big"" one",7\n');
    expect(t.columns[0].text).toEqual(['the "big" one']);
    expect(col(t, 'y')).toEqual([7]);
  });

  it('CRLF line ends (RFC 4180 §2.1) give the same values and lines', () => {
    const t = table('x,y\r\n1,2\r\n3,4\r\n');
    expect(col(t, 'y')).toEqual([2, 4]);
    expect(Array.from(t.lines)).toEqual([2, 3]);
  });

  it('strips a UTF-8 byte-order mark from the first header name', () => {
    const t = table('\uFEFFtime,temp\n0,80\n');
    expect(t.headers).toEqual(['time', 'temp']);
  });

  it('reads semicolon-separated cells with a decimal comma', () => {
    const t = table('t;y\n0,5;1,25\n1;-2,5e1\n', { decimal: ',' });
    expect(t.delimiter).toBe(';');
    expect(col(t, 't')).toEqual([0.5, 1]);
    expect(col(t, 'y')).toEqual([1.25, -25]);
  });

  it('detects tab-separated files', () => {
    const t = table('a\tb\n1\t2\n');
    expect(t.delimiter).toBe('\t');
    expect(col(t, 'b')).toEqual([2]);
  });

  it('keeps unicode header names and trims spaces around them', () => {
    // RFC 4180 §2.4: spaces belong to the field, so the quote must open the field
    const t = table('"temp (°C)", y \n1,2\n');
    expect(t.headers).toEqual(['temp (°C)', 'y']);
  });

  it('marks missing cells NaN without making the column text', () => {
    const t = table('x,y\n1,\n2,NA\n3,NaN\n4,n/a\n5,6\n');
    const y = t.columns[1];
    expect(y.text).toBeNull();
    expect(y.nonNumeric).toBe(0);
    expect(Array.from(y.values).map((v) => Number.isNaN(v))).toEqual([true, true, true, true, false]);
  });

  it('keeps text for a column with non-numeric cells, counting them', () => {
    const t = table('g,y\n1,2\nA,3\n');
    expect(t.columns[0].nonNumeric).toBe(1);
    expect(t.columns[0].text).toEqual(['1', 'A']);
  });

  it('skips blank lines but keeps true file line numbers', () => {
    const t = table('x\n1\n\n2\n');
    expect(col(t, 'x')).toEqual([1, 2]);
    expect(Array.from(t.lines)).toEqual([2, 4]);
  });

  it('accepts trailing empty fields (a trailing delimiter)', () => {
    const t = table('x,y,\n1,2,\n');
    expect(col(t, 'y')).toEqual([2]);
  });

  it('grows columns past the initial capacity', () => {
    const rows = Array.from({ length: 1000 }, (_, i) => `${i},${2 * i}`).join('\n');
    const t = table(`x,y\n${rows}\n`);
    expect(t.rowCount).toBe(1000);
    expect(t.columns[1].values[999]).toBe(1998);
    expect(t.lines[999]).toBe(1001);
  });
});

describe('data/csv parseCsvText errors', () => {
  it('reports a ragged row with its line', () => {
    const r = parseCsvText('x,y\n1,2\n3\n', { file: 'd.csv' });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors[0]).toMatchObject({ code: 'ragged_row', file: 'd.csv', row: 3 });
  });

  it('reports an unterminated quote as a syntax error', () => {
    const r = parseCsvText('x,y\n1,"2\n', { file: 'd.csv' });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors[0].code).toBe('csv_syntax');
    expect(r.errors[0].row).toBe(2);
  });

  it('rejects an empty file and a comma used as both delimiter and decimal mark', () => {
    const e1 = parseCsvText('\uFEFF \n');
    expect(!e1.ok && e1.errors[0].code).toBe('empty_file');
    expect(!e1.ok && e1.errors[0].row).toBe(1);
    const e2 = parseCsvText('x\n1\n', { delimiter: ',', decimal: ',' });
    expect(!e2.ok && e2.errors[0].code).toBe('delimiter_conflict');
  });
});
