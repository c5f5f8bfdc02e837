/**
 * The CSV scanner: UTF-8 bytes → typed columns, fed in chunks of any size,
 * per RFC 4180 (quoted fields with embedded delimiters, doubled quotes and
 * line breaks) with CR, LF and CRLF line ends in any mix, a leading UTF-8
 * byte-order mark, a header record, delimiter detection and an optional
 * decimal comma. Pure (no file access): `csv.ts` drives it from text, bytes or
 * a file.
 *
 * Streaming: `scan(buf, n, final)` reads the complete records in buf[0, n)
 * and returns where the first incomplete one starts; the caller passes those
 * bytes again, followed by more. A record cut by the end of a chunk is taken
 * back cell by cell (`ColumnBuilder.unpush`), so what a file gives never
 * depends on how it was cut (property test in test/data/csv-chunks.test.ts).
 * Only ASCII bytes (delimiter, quote, CR, LF, digits) steer the scanner, and
 * UTF-8 never uses them inside a multi-byte character, so cutting through a
 * character is harmless; cell text is decoded from whole cells.
 *
 * Lines: every LF, every CRLF and every lone CR ends a line, inside quoted
 * cells too, so each record, cell and error knows its file line whatever the
 * line ends are. Columns in places are 1-based field numbers.
 *
 * Why a hand-written scanner (the project prefers libraries): papaparse, used
 * before, needs the whole file as one string (a file of 512 MiB or more does
 * not fit in one), guesses a single line-end style per file (so a file
 * mixing CRLF and LF was split wrongly), and reads 5-7× slower on benchmark
 * #5 (`node dist/bench.js --only 5`, side by side). papaparse stays the
 * oracle of the differential test (test/data/csv-scan.test.ts).
 *
 * Numbers: an unquoted cell of the form [+-]digits[.digits][(e|E)[+-]digits]
 * with at most 15 significant digits whose decimal exponent e10 (after moving
 * the point to the end of the digits) has |e10| ≤ 22 is computed as the
 * integer M (< 10^15 < 2^53, exact in a double) times or divided by 10^|e10|
 * (exact in a double for |e10| ≤ 22): one IEEE-754 operation on exact
 * operands, so correctly rounded (W. D. Clinger, "How to read floating point
 * numbers accurately", Proc. ACM SIGPLAN PLDI 1990, pp. 92-101: the fast
 * path). Other cells of that form go to `Number()` (correctly rounded by
 * ECMA-262), every other cell through `ColumnBuilder.push` (`parseNumberCell`).
 */
import { ColumnBuilder, LineList } from './column-builder';
import { delimiterName, pickDelimiter } from './delimiter';
import { dataPlace, dataText } from '../messages';
import type { DataColumn, DataError, DecimalMark, Delimiter } from './types';

/** 10^0 … 10^22: every entry is exactly representable as a double (10^22 = 2^22 · 5^22, 5^22 < 2^53). */
const POW10 = [1e0, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22];
/** Fast-path limits (Clinger 1990): significant digits ≤ 15 keeps M < 10^15 < 2^53; |e10| ≤ 22 keeps 10^|e10| exact. */
const MAX_DIGITS = 15;
const MAX_POW = 22;

const TAB = 9;
const LF = 10;
const CR = 13;
const SPACE = 32;
const QUOTE = 34;
const PLUS = 43;
const COMMA = 44;
const MINUS = 45;
const DOT = 46;
const SEMICOLON = 59;
const ZERO = 48;
const NINE = 57;
const E_UPPER = 69;
const E_LOWER = 101;

/** Rows read before the columns are reserved from the size estimate (ScannerOptions.sizeHint). */
const RESERVE_SAMPLE_ROWS = 1000;

/** `quoted()` results besides an end offset. */
const INCOMPLETE = -1;
const UNCLOSED = -2;

export interface ScannerOptions {
  /** Field delimiter; detected from the first line with content when absent (see `delimiter.ts`). */
  delimiter?: Delimiter;
  decimal: DecimalMark;
  /** File name in error places. */
  file: string;
  /** Stop after this many errors. */
  maxErrors: number;
  /** Stop after the header record (header reading for `check` and the editor). */
  headerOnly?: boolean;
  /** Total bytes of the input when known (a file's size): columns are then reserved for the rows it likely holds. */
  sizeHint?: number;
  /** Stop after this many data rows (a sample of the file's start: `readCsvHead`). */
  maxRows?: number;
}

export interface ScannedTable {
  headers: string[];
  headerLine: number;
  delimiter: Delimiter;
  columns: DataColumn[];
  lines: Int32Array;
  rowCount: number;
  cellLines: Map<number, Int32Array>;
}

const utf8 = new TextDecoder('utf-8', { ignoreBOM: true });

/** Text of buf[s, e) as UTF-8 (invalid bytes become U+FFFD, as in Buffer#toString). */
function decode(buf: Uint8Array, s: number, e: number): string {
  if (e - s <= 32) {
    let out = '';
    for (let i = s; i < e; i++) {
      const b = buf[i];
      if (b >= 0x80) return utf8.decode(buf.subarray(s, e));
      out += String.fromCharCode(b);
    }
    return out;
  }
  return utf8.decode(buf.subarray(s, e));
}

export class CsvScanner {
  /** File line of the next byte to read (1-based). */
  private line = 1;
  private bomChecked = false;
  private delimiter: Delimiter | null;
  private readonly decimalCode: number;
  private headers: string[] | null = null;
  private headerLine = 0;
  private builders: ColumnBuilder[] = [];
  private labels: LabelCache[] = [];
  private readonly lines = new LineList();
  private rowCount = 0;
  /** Field start lines of records that span several lines (a quoted line break), by row index. */
  private readonly cellLines = new Map<number, Int32Array>();
  private fieldLines = new Int32Array(0);
  /** A blank record with delimiters was skipped before any header. */
  private skippedDelimiters = false;
  readonly errors: DataError[] = [];
  /** The scan stopped at `maxRows` (rows may follow). */
  rowLimitReached = false;
  /** Nothing more to read: the header of a header-only scan, or too many errors. */
  done = false;
  /** Decoded content of the last quoted cell and the line breaks inside it (set by `quoted`). */
  private qText = '';
  private qLines = 0;
  /** Errors before the record being read: a record cut off takes its errors back too. */
  private errorMark = 0;
  /** Bytes consumed by earlier scans, and where the data records start (after the header). */
  private consumed = 0;
  private dataStart = -1;
  private reserved = false;

  constructor(private readonly options: ScannerOptions) {
    this.delimiter = options.delimiter ?? null;
    this.decimalCode = options.decimal === ',' ? COMMA : DOT;
  }

  /**
   * Reads the complete records of buf[0, n); `final` when no bytes follow.
   * Returns the offset of the first byte not consumed (the start of a record
   * cut off by the end of the chunk); with `final`, everything is consumed.
   */
  scan(buf: Uint8Array, n: number, final: boolean): number {
    const used = this.scanChunk(buf, n, final);
    if (this.dataStart < 0 && this.headers !== null) this.dataStart = this.consumed + this.headerEnd;
    this.consumed += used;
    if (!this.reserved && this.rowCount >= RESERVE_SAMPLE_ROWS) this.reserve();
    return used;
  }

  /** Where the header record ended in the chunk that held it. */
  private headerEnd = 0;

  /**
   * Reserves each column for the rows the input likely holds: its size over
   * the bytes per record so far, plus 2 % (once, after RESERVE_SAMPLE_ROWS
   * rows; see ColumnBuilder.reserve). An allocation that fails leaves the
   * columns in blocks.
   */
  private reserve(): void {
    this.reserved = true;
    const size = this.options.sizeHint;
    const perRow = (this.consumed - this.dataStart) / this.rowCount;
    if (!size || !(perRow > 0) || this.dataStart < 0) return;
    const rows = Math.ceil(((size - this.dataStart) / perRow) * 1.02) + 64;
    if (!(rows > this.rowCount) || rows > 2 ** 30) return;
    try {
      for (const b of this.builders) b.reserve(rows);
      this.lines.reserve(rows);
    } catch {
      // not enough memory for one block per column: blocks it is
    }
  }

  private scanChunk(buf: Uint8Array, n: number, final: boolean): number {
    let pos = 0;
    if (!this.bomChecked) {
      if (!final && n < 3 && (n === 0 || buf[0] === 0xef) && (n < 2 || buf[1] === 0xbb)) return 0; // maybe a cut byte-order mark
      if (n >= 3 && buf[0] === 0xef && buf[1] === 0xbb && buf[2] === 0xbf) pos = 3;
      this.bomChecked = true;
    }
    while (!this.done && pos < n) {
      if (this.headers !== null) return this.records(buf, pos, n, final);
      const next = this.header(buf, pos, n, final);
      if (next < 0) return pos;
      pos = next;
      if (this.headers !== null) this.headerEnd = next;
    }
    return this.done ? n : pos;
  }

  /** The table read, or null when the file had no header. */
  table(): ScannedTable | null {
    if (this.headers === null || this.delimiter === null) return null;
    return {
      headers: this.headers,
      headerLine: this.headerLine,
      delimiter: this.delimiter,
      columns: this.builders.map((b) => b.finish()),
      lines: this.lines.finish(),
      rowCount: this.rowCount,
      cellLines: this.cellLines,
    };
  }

  headerInfo(): { headers: string[]; delimiter: Delimiter; line: number } | null {
    return this.headers === null || this.delimiter === null ? null : { headers: this.headers, delimiter: this.delimiter, line: this.headerLine };
  }

  /** True when the input held only blank lines and delimiters (no header found). */
  get onlyDelimiters(): boolean {
    return this.skippedDelimiters;
  }

  private error(error: DataError): void {
    if (this.errors.length < this.options.maxErrors) this.errors.push(error);
    if (this.errors.length >= this.options.maxErrors) this.done = true;
  }

  private columnText(field: number): string {
    return dataText.column(this.headers?.[field - 1], field);
  }

  /**
   * A quoted cell starting at the quote at `p`: returns the offset after the
   * closing quote (content in qText, line breaks in qLines), INCOMPLETE when
   * the chunk ends first, UNCLOSED when the input ends first.
   */
  private quoted(buf: Uint8Array, p: number, n: number, final: boolean): number {
    let q = p + 1;
    let seg = q;
    let text = '';
    let lines = 0;
    for (;;) {
      while (q < n) {
        const b = buf[q];
        if (b === QUOTE) break;
        if (b === LF || (b === CR && (q + 1 >= n || buf[q + 1] !== LF))) lines++;
        q++;
      }
      if (q >= n) return final ? UNCLOSED : INCOMPLETE;
      if (q + 1 >= n && !final) return INCOMPLETE; // a doubled quote may follow
      if (q + 1 < n && buf[q + 1] === QUOTE) {
        text += decode(buf, seg, q + 1); // up to and with one quote
        q += 2;
        seg = q;
        continue;
      }
      this.qText = text + decode(buf, seg, q);
      this.qLines = lines;
      return q + 1;
    }
  }

  /**
   * The delimiter rule of `detectDelimiter` on bytes, from `pos`: null when
   * the first line with content does not end within the chunk.
   */
  private detect(buf: Uint8Array, pos: number, n: number, final: boolean): Delimiter | null {
    let comma = 0;
    let semicolon = 0;
    let tab = 0;
    let content = false;
    let inQuotes = false;
    for (let i = pos; i < n; i++) {
      const b = buf[i];
      if (b === QUOTE) inQuotes = !inQuotes; // a doubled quote toggles twice: no net change
      else if (inQuotes) {
        if (!isBlankByte(b)) content = true;
      } else if (b === LF || b === CR) {
        if (content) return pickDelimiter(comma, semicolon, tab, this.options.decimal);
        comma = semicolon = tab = 0;
      } else if (b === COMMA) comma++;
      else if (b === SEMICOLON) semicolon++;
      else if (b === TAB) tab++;
      else if (b !== SPACE) content = true;
    }
    return final ? pickDelimiter(comma, semicolon, tab, this.options.decimal) : null;
  }

  /**
   * One record before the header is known: skipped when blank, else the
   * header. Returns the offset after it, or -1 when it is cut off.
   */
  private header(buf: Uint8Array, pos: number, n: number, final: boolean): number {
    if (this.delimiter === null) {
      const d = this.detect(buf, pos, n, final);
      if (d === null) return -1;
      this.delimiter = d;
    }
    const D = this.delimiter.charCodeAt(0);
    const fields: string[] = [];
    this.errorMark = this.errors.length;
    const startLine = this.line;
    let line = this.line;
    let p = pos;
    for (;;) {
      let c = p < n ? buf[p] : -1;
      let cell: string;
      if (c === QUOTE) {
        const q = this.quoted(buf, p, n, final);
        if (q === INCOMPLETE) return this.again();
        if (q === UNCLOSED) {
          this.error({ code: 'csv_syntax', file: this.options.file, row: line, field: fields.length + 1, message: dataText.unclosedQuote(dataPlace(this.options.file, line, fields.length + 1), `field ${fields.length + 1} of the header`) });
          this.done = true;
          return n;
        }
        const fieldLine = line;
        line += this.qLines;
        cell = this.qText;
        p = q;
        c = p < n ? buf[p] : -1;
        while (c === SPACE || (c === TAB && D !== TAB)) c = ++p < n ? buf[p] : -1;
        if (!(c === D || c === LF || c === CR || c === -1)) {
          this.error({ code: 'csv_syntax', file: this.options.file, row: fieldLine, field: fields.length + 1, message: dataText.textAfterQuote(dataPlace(this.options.file, fieldLine, fields.length + 1), `field ${fields.length + 1} of the header`) });
          while (!(c === D || c === LF || c === CR || c === -1)) c = ++p < n ? buf[p] : -1;
        }
      } else {
        const start = p;
        while (!(c === D || c === LF || c === CR || c === -1)) c = ++p < n ? buf[p] : -1;
        cell = decode(buf, start, p);
      }
      if (c === -1 && !final) return this.again();
      fields.push(cell.trim());
      if (c === D) {
        p++;
        continue;
      }
      if (c === CR) {
        if (p + 1 >= n && !final) return this.again();
        if (p + 1 < n && buf[p + 1] === LF) p++;
      }
      if (c !== -1) {
        p++;
        line++;
      }
      break;
    }
    this.line = line;
    // blank before the header: nothing but spaces, tabs, commas and semicolons (the rule of delimiter detection)
    if (fields.every((f) => /^[ \t\r\n,;]*$/.test(f))) {
      if (fields.length > 1 || fields[0] !== '') this.skippedDelimiters = true;
      return p;
    }
    this.headers = fields;
    this.headerLine = startLine;
    this.skippedDelimiters = false;
    this.builders = fields.map((h) => new ColumnBuilder(h));
    this.labels = fields.map(() => new LabelCache());
    this.fieldLines = new Int32Array(fields.length);
    if (this.options.headerOnly) this.done = true;
    return p;
  }

  /** Data records from `pos`; returns the start of the record cut off by the chunk's end, or n. */
  private records(buf: Uint8Array, pos: number, n: number, final: boolean): number {
    const D = this.delimiter!.charCodeAt(0);
    const DEC = this.decimalCode;
    const decimal = this.options.decimal;
    const builders = this.builders;
    const labels = this.labels;
    const width = builders.length;
    const file = this.options.file;
    let line = this.line;

    while (pos < n && !this.done) {
      const recordStart = pos;
      const recordLine = line;
      this.errorMark = this.errors.length;
      let field = 0;
      let content = false;
      let multi = false;
      let extra = 0; // first non-blank field past the header (1-based), 0 when none
      let extraLine = 0;
      let broken = false;
      let lastLine = line;
      let c = 0;
      for (;;) {
        // One field, starting at pos; on exit p is at its terminator (delimiter, CR, LF) or n.
        const start = pos;
        let p = pos;
        if (multi && field < width) this.fieldLines[field] = line;
        c = p < n ? buf[p] : -1;
        if (c === QUOTE) {
          const fieldLine = line;
          const q = this.quoted(buf, p, n, final);
          if (q === INCOMPLETE) return this.cut(field, recordLine, recordStart);
          if (q === UNCLOSED) {
            this.error({ code: 'csv_syntax', file, row: fieldLine, field: field + 1, message: dataText.unclosedQuote(dataPlace(file, fieldLine, field + 1), this.columnText(field + 1)) });
            this.takeBack(Math.min(field, width));
            this.done = true;
            this.line = line;
            return n;
          }
          if (this.qLines > 0) {
            if (!multi) {
              multi = true;
              for (let j = 0; j <= field && j < width; j++) this.fieldLines[j] = recordLine;
            }
            line += this.qLines;
          }
          p = q;
          c = p < n ? buf[p] : -1;
          while (c === SPACE || (c === TAB && D !== TAB)) c = ++p < n ? buf[p] : -1;
          if (!(c === D || c === LF || c === CR || c === -1)) {
            this.error({ code: 'csv_syntax', file, row: fieldLine, field: field + 1, message: dataText.textAfterQuote(dataPlace(file, fieldLine, field + 1), this.columnText(field + 1)) });
            broken = true;
            while (!(c === D || c === LF || c === CR || c === -1)) c = ++p < n ? buf[p] : -1;
          }
          if (c === -1 && !final) return this.cut(field, recordLine, recordStart);
          const cell = this.qText;
          const blank = cell.trim() === '';
          if (!blank) content = true;
          if (field < width) builders[field].push(cell, decimal);
          else if (!blank && extra === 0) {
            extra = field + 1;
            extraLine = fieldLine;
          }
        } else {
          let neg = false;
          if (c === MINUS || c === PLUS) {
            neg = c === MINUS;
            c = ++p < n ? buf[p] : -1;
          }
          let m = 0;
          let digits = 0; // significant digits (leading zeros not counted)
          let seen = 0; // all mantissa digits
          let frac = 0;
          while (c >= ZERO && c <= NINE) {
            if (m !== 0 || c !== ZERO) digits++;
            if (digits <= MAX_DIGITS) m = m * 10 + (c - ZERO);
            seen++;
            c = ++p < n ? buf[p] : -1;
          }
          if (c === DEC) {
            c = ++p < n ? buf[p] : -1;
            while (c >= ZERO && c <= NINE) {
              if (m !== 0 || c !== ZERO) digits++;
              if (digits <= MAX_DIGITS) m = m * 10 + (c - ZERO);
              seen++;
              frac++;
              c = ++p < n ? buf[p] : -1;
            }
          }
          let plain = seen > 0;
          let exp = 0;
          if (plain && (c === E_LOWER || c === E_UPPER)) {
            c = ++p < n ? buf[p] : -1;
            let expNeg = false;
            if (c === MINUS || c === PLUS) {
              expNeg = c === MINUS;
              c = ++p < n ? buf[p] : -1;
            }
            let expDigits = 0;
            while (c >= ZERO && c <= NINE) {
              if (exp < 100_000) exp = exp * 10 + (c - ZERO); // beyond this the fast path is out of reach anyway
              expDigits++;
              c = ++p < n ? buf[p] : -1;
            }
            if (expDigits === 0) plain = false;
            if (expNeg) exp = -exp;
          }
          if (plain && (c === D || c === LF || c === CR || c === -1)) {
            if (c === -1 && !final) return this.cut(field, recordLine, recordStart);
            content = true;
            const e10 = exp - frac;
            if (field >= width) {
              if (extra === 0) {
                extra = field + 1;
                extraLine = line;
              }
            } else if (builders[field].text !== null) builders[field].push(decode(buf, start, p), decimal);
            else if (digits <= MAX_DIGITS && e10 >= -MAX_POW && e10 <= MAX_POW) {
              // Clinger's fast path: one correctly rounded operation on exact operands.
              const x = e10 >= 0 ? m * POW10[e10] : m / POW10[-e10];
              builders[field].pushNumber(neg ? -x : x);
            } else {
              // The grammar is checked above, so Number() of the ASCII text (decimal mark as '.') is the cell's value.
              const x = Number(asciiNumber(buf, start, p, DEC));
              if (Number.isFinite(x)) builders[field].pushNumber(x);
              else builders[field].push(decode(buf, start, p), decimal); // overflow (1e999): text, as in parseNumberCell
            }
          } else if (p === start && field < width && c !== D && isTextStart(c)) {
            // A cell starting with a printable ASCII character that no number or missing marker starts with is text.
            let hash = 0;
            while (!(c === D || c === LF || c === CR || c === -1)) {
              hash = (Math.imul(hash, 31) + c) | 0;
              c = ++p < n ? buf[p] : -1;
            }
            if (c === -1 && !final) return this.cut(field, recordLine, recordStart);
            const last = buf[p - 1];
            content = true;
            if (last > SPACE && last < 127) builders[field].pushText(labels[field].get(buf, start, p, hash));
            else builders[field].push(decode(buf, start, p), decimal); // may end in white space: trim as usual
          } else {
            while (!(c === D || c === LF || c === CR || c === -1)) c = ++p < n ? buf[p] : -1;
            if (c === -1 && !final) return this.cut(field, recordLine, recordStart);
            const cell = decode(buf, start, p);
            const blank = cell.trim() === '';
            if (!blank) content = true;
            if (field < width) builders[field].push(cell, decimal);
            else if (!blank && extra === 0) {
              extra = field + 1;
              extraLine = line;
            }
          }
        }
        field++;
        if (c === D) {
          pos = p + 1;
          continue;
        }
        lastLine = line;
        if (c === -1) {
          pos = n;
          break;
        }
        if (c === CR) {
          if (p + 1 >= n && !final) return this.cut(field, recordLine, recordStart); // an LF may follow
          if (p + 1 < n && buf[p + 1] === LF) p++;
        }
        pos = p + 1;
        line++;
        break;
      }
      // the record ended
      const pushed = field < width ? field : width;
      if (!content) {
        this.takeBack(pushed); // blank line: skipped
        continue;
      }
      if (extra > 0 || field < width || broken) {
        this.takeBack(pushed);
        if (broken) continue; // the quote error says what is wrong
        const delim = delimiterName(this.delimiter!);
        if (extra > 0) {
          this.error({ code: 'ragged_row', file, row: extraLine, field: extra, message: dataText.tooManyFields(dataPlace(file, extraLine, extra), field, width, delim) });
        } else {
          this.error({ code: 'ragged_row', file, row: lastLine, field: field + 1, message: dataText.tooFewFields(dataPlace(file, lastLine, field + 1), field, width, delim, this.columnText(field + 1)) });
        }
        continue;
      }
      if (multi) this.cellLines.set(this.rowCount, this.fieldLines.slice(0, width));
      this.lines.push(recordLine);
      this.rowCount++;
      if (this.rowCount === this.options.maxRows) {
        this.done = true;
        this.rowLimitReached = true;
      }
    }
    this.line = line;
    return this.done ? n : pos;
  }

  /** The record from `recordStart` is cut off by the chunk's end: take back its `fields` cells and resume there next time. */
  private cut(fields: number, recordLine: number, recordStart: number): number {
    this.takeBack(Math.min(fields, this.builders.length));
    this.again();
    this.line = recordLine;
    return recordStart;
  }

  /** Takes back the errors of a record cut off (it is read again whole); -1 for `header`. */
  private again(): number {
    this.errors.length = this.errorMark;
    this.done = false;
    return -1;
  }

  private takeBack(count: number): void {
    for (let j = 0; j < count; j++) this.builders[j].unpush();
  }
}

/** Bytes that are no content of a header line: space, tab, CR, LF, comma, semicolon. */
function isBlankByte(b: number): boolean {
  return b === SPACE || b === TAB || b === CR || b === LF || b === COMMA || b === SEMICOLON;
}

/** ASCII text of a plain number cell, its decimal mark written as '.' (for Number()). */
function asciiNumber(buf: Uint8Array, s: number, e: number, dec: number): string {
  let out = '';
  for (let i = s; i < e; i++) out += String.fromCharCode(buf[i] === dec ? DOT : buf[i]);
  return out;
}

/**
 * First byte of a cell that makes it text for sure: printable ASCII
 * (33-126, so not white space that trimming would remove) other than the
 * characters a number (`+ - . , 0-9`), a quote or a missing marker (`n N`) starts with.
 */
function isTextStart(c: number): boolean {
  return c >= 33 && c <= 126 && !(c >= ZERO && c <= NINE) && c !== PLUS && c !== MINUS && c !== DOT && c !== COMMA && c !== QUOTE && c !== 78 && c !== 110;
}

/**
 * Reuses one string per distinct label of a column (group labels repeat), so
 * a million rows do not allocate a million small strings. A hit is checked
 * byte by byte against the bytes it was decoded from, so a hash collision
 * only costs a new string.
 */
class LabelCache {
  private readonly map = new Map<number, { bytes: Uint8Array; text: string }>();

  get(buf: Uint8Array, start: number, end: number, hash: number): string {
    const known = this.map.get(hash);
    const len = end - start;
    if (known !== undefined && known.bytes.length === len) {
      const b = known.bytes;
      let same = true;
      for (let i = 0; i < len; i++) {
        if (b[i] !== buf[start + i]) {
          same = false;
          break;
        }
      }
      if (same) return known.text;
    }
    const text = decode(buf, start, end);
    if (this.map.size < 4096) this.map.set(hash, { bytes: buf.slice(start, end), text });
    return text;
  }
}
