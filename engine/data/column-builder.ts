/**
 * Growable typed column used by both CSV readers (the papaparse path in
 * `csv.ts` and the plain-file scanner in `csv-scan.ts`), so that both give a
 * cell exactly the same meaning: a number, a missing marker, or text.
 */
import { isMissingCell, parseNumberCell } from './cells';
import type { DataColumn, DecimalMark } from './types';

/** Growable Float64Array plus optional text, for one column. */
export class ColumnBuilder {
  values = new Float64Array(256);
  text: string[] | null = null;
  nonNumeric = 0;
  length = 0;

  constructor(readonly name: string) {}

  private grow(): void {
    const grown = new Float64Array(this.values.length * 2);
    grown.set(this.values);
    this.values = grown;
  }

  /** Adds one cell as read from the file (untrimmed). */
  push(cell: string, decimal: DecimalMark): void {
    if (this.length === this.values.length) this.grow();
    const x = parseNumberCell(cell, decimal);
    this.values[this.length] = x;
    if (Number.isNaN(x) && !isMissingCell(cell)) {
      this.nonNumeric++;
      this.startText();
    }
    if (this.text !== null) this.text.push(cell.trim());
    this.length++;
  }

  /**
   * Adds a finite number already read from a numeric cell. Only valid while
   * the column holds no text (`text === null`): a text column keeps each
   * cell's own spelling, so its cells must go through `push`.
   */
  pushNumber(x: number): void {
    if (this.length === this.values.length) this.grow();
    this.values[this.length++] = x;
  }

  /**
   * Adds a cell the caller knows is neither a number nor a missing marker,
   * already trimmed: the same effect as `push` for such a cell.
   */
  pushText(cell: string): void {
    if (this.length === this.values.length) this.grow();
    this.values[this.length] = NaN;
    this.nonNumeric++;
    this.startText().push(cell);
    this.length++;
  }

  /** The text list, started on the first text cell with the spelling of the cells before it (blank for missing ones). */
  private startText(): string[] {
    if (this.text === null) {
      this.text = [];
      for (let i = 0; i < this.length; i++) {
        const v = this.values[i];
        this.text.push(Number.isNaN(v) ? '' : String(v));
      }
    }
    return this.text;
  }

  /** Takes back the last cell added; only for missing (blank) cells, which never switch a column to text. */
  unpush(): void {
    this.length--;
    if (this.text !== null) this.text.pop();
  }

  finish(): DataColumn {
    return { name: this.name, values: this.values.slice(0, this.length), text: this.text, nonNumeric: this.nonNumeric };
  }
}
