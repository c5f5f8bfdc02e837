/**
 * Growable typed column filled by the CSV scanner (`csv-scan.ts`), so every
 * cell gets one meaning: a number, a missing marker, or text.
 *
 * Memory: values go into blocks (16 values at first, doubling up to
 * BLOCK_MAX, then further blocks of BLOCK_MAX), so growing never copies what
 * was read and a table of 100,000 columns and a few rows stays small; the
 * blocks are joined once in `finish()` (peak about twice the column). When
 * the reader can estimate the row count (file size over the bytes per record
 * of the first chunk), `reserve` makes the current block that large, and a
 * column that ends within 10 % of it is returned without a copy (peak about
 * 1.1 times the column).
 */
import { isMissingCell, parseNumberCell } from './cells';
import type { DataColumn, DecimalMark } from './types';

/** Values per block once a column is large: 2¹⁶ doubles = 512 KiB. */
const BLOCK_MAX = 1 << 16;
/** First block size: small, so wide tables of few rows cost little. */
const BLOCK_FIRST = 16;

export class ColumnBuilder {
  /** Current block. */
  private block: Float64Array<ArrayBuffer> = new Float64Array(BLOCK_FIRST);
  /** Values in the current block. */
  private used = 0;
  /** Full blocks before the current one. */
  private readonly full: Float64Array<ArrayBuffer>[] = [];
  /** Values in the full blocks. */
  private before = 0;
  text: string[] | null = null;
  nonNumeric = 0;

  constructor(readonly name: string) {}

  /** Number of cells added. */
  get length(): number {
    return this.before + this.used;
  }

  private grow(): void {
    if (this.block.length < BLOCK_MAX) {
      const grown = new Float64Array(this.block.length * 2);
      grown.set(this.block);
      this.block = grown;
      return;
    }
    this.full.push(this.block);
    this.before += this.used;
    this.block = new Float64Array(BLOCK_MAX);
    this.used = 0;
  }

  /**
   * Makes room for `rows` cells in one block (an estimate of the final
   * count); only while all cells are in the current block, else a no-op.
   */
  reserve(rows: number): void {
    if (this.full.length > 0 || rows <= this.block.length) return;
    const grown = new Float64Array(rows);
    grown.set(this.block.subarray(0, this.used));
    this.block = grown;
  }

  private value(i: number): number {
    if (i >= this.before) return this.block[i - this.before];
    let k = i;
    for (const b of this.full) {
      if (k < b.length) return b[k];
      k -= b.length;
    }
    return NaN;
  }

  /** Adds one cell as read from the file (untrimmed). */
  push(cell: string, decimal: DecimalMark): void {
    const x = parseNumberCell(cell, decimal);
    if (Number.isNaN(x) && !isMissingCell(cell)) {
      this.nonNumeric++;
      this.startText();
    }
    if (this.text !== null) this.text.push(cell.trim());
    if (this.used === this.block.length) this.grow();
    this.block[this.used++] = x;
  }

  /**
   * Adds a finite number already read from a numeric cell. Only valid while
   * the column holds no text (`text === null`): a text column keeps each
   * cell's own spelling, so its cells must go through `push`.
   */
  pushNumber(x: number): void {
    if (this.used === this.block.length) this.grow();
    this.block[this.used++] = x;
  }

  /**
   * Adds a cell the caller knows is neither a number nor a missing marker,
   * already trimmed: the same effect as `push` for such a cell.
   */
  pushText(cell: string): void {
    this.nonNumeric++;
    this.startText().push(cell);
    if (this.used === this.block.length) this.grow();
    this.block[this.used++] = NaN;
  }

  /** The text list, started on the first text cell with the spelling of the cells before it (blank for missing ones). */
  private startText(): string[] {
    if (this.text === null) {
      const n = this.length;
      this.text = new Array<string>(n);
      for (let i = 0; i < n; i++) {
        const v = this.value(i);
        this.text[i] = Number.isNaN(v) ? '' : String(v);
      }
    }
    return this.text;
  }

  /**
   * Takes back the last cell added (a blank line, or a record cut off at the
   * end of a chunk and read again with the next one). A column turned to text
   * only by cells taken back turns numeric again, so taking back leaves the
   * column exactly as if the cell had never been added.
   */
  unpush(): void {
    if (this.used === 0) {
      // the current block is empty: step back into the last full block
      this.block = this.full.pop()!;
      this.used = this.block.length;
      this.before -= this.block.length;
    }
    this.used--;
    if (this.text !== null) {
      const cell = this.text.pop()!;
      if (Number.isNaN(this.block[this.used]) && !isMissingCell(cell)) this.nonNumeric--;
      if (this.nonNumeric === 0) this.text = null;
    }
  }

  finish(): DataColumn {
    const n = this.length;
    let values: Float64Array;
    if (this.full.length === 0 && this.used >= 0.9 * this.block.length) values = this.used === this.block.length ? this.block : this.block.subarray(0, this.used);
    else {
      values = new Float64Array(n);
      let k = 0;
      for (const b of this.full) {
        values.set(b, k);
        k += b.length;
      }
      values.set(this.block.subarray(0, this.used), k);
    }
    // release the blocks: the caller keeps only the joined column
    this.full.length = 0;
    this.block = new Float64Array(0);
    this.used = 0;
    this.before = 0;
    return { name: this.name, values, text: this.text, nonNumeric: this.nonNumeric };
  }
}

/** Growable Int32Array in blocks (the file line of each record), joined once at the end. */
export class LineList {
  private block: Int32Array<ArrayBuffer> = new Int32Array(BLOCK_FIRST);
  private used = 0;
  private readonly full: Int32Array<ArrayBuffer>[] = [];
  private before = 0;

  get length(): number {
    return this.before + this.used;
  }

  /** As `ColumnBuilder.reserve`. */
  reserve(rows: number): void {
    if (this.full.length > 0 || rows <= this.block.length) return;
    const grown = new Int32Array(rows);
    grown.set(this.block.subarray(0, this.used));
    this.block = grown;
  }

  push(line: number): void {
    if (this.used === this.block.length) {
      if (this.block.length < BLOCK_MAX) {
        const grown = new Int32Array(this.block.length * 2);
        grown.set(this.block);
        this.block = grown;
      } else {
        this.full.push(this.block);
        this.before += this.used;
        this.block = new Int32Array(BLOCK_MAX);
        this.used = 0;
      }
    }
    this.block[this.used++] = line;
  }

  finish(): Int32Array {
    if (this.full.length === 0 && this.used >= 0.9 * this.block.length) return this.used === this.block.length ? this.block : this.block.subarray(0, this.used);
    const out = new Int32Array(this.length);
    let k = 0;
    for (const b of this.full) {
      out.set(b, k);
      k += b.length;
    }
    out.set(this.block.subarray(0, this.used), k);
    return out;
  }
}
