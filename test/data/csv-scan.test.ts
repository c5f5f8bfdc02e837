import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseCsvText } from '../../engine/data/csv';
import { selectRows } from '../../engine/data/select';
import type { CsvResult, DataTable, Delimiter } from '../../engine/data/types';
import { papaRead, type OracleResult } from './papa-oracle';

/** Bit-exact comparison of the scanner's reading with papaparse's (Object.is per value: -0 and NaN count). */
function expectSameResult(ours: CsvResult, papa: OracleResult): void {
  expect(ours.ok).toBe(papa.ok);
  if (!ours.ok || !papa.ok) {
    // messages differ by design; the kinds of error and their lines must not
    if (!ours.ok && !papa.ok) expect(ours.errors.map((e) => [e.code, e.row])).toEqual(papa.errors.map((e) => [e.code, e.row]));
    return;
  }
  const a = ours.table;
  const b = papa.table;
  expect(a.headers).toEqual(b.headers);
  expect(a.delimiter).toBe(b.delimiter);
  expect(Array.from(a.lines)).toEqual(b.lines);
  expect(a.rowCount).toBe(b.lines.length);
  expect(a.columns.length).toBe(b.columns.length);
  for (let j = 0; j < a.columns.length; j++) {
    const ca = a.columns[j];
    const cb = b.columns[j];
    expect(ca.name).toBe(cb.name);
    expect(ca.nonNumeric).toBe(cb.nonNumeric);
    expect(ca.text).toEqual(cb.text);
    expect(ca.values.length).toBe(cb.values.length);
    const differing = Array.from(ca.values).findIndex((v, i) => !Object.is(v, cb.values[i]));
    expect(differing, `column ${ca.name}: ${ca.values[differing]} vs ${cb.values[differing]}`).toBe(-1);
  }
  // what a fit sees: kept rows, their lines, dropped counts and cell errors
  const numeric = a.headers.filter((h, i) => h !== '' && a.headers.indexOf(h) === i);
  const asTable = (t: typeof b): DataTable => ({ ...t, decimal: a.decimal, lines: Int32Array.from(t.lines), rowCount: t.lines.length, headerLine: a.headerLine, cellLines: a.cellLines });
  const sa = selectRows(a, { numeric, file: 'd.csv' });
  const sb = selectRows(asTable(b), { numeric, file: 'd.csv' });
  expect(sa).toEqual(sb);
}

const digits = (min: number, max: number) => fc.stringMatching(new RegExp(`^[0-9]{${min},${max}}$`));
/** Plain decimals in every spelling the cell grammar allows, and a few it does not. */
const numberCell = fc.oneof(
  fc.integer({ min: -1e6, max: 1e6 }).map(String),
  fc.double({ noNaN: true, noDefaultInfinity: true }).map(String),
  fc.double({ min: -1e6, max: 1e6, noNaN: true }).map((x) => x.toFixed(4)),
  fc.double({ noNaN: true, noDefaultInfinity: true }).map((x) => x.toExponential(6)),
  fc
    .tuple(fc.constantFrom('', '+', '-'), digits(0, 20), fc.constantFrom('', '.'), digits(0, 20), fc.constantFrom('', 'e', 'E'), fc.constantFrom('', '+', '-'), digits(0, 3))
    .map(([s, i, d, f, e, es, x]) => s + i + d + f + (e ? e + es + x : '')),
  fc.constantFrom('-0', '0.0', '1e22', '1e23', '9007199254740993', '123456789012345e-22', '0.1', '1e999', '-1e-400', '0e500', '.5', '5.', '.', '-', 'e5', '1e', '1.5e+', '00012.5000'),
);
const missingCell = fc.constantFrom('', 'NA', 'na', 'N/A', 'NaN', 'nan', ' ', '  NA ');
const textCell = fc.constantFrom('S01', 'alpha', 'x y', 'kiln-3', 'n', 'None', 'Ω2', ' S01 ', 'S01 ', '#7', '1,5', '12 kg', 'inf');
const cell = fc.oneof({ arbitrary: numberCell, weight: 6 }, { arbitrary: missingCell, weight: 2 }, { arbitrary: textCell, weight: 1 }, { arbitrary: numberCell.map((s) => ` ${s}\t`), weight: 1 });

interface Shape {
  delimiter: Delimiter;
  eol: '\n' | '\r\n';
  bom: boolean;
  trailing: boolean;
  header: string[];
  rows: string[][];
  blankAt: number[];
}

const shape: fc.Arbitrary<Shape> = fc.integer({ min: 1, max: 5 }).chain((width) =>
  fc.record({
    delimiter: fc.constantFrom<Delimiter>(',', ';', '\t'),
    eol: fc.constantFrom<'\n' | '\r\n'>('\n', '\r\n'),
    bom: fc.boolean(),
    trailing: fc.boolean(),
    header: fc.uniqueArray(fc.stringMatching(/^[a-z][a-z0-9_]{0,5}$/), { minLength: width, maxLength: width }),
    rows: fc.array(fc.array(cell, { minLength: width, maxLength: width }), { maxLength: 25 }),
    blankAt: fc.array(fc.nat(30), { maxLength: 3 }),
  }),
);

function render(s: Shape): string {
  const lines = [s.header.join(s.delimiter), ...s.rows.map((r) => r.join(s.delimiter))];
  for (const k of s.blankAt) lines.splice(Math.min(k, lines.length), 0, k % 2 === 0 ? '' : s.delimiter.repeat(s.header.length - 1));
  return (s.bom ? '\uFEFF' : '') + lines.join(s.eol) + (s.trailing ? s.eol : '');
}

/** Cells only: a cell using the delimiter would split, which is a different table, not a fast-path question. */
function clean(s: Shape): Shape {
  const bad = (c: string) => c.includes(s.delimiter);
  return { ...s, rows: s.rows.map((r) => r.map((c) => (bad(c) ? '1' : c))) };
}

describe('data/csv-scan CsvScanner against papaparse (differential)', () => {
  it('plain files: identical table, rows, drops and cell errors', () => {
    fc.assert(
      fc.property(shape.map(clean), (s) => {
        const text = render(s);
        expectSameResult(parseCsvText(text, { delimiter: s.delimiter }), papaRead(text, { delimiter: s.delimiter }));
        expectSameResult(parseCsvText(text), papaRead(text));
      }),
      { numRuns: 400 },
    );
  });

  it('quoted cells, ragged rows and decimal comma read the same as papaparse (one line-end style per file)', () => {
    const disrupt = fc.constantFrom('quote', 'quoteAll', 'short', 'long', 'longEmpty', 'comma', 'quotedBreak');
    fc.assert(
      fc.property(shape.map(clean), disrupt, fc.nat(), (s, how, at) => {
        let text = render(s);
        const k = s.rows.length > 0 ? at % s.rows.length : 0;
        const options = how === 'comma' ? { decimal: ',' as const } : {};
        if (s.rows.length > 0) {
          const r = s.rows[k];
          if (how === 'quote') r[0] = `"${r[0]}"`;
          if (how === 'quoteAll') s.rows = s.rows.map((row) => row.map((c) => `"${c.replace(/"/g, '""')}"`));
          if (how === 'quotedBreak') r[0] = `"a${s.eol}b ""q"""`;
          if (how === 'short' && r.length > 1) r.pop();
          if (how === 'long') r.push('7');
          if (how === 'longEmpty') r.push(' ');
          text = render(s);
        }
        expectSameResult(parseCsvText(text, options), papaRead(text, options));
      }),
      { numRuns: 400 },
    );
  });

  it('Clinger fast path: plain decimals with ≤ 15 significant digits read exactly as Number() does', () => {
    // general-purpose computation: ECMA-262 Number() (correctly rounded decimal conversion)
    const plainDecimal = fc
      .tuple(fc.constantFrom('', '-', '+'), digits(1, 15), fc.integer({ min: 0, max: 15 }), fc.integer({ min: -30, max: 30 }))
      .map(([s, d, point, e]) => {
        const p = Math.min(point, d.length);
        return `${s}${d.slice(0, d.length - p)}.${d.slice(d.length - p)}e${e}`;
      });
    fc.assert(
      fc.property(fc.array(plainDecimal, { minLength: 1, maxLength: 20 }), (cells) => {
        const t = parseCsvText(`x\n${cells.join('\n')}\n`);
        expect(t.ok).toBe(true);
        if (!t.ok) return;
        const got = Array.from(t.table.columns[0].values);
        const want = cells.map((c) => Number(c));
        expect(got.every((v, i) => Object.is(v, want[i]))).toBe(true);
      }),
      { numRuns: 300 },
    );
  });

  it('reads the edge spellings like the cell grammar does', () => {
    const t = parseCsvText('x\n-0\n1e22\n1e23\n9007199254740993\n0.1\n5.\n.5\n1e999\n0e500\n');
    if (!t.ok) throw new Error('not read');
    const x = t.table.columns[0];
    // from memory / ECMA-262 Number(): 2^53 + 1 rounds to even, 1e23 is not exactly representable
    expect(Object.is(x.values[0], -0)).toBe(true);
    expect(x.values[1]).toBe(1e22);
    expect(x.values[2]).toBe(Number('1e23'));
    expect(x.values[3]).toBe(9007199254740992);
    expect(x.values[4]).toBe(0.1);
    expect(Array.from(x.values.slice(5, 7))).toEqual([5, 0.5]);
    // 1e999 overflows: text, as in parseNumberCell
    expect(x.values[7]).toBeNaN();
    expect(x.nonNumeric).toBe(1);
    expect(x.values[8]).toBe(0);
  });

  it('reads numbers beyond the fast path (17 digits, large exponents) exactly as Number() does', () => {
    // general-purpose computation: ECMA-262 Number()
    const cells = ['0.30000000000000004', '1.7976931348623157e308', '4.9e-324', '123456789012345678', '2.5e-300', '-9.999999999999999e22'];
    const t = parseCsvText(`x\n${cells.join('\n')}\n`);
    if (!t.ok) throw new Error('not read');
    expect(Array.from(t.table.columns[0].values)).toEqual(cells.map(Number));
    expect(t.table.columns[0].text).toBeNull();
  });
});
