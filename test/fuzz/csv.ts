/**
 * CSV cases for the fuzzer: files with quotes (doubled, unclosed, around
 * delimiters and line breaks), a byte-order mark, CR, LF and CRLF line ends
 * and mixes of them, ragged rows, junk bytes, missing and odd number
 * formats, decimal commas, semicolon and tab delimiters, duplicate or empty
 * header names, wide and tall files, each with a spec that fits two of its
 * columns.
 */
import { Rand } from './random';
import type { SpecCase } from './specs';

export interface CsvSizes {
  maxRows: number;
  maxColumns: number;
}
export const CSV_SMALL: CsvSizes = { maxRows: 2000, maxColumns: 200 };
export const CSV_FULL: CsvSizes = { maxRows: 100_000, maxColumns: 3000 };

function cellText(r: Rand, i: number, k: number, delim: string): string {
  return r.weighted<() => string>([
    [30, () => (k === 0 ? String(i) : (1 + 0.5 * i + 0.1 * ((i * 7 + k) % 5)).toPrecision(r.int(2, 10)))],
    [2, () => r.pick(['', 'NA', 'na', 'NaN', 'nan', '-', 'null', ' '])],
    [2, () => r.pick(['1e5', '-0', '.5', '5.', '+3', '1E-3', '0x1F', 'inf', '-Infinity', '1,5', '1.5.2', '1 000', '١٢', '½', '1e999'])],
    [2, () => `"${r.number()}"`],
    [1, () => `"a${delim}b"`],
    [1, () => `"line\nbreak"`],
    [1, () => `"cr\rbreak"`],
    [1, () => `"say ""hi"""`],
    [1, () => `"unclosed`],
    [1, () => `in"side`],
    [1, () => r.bytes(r.int(1, 6)).replace(/[\r\n]/g, '')],
    [1, () => r.oddChar()],
  ])();
}

function headerName(r: Rand, k: number): string {
  return r.weighted<() => string>([
    [20, () => ['x', 'y', 'z', 'sd', 'grp'][k] ?? `c${k}`],
    [1, () => ''],
    [1, () => 'x'],
    [1, () => `"quoted ${k}"`],
    [1, () => `"multi\nline"`],
    [1, () => `  spaced  `],
    [1, () => r.oddChar() + k],
    [1, () => r.pick(['constructor', '__proto__', 'then', 'a.b', 'a\\b', '${x}'])],
  ])();
}

/** One CSV case: the file and a spec fitting y against x (or its first two columns). */
export function csvCase(r: Rand, sizes: CsvSizes): SpecCase {
  const delim = r.weighted<string>([[8, ','], [2, ';'], [1, '\t'], [1, '|']]);
  const wide = r.chance(0.05);
  const tall = !wide && r.chance(0.05);
  const nCols = wide ? r.logInt(50, sizes.maxColumns) : r.int(1, 6);
  // at most about 2·10⁶ cells: a campaign case must stay within its time budget
  const nRows = Math.min(tall ? r.logInt(1000, sizes.maxRows) : r.logInt(0, wide ? 400 : 80), Math.floor(2e6 / nCols));
  const eol = (): string => r.weighted<string>([[20, '\n'], [4, '\r\n'], [1, '\r']]);
  const mixed = r.chance(0.1);
  const lineEnd = mixed ? eol : ((e) => () => e)(eol());
  const header = Array.from({ length: nCols }, (_, k) => headerName(r, k));
  const clean = r.chance(tall || wide ? 0.8 : 0.35);
  const parts: string[] = [];
  if (r.chance(0.1)) parts.push('\ufeff');
  if (r.chance(0.03)) parts.push(r.bytes(r.int(1, 40)));
  parts.push(header.join(delim), lineEnd());
  for (let i = 0; i < nRows; i++) {
    let width = nCols;
    if (!clean && r.chance(0.05)) width = Math.max(0, nCols + r.pick([-2, -1, 1, 3]));
    const cells: string[] = [];
    for (let k = 0; k < width; k++) cells.push(clean ? (k === 0 ? String(i) : k === 4 ? (i % 3 ? 'A' : 'B') : (1 + 0.5 * i + 0.1 * ((i * 7 + k) % 5)).toPrecision(8)) : cellText(r, i, k, delim));
    parts.push(cells.join(delim));
    if (i < nRows - 1 || r.chance(0.8)) parts.push(lineEnd());
    if (!clean && r.chance(0.01)) parts.push(r.pick(['', '\n', '# comment\n', r.bytes(r.int(1, 10))]));
  }
  const csv = parts.join('');
  const options = [delim === ';' && r.chance(0.7) ? 'delimiter ";"' : '', delim === '\t' && r.chance(0.7) ? 'delimiter "tab"' : '', r.chance(0.05) ? 'decimal ","' : ''].filter(Boolean).join(' ');
  const quoted = (n: string) => `"${n}"`;
  const usable = header.filter((h) => h.length > 0 && !/["\r\n]/.test(h));
  const xName = usable.includes('x') ? 'x' : usable[0] ?? 'x';
  const yName = usable.includes('y') ? 'y' : usable.find((h) => h !== xName) ?? 'y';
  const per = usable.includes('grp') && r.chance(0.2) ? '  per grp\n' : '';
  const spec = `data d = "d.csv"${options ? ' ' + options : ''}\nfit f on d {\n  model ${quoted(yName)} = a + b * ${quoted(xName)}\n  param a\n  param b\n${per}}\n${r.chance(0.3) ? `predict f at ${quoted(xName)} = 1, 2\n` : ''}`;
  return { shape: wide ? 'wide' : tall ? 'tall' : clean ? 'clean' : 'messy', spec, files: [{ name: 'd.csv', text: csv }] };
}
