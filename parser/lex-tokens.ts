/**
 * Classified tokens for editor highlighting (semantic tokens).
 *
 * Lexing alone cannot tell a soft keyword used as a name (`rate` in
 * `ln(rate)`) from the keyword, so the text is also parsed and every token
 * the syntax tree reads as a name is classed 'identifier' (or 'function' for
 * a call, 'constant' for pi, e). Comments are included; the result is sorted
 * by offset. Never throws.
 */
import type { IToken } from 'chevrotain';
import type { Range } from './plan';
import { lexer, KEYWORD_TOKENS, Identifier, NumberLiteral, StringLiteral, UnterminatedString, Unit, Comment, Inf } from './tokens';
import { tokenRange } from './source';
import { parseSpec } from './parse';
import { walkNames } from './ast-walk';

export type LexTokenKind = 'keyword' | 'function' | 'number' | 'string' | 'unit' | 'comment' | 'identifier' | 'operator' | 'constant';

export interface LexToken {
  kind: LexTokenKind;
  range: Range;
}

const keywordTypes = new Set(KEYWORD_TOKENS);
const CONSTANT_NAMES = new Set(['pi', 'e']);

function baseKind(t: IToken): LexTokenKind {
  const type = t.tokenType;
  if (type === Inf) return 'constant';
  if (keywordTypes.has(type)) return 'keyword';
  if (type === Identifier) return CONSTANT_NAMES.has(t.image) ? 'constant' : 'identifier';
  if (type === NumberLiteral) return 'number';
  if (type === StringLiteral || type === UnterminatedString) return 'string';
  if (type === Unit) return 'unit';
  if (type === Comment) return 'comment';
  return 'operator';
}

export function lexSpecTokens(text: string): LexToken[] {
  try {
    const lexed = lexer.tokenize(text);
    const all = [...lexed.tokens, ...(lexed.groups.comments ?? []), ...(lexed.groups.unterminated ?? [])];
    const asName = new Map<number, LexTokenKind>();
    const { ast } = parseSpec(text);
    walkNames(ast, {
      name: (r, name) => asName.set(r.start.offset, CONSTANT_NAMES.has(name) ? 'constant' : 'identifier'),
      call: (r) => asName.set(r.start.offset, 'function'),
    });
    return all
      .sort((a, b) => a.startOffset - b.startOffset)
      .map((t) => {
        const base = baseKind(t);
        const override = base === 'keyword' || base === 'identifier' || base === 'constant' ? asName.get(t.startOffset) : undefined;
        return { kind: override ?? base, range: tokenRange(t) };
      });
  } catch {
    return [];
  }
}
