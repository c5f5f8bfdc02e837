/**
 * Fast path of CSV reading for the common plain file: no double quote
 * anywhere, LF or CRLF line ends used consistently, decimal point `.`, every
 * record as wide as the header (or wider by empty trailing fields). It scans
 * the decoded text once (as a typed array of its code units), reading numeric cells straight
 * into the columns' Float64Arrays: no per-row arrays, no per-cell strings or
 * regular expressions for plain numbers. Anything else gives `null`, and the
 * caller reads the whole file with papaparse instead (`csv.ts`), so the two
 * paths cannot disagree on what they both accept: a differential property
 * test (test/data/csv-scan.test.ts) checks that they give identical tables.
 *
 * Why a hand-written scanner (the project prefers papaparse): benchmark #5
 * (`node dist/bench.js --only 5`, 1e6 rows, 22.8 MB, each path timed side
 * by side in alternating rounds, medians of 7) measured parse only 6.5× and
 * 6.6× faster than papaparse (115-121 vs 17-18 MB/s) and the whole load
 * (read + SHA-256 + parse) 5.6× and 4.5× faster (76 vs 14, 43 vs 11 MB/s),
 * on a shared 2-core machine (load average 2.7-6.8): well over the 2× the
 * project asks before a hand parser replaces the library, with identical
 * results checked by the differential test.
 *
 * Numbers: a cell of the form [+-]digits[.digits][(e|E)[+-]digits] with at
 * most 15 significant digits whose decimal exponent e10 (after moving the
 * point to the end of the digits) has |e10| ≤ 22 is computed as the integer
 * M (< 10^15 < 2^53, exact in a double) times or divided by 10^|e10| (exact
 * in a double for |e10| ≤ 22): one IEEE-754 operation on exact operands, so
 * correctly rounded (W. D. Clinger, "How to read floating point numbers
 * accurately", Proc. ACM SIGPLAN PLDI 1990, pp. 92-101: the fast path).
 * Every other numeric-looking cell goes through `ColumnBuilder.push`, i.e.
 * the same `parseNumberCell` (`Number()`, correctly rounded by ECMA-262) the
 * papaparse path uses.
 */
import { ColumnBuilder } from './column-builder';
import type { DataColumn, Delimiter } from './types';

/** 10^0 … 10^22: every entry is exactly representable as a double (10^22 = 2^22 · 5^22, 5^22 < 2^53). */
const POW10 = [1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22];
/** Fast-path limits (Clinger 1990): significant digits ≤ 15 keeps M < 10^15 < 2^53; |e10| ≤ 22 keeps 10^|e10| exact. */
const MAX_DIGITS = 15;
const MAX_POW = 22;

const LF = 10;
const CR = 13;
const PLUS = 43;
const MINUS = 45;
const DOT = 46;
const ZERO = 48;
const NINE = 57;
const E_UPPER = 69;
const E_LOWER = 101;

export interface ScannedCsv {
  headers: string[];
  columns: DataColumn[];
  /** 1-based file line of each record. */
  lines: Int32Array;
  rowCount: number;
}

/**
 * Reads `body` (byte-order mark already removed) when it is a plain file as
 * described above, else returns null. Decimal mark is `.`.
 */
export function scanPlainCsv(body: string, delimiter: Delimiter): ScannedCsv | null {
  if (body.indexOf('"') !== -1) return null;
  const crlf = body.indexOf('\r') !== -1;
  const n = body.length;
  const D = delimiter.charCodeAt(0);

  // Header: the first record whose fields are not all blank.
  let pos = 0;
  let line = 1;
  let headers: string[] | null = null;
  while (pos < n && headers === null) {
    let end = body.indexOf('\n', pos);
    if (end === -1) end = n;
    const stop = crlf && end < n ? end - 1 : end;
    if (crlf && end < n && body.charCodeAt(stop) !== CR) return null;
    const text = body.slice(pos, stop);
    if (text.indexOf('\r') !== -1) return null;
    const fields = text.split(delimiter);
    if (!fields.every((f) => f.trim() === '')) headers = fields.map((f) => f.trim());
    pos = end + 1;
    line++;
  }
  if (headers === null) return null;
  const width = headers.length;
  const builders = headers.map((h) => new ColumnBuilder(h));
  const labels = headers.map(() => new LabelCache());
  const codes = charCodes(body);
  let lines = new Int32Array(1024);
  let rowCount = 0;

  while (pos < n) {
    let field = 0;
    let content = false;
    let c = 0;
    for (;;) {
      // One field, starting at pos; on exit p is at its terminator (delimiter, CR, LF) or n.
      const start = pos;
      let p = pos;
      c = p < n ? codes[p] : -1;
      let neg = false;
      if (c === MINUS || c === PLUS) {
        neg = c === MINUS;
        c = ++p < n ? codes[p] : -1;
      }
      let m = 0;
      let digits = 0; // significant digits (leading zeros not counted)
      let seen = 0; // all mantissa digits
      let frac = 0;
      while (c >= ZERO && c <= NINE) {
        if (m !== 0 || c !== ZERO) digits++;
        if (digits <= MAX_DIGITS) m = m * 10 + (c - ZERO);
        seen++;
        c = ++p < n ? codes[p] : -1;
      }
      if (c === DOT) {
        c = ++p < n ? codes[p] : -1;
        while (c >= ZERO && c <= NINE) {
          if (m !== 0 || c !== ZERO) digits++;
          if (digits <= MAX_DIGITS) m = m * 10 + (c - ZERO);
          seen++;
          frac++;
          c = ++p < n ? codes[p] : -1;
        }
      }
      let plain = seen > 0;
      let exp = 0;
      if (plain && (c === E_LOWER || c === E_UPPER)) {
        c = ++p < n ? codes[p] : -1;
        let expNeg = false;
        if (c === MINUS || c === PLUS) {
          expNeg = c === MINUS;
          c = ++p < n ? codes[p] : -1;
        }
        let expDigits = 0;
        while (c >= ZERO && c <= NINE) {
          if (exp < 100_000) exp = exp * 10 + (c - ZERO); // beyond this the fast path is out of reach anyway
          expDigits++;
          c = ++p < n ? codes[p] : -1;
        }
        if (expDigits === 0) plain = false;
        if (expNeg) exp = -exp;
      }
      const e10 = exp - frac;
      const atEnd = c === D || c === LF || c === CR || c === -1;
      if (plain && atEnd && digits <= MAX_DIGITS && e10 >= -MAX_POW && e10 <= MAX_POW) {
        // Clinger's fast path: one correctly rounded operation on exact operands.
        let x = e10 >= 0 ? m * POW10[e10] : m / POW10[-e10];
        if (neg) x = -x;
        content = true;
        if (field < width) {
          const b = builders[field];
          if (b.text === null) b.pushNumber(x);
          else b.push(body.slice(start, p), '.');
        } else return null; // a non-empty field past the header's width: ragged row
      } else if (p === start && c !== D && isTextStart(c) && field < width) {
        // A cell starting with a printable ASCII character that no number or missing marker starts with is text.
        let hash = 0;
        while (!(c === D || c === LF || c === CR || c === -1)) {
          hash = (Math.imul(hash, 31) + c) | 0;
          c = ++p < n ? codes[p] : -1;
        }
        const last = codes[p - 1];
        content = true;
        if (last > 32 && last < 127) builders[field].pushText(labels[field].get(body, codes, start, p, hash));
        else builders[field].push(body.slice(start, p), '.'); // may end in white space: trim as usual
      } else {
        while (!(c === D || c === LF || c === CR || c === -1)) c = ++p < n ? codes[p] : -1;
        const cell = body.slice(start, p);
        const blank = cell.trim() === '';
        if (!blank) content = true;
        if (field < width) builders[field].push(cell, '.');
        else if (!blank) return null; // ragged row
      }
      field++;
      pos = p + 1;
      if (c === D) continue;
      if (c === CR) {
        if (pos >= n || codes[pos] !== LF) return null; // lone CR
        pos++;
      } else if (c === LF && crlf) return null; // LF without CR in a CRLF file
      break;
    }
    const used = field < width ? field : width;
    if (!content) {
      for (let j = 0; j < used; j++) builders[j].unpush(); // blank line: skipped
    } else {
      if (field < width) return null; // too few fields: ragged row
      if (rowCount === lines.length) {
        const grown = new Int32Array(lines.length * 2);
        grown.set(lines);
        lines = grown;
      }
      lines[rowCount++] = line;
    }
    line++;
  }
  return { headers, columns: builders.map((b) => b.finish()), lines: lines.slice(0, rowCount), rowCount };
}

/**
 * First character of a cell that makes it text for sure: printable ASCII
 * (33-126, so not white space that trimming would remove) other than the
 * characters a number (`+ - . 0-9`) or a missing marker (`n N`) starts with.
 */
function isTextStart(c: number): boolean {
  return c >= 33 && c <= 126 && !(c >= ZERO && c <= NINE) && c !== PLUS && c !== MINUS && c !== DOT && c !== 78 && c !== 110;
}

/**
 * Reuses one string per distinct label of a column (group labels repeat), so
 * a million rows do not allocate a million small strings. A hit is checked
 * character by character, so a hash collision only costs a new string.
 */
class LabelCache {
  private readonly map = new Map<number, string>();

  get(body: string, codes: CharCodes, start: number, end: number, hash: number): string {
    const known = this.map.get(hash);
    if (known !== undefined && known.length === end - start) {
      let same = true;
      for (let i = 0; i < known.length; i++) {
        if (known.charCodeAt(i) !== codes[start + i]) {
          same = false;
          break;
        }
      }
      if (same) return known;
    }
    const cell = body.slice(start, end);
    if (this.map.size < 4096) this.map.set(hash, cell);
    return cell;
  }
}

type CharCodes = Uint8Array | Uint16Array;

/**
 * The UTF-16 code units of `body` as a typed array (indexing a typed array is
 * cheaper than `charCodeAt` in the scan loop). ASCII text (UTF-8 length equal
 * to its length) uses its UTF-8 bytes, which are then its code units; other
 * text is copied unit by unit. TextEncoder, not Buffer: no Node-only globals here.
 */
function charCodes(body: string): CharCodes {
  const bytes = new TextEncoder().encode(body);
  if (bytes.length === body.length) return bytes;
  const units = new Uint16Array(body.length);
  for (let i = 0; i < units.length; i++) units[i] = body.charCodeAt(i);
  return units;
}
