/**
 * Small helpers for reading chevrotain CST nodes after error recovery, and
 * for combining source ranges.
 */
import type { CstNode, IToken } from 'chevrotain';
import type { Range } from './plan';
import { EMPTY_RANGE } from './source';

export type Children = Record<string, (CstNode | IToken)[] | undefined>;

export function isToken(x: CstNode | IToken | undefined): x is IToken {
  return x !== undefined && 'image' in x;
}

/** The single sub-rule node of a rule that is one choice among sub-rules (statement, fitItem). */
export function onlyChild(ctx: Children): CstNode | undefined {
  for (const key in ctx) {
    const first = ctx[key]?.[0];
    if (first && !isToken(first)) return first;
  }
  return undefined;
}

/** A token really read from the text (not invented by error recovery). */
export function real(tok: IToken | undefined): tok is IToken {
  return tok !== undefined && !tok.isInsertedInRecovery && Number.isFinite(tok.startOffset);
}

/** Smallest range covering all given ranges (ignores undefined). */
export function cover(...ranges: (Range | undefined)[]): Range {
  let out: Range | undefined;
  for (const r of ranges) {
    if (!r) continue;
    if (!out) out = r;
    else out = { start: r.start.offset < out.start.offset ? r.start : out.start, end: r.end.offset > out.end.offset ? r.end : out.end };
  }
  return out ?? EMPTY_RANGE;
}
