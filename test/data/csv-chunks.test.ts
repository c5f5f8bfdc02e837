import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { bytesSource, readCsv, type ByteSource } from '../../engine/data/csv';
import type { CsvResult, Delimiter } from '../../engine/data/types';

/** A source that hands out the bytes in pieces of the given sizes (cycled): short reads at arbitrary places. */
function piecesSource(bytes: Uint8Array, sizes: number[]): ByteSource {
  let at = 0;
  let k = 0;
  return (buf, offset, length) => {
    const want = Math.min(length, sizes[k++ % sizes.length], bytes.length - at);
    buf.set(bytes.subarray(at, at + want), offset);
    at += want;
    return want;
  };
}

function expectSame(a: CsvResult, b: CsvResult): void {
  expect(a.ok).toBe(b.ok);
  if (!a.ok || !b.ok) {
    expect(a).toEqual(b);
    return;
  }
  const s = a.table;
  const t = b.table;
  expect(s.headers).toEqual(t.headers);
  expect(s.delimiter).toBe(t.delimiter);
  expect(s.headerLine).toBe(t.headerLine);
  expect(Array.from(s.lines)).toEqual(Array.from(t.lines));
  expect(s.rowCount).toBe(t.rowCount);
  expect([...s.cellLines].map(([r, l]) => [r, Array.from(l)])).toEqual([...t.cellLines].map(([r, l]) => [r, Array.from(l)]));
  for (let j = 0; j < s.columns.length; j++) {
    expect(s.columns[j].text).toEqual(t.columns[j].text);
    expect(s.columns[j].nonNumeric).toBe(t.columns[j].nonNumeric);
    const va = Array.from(s.columns[j].values);
    const vb = Array.from(t.columns[j].values);
    expect(va.length).toBe(vb.length);
    expect(va.findIndex((v, i) => !Object.is(v, vb[i]))).toBe(-1);
  }
}

const eol = fc.constantFrom('\n', '\r\n', '\r');
/** Cells whose bytes stress the cuts: multi-byte UTF-8 (2, 3 and 4 bytes), quotes with line breaks and doubled quotes, numbers of every path. */
const cell = fc.oneof(
  fc.constantFrom('1', '-2.5', '3e-7', '0.30000000000000004', '1e999', '', 'NA', ' 4 ', 'S01', 'kiln-3'),
  fc.constantFrom('Ω', 'temp °C', '温度', 'µ𝛼🙂', 'é,'.slice(0, 1), 'Ωmega 2'),
  fc.tuple(fc.constantFrom('a', '1.5', 'Ω', '🙂'), eol, fc.constantFrom('', 'b', '""', 'x""y')).map(([a, e, b]) => `"${a}${e}${b}"`),
  fc.constantFrom('"7"', '""', '" 8 "', '"a,b"', '"a;b"', '"ta\tb"'),
);
const broken = fc.constantFrom('none', 'none', 'none', 'short', 'long', 'unclosed', 'afterQuote');

interface File {
  delimiter: Delimiter;
  bom: boolean;
  width: number;
  rows: string[][];
  ends: string[];
  trailing: boolean;
  breakAt: number;
  how: string;
}

const fileArb: fc.Arbitrary<File> = fc.integer({ min: 1, max: 4 }).chain((width) =>
  fc.record({
    delimiter: fc.constantFrom<Delimiter>(',', ';', '\t'),
    bom: fc.boolean(),
    width: fc.constant(width),
    rows: fc.array(fc.array(cell, { minLength: width, maxLength: width }), { maxLength: 12 }),
    ends: fc.array(eol, { minLength: 14, maxLength: 14 }),
    trailing: fc.boolean(),
    breakAt: fc.nat(),
    how: broken,
  }),
);

function render(f: File): string {
  const header = Array.from({ length: f.width }, (_, j) => (j === 0 ? 'é_x' : `c${j}`));
  const rows = f.rows.map((r) => [...r]);
  if (rows.length > 0 && f.how !== 'none') {
    const r = rows[f.breakAt % rows.length];
    if (f.how === 'short') r.length = Math.max(0, r.length - 1);
    if (f.how === 'long') r.push('9');
    if (f.how === 'unclosed') r[0] = `"open${f.ends[0]}x`;
    if (f.how === 'afterQuote') r[0] = '"q"z';
  }
  const lines = [header, ...rows].map((r) => r.map((c) => (c.includes(f.delimiter) && !c.startsWith('"') ? '5' : c)).join(f.delimiter));
  let text = f.bom ? '\uFEFF' : '';
  lines.forEach((l, i) => (text += l + (i < lines.length - 1 || f.trailing ? f.ends[i % f.ends.length] : '')));
  return text;
}

describe('data/csv readCsv in chunks', () => {
  it('gives the same table or errors for every way of cutting the bytes (multi-byte characters, quotes, CR LF and the BOM cut)', () => {
    fc.assert(
      fc.property(fileArb, fc.array(fc.integer({ min: 1, max: 23 }), { minLength: 1, maxLength: 8 }), fc.integer({ min: 1, max: 40 }), (f, sizes, chunkSize) => {
        const bytes = new TextEncoder().encode(render(f));
        const whole = readCsv(bytesSource(bytes), { delimiter: f.delimiter });
        const cut = readCsv(piecesSource(bytes, sizes), { delimiter: f.delimiter, chunkSize });
        const { bytes: n1, ...a } = whole;
        const { bytes: n2, ...b } = cut;
        expect(n1).toBe(bytes.length);
        expect(n2).toBe(bytes.length);
        expectSame(b, a);
        // detection from a cut header gives the same delimiter
        const detected = readCsv(piecesSource(bytes, sizes), { chunkSize });
        const { bytes: _n, ...d } = detected;
        const { bytes: _m, ...e } = readCsv(bytesSource(bytes));
        expectSame(d, e);
      }),
      { numRuns: 500 },
    );
  });

  it('splits every byte of a file with all the hard cases one by one', () => {
    const text = '\uFEFFname;Ω value\r\n"a\r\nb";1,5\r"x""y";🙂\n温度;"2\r3"\r\n';
    const bytes = new TextEncoder().encode(text);
    const whole = readCsv(bytesSource(bytes));
    const oneByOne = readCsv(piecesSource(bytes, [1]), { chunkSize: 1 });
    expectSame(oneByOne, whole);
    expect(whole.ok).toBe(true);
    if (!whole.ok) return;
    expect(whole.table.headers).toEqual(['name', 'Ω value']);
    expect(whole.table.columns[0].text).toEqual(['a\r\nb', 'x"y', '温度']);
    expect(whole.table.columns[1].text).toEqual(['1,5', '🙂', '2\r3']);
    // records start on lines 2, 4 and 5 (a quoted CRLF and a lone CR are one line break each)
    expect(Array.from(whole.table.lines)).toEqual([2, 4, 5]);
  });

  it('grows its buffer for a record longer than the chunk (a 300 kB quoted cell read in 1 kB chunks)', () => {
    const long = 'ab\n'.repeat(100_000) + 'end';
    const text = `x,note\n1,"${long}"\n2,z\n`;
    const r = readCsv(bytesSource(new TextEncoder().encode(text)), { chunkSize: 1024 });
    expect(r.ok).toBe(true);
    if (!r.ok) return;
    expect(r.table.columns[1].text?.[0]).toBe(long);
    expect(Array.from(r.table.lines)).toEqual([2, 100_003]);
  });
});
