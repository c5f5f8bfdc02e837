/**
 * Source positions: converts 0-based offsets into the plan's `Position`
 * (1-based line and column, columns counted in UTF-16 code units as editors
 * do) and builds half-open `Range`s. Line breaks are `\n`, `\r\n` or `\r`.
 */
import type { IToken } from 'chevrotain';
import type { Position, Range } from './plan';

export class LineIndex {
  /** Offset of the first character of each line. */
  private readonly starts: number[] = [0];

  constructor(readonly text: string) {
    for (let i = 0; i < text.length; i++) {
      const c = text.charCodeAt(i);
      if (c === 13 /* \r */) {
        if (text.charCodeAt(i + 1) === 10) i++;
        this.starts.push(i + 1);
      } else if (c === 10 /* \n */) {
        this.starts.push(i + 1);
      }
    }
  }

  /** Position of `offset`, clamped into `[0, text.length]`. */
  position(offset: number): Position {
    const o = Number.isFinite(offset) ? Math.max(0, Math.min(this.text.length, Math.trunc(offset))) : this.text.length;
    let lo = 0;
    let hi = this.starts.length - 1;
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (this.starts[mid] <= o) lo = mid;
      else hi = mid - 1;
    }
    return { line: lo + 1, column: o - this.starts[lo] + 1, offset: o };
  }

  range(startOffset: number, endOffset: number): Range {
    const start = this.position(startOffset);
    const end = this.position(Math.max(startOffset, endOffset));
    return { start, end: end.offset < start.offset ? start : end };
  }
}

/** Range of one token (exclusive end). */
export function tokenRange(tok: IToken): Range {
  return {
    start: { line: tok.startLine ?? 1, column: tok.startColumn ?? 1, offset: tok.startOffset },
    end: { line: tok.endLine ?? tok.startLine ?? 1, column: (tok.endColumn ?? tok.startColumn ?? 0) + 1, offset: (tok.endOffset ?? tok.startOffset) + 1 },
  };
}

/** Empty range at the start of the text, for nodes with nothing to point at. */
export const EMPTY_RANGE: Range = { start: { line: 1, column: 1, offset: 0 }, end: { line: 1, column: 1, offset: 0 } };
