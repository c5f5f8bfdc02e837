/**
 * Bounds the nesting of parentheses and calls before the parser runs. The
 * grammar is recursive descent (chevrotain), so every level of `(` costs
 * several stack frames; a spec nested a few hundred levels would exhaust the
 * call stack. Each `(` that opens level `MAX_NESTING + 1` is reported, and
 * the tokens from it (or from the function name before it) through its
 * matching `)` are replaced by one token that
 * the syntax tree reads as an `error` node: the rest of the spec still parses
 * and checks, with no follow-on errors from the cut piece.
 *
 * When the `(` is never closed, the cut ends before the next token that
 * starts a statement (tokens.ts `startsStatement`) or a brace, so the
 * missing `)` is still reported by the parser, on its own line.
 */
import { createTokenInstance, tokenMatcher, type IToken } from 'chevrotain';
import type { Diagnostic } from './plan';
import { LBrace, LParen, Name, NumberLiteral, RBrace, RParen, startsStatement } from './tokens';
import { tokenRange } from './source';
import { MAX_NESTING } from './limits';
import { MSG } from './messages';

const cutTokens = new WeakSet<IToken>();

/** True for a token that stands for a piece cut out for nesting too deeply. */
export function isCutToken(t: IToken): boolean {
  return cutTokens.has(t);
}

const stops = (t: IToken): boolean => startsStatement(t) || t.tokenType === LBrace || t.tokenType === RBrace;

/** `tokens` with every piece nested deeper than `MAX_NESTING` replaced by one cut token, and a diagnostic per piece. */
export function limitNesting(tokens: readonly IToken[]): { tokens: IToken[]; diagnostics: Diagnostic[] } {
  const out: IToken[] = [];
  const diagnostics: Diagnostic[] = [];
  let depth = 0;
  for (let i = 0; i < tokens.length; i++) {
    const t = tokens[i];
    if (stops(t)) depth = 0; // a new statement or block: unclosed parentheses above were already reported by the parser
    if (t.tokenType === LParen && depth === MAX_NESTING) {
      // a call is cut with its function name, so the name is not read as a lone column
      const fn = out.length > 0 && tokenMatcher(out[out.length - 1], Name) ? out.pop() : undefined;
      diagnostics.push({ severity: 'error', code: 'nested_too_deeply', message: MSG.nestedTooDeeply(MAX_NESTING), range: tokenRange(fn ?? t) });
      let level = 0;
      let j = i;
      let last = i;
      for (; j < tokens.length; j++) {
        const u = tokens[j];
        if (j > i && stops(u)) break;
        last = j;
        if (u.tokenType === LParen) level++;
        else if (u.tokenType === RParen && --level === 0) break;
      }
      out.push(cutToken(fn ?? t, tokens[last]));
      i = last;
      continue;
    }
    if (t.tokenType === LParen) depth++;
    else if (t.tokenType === RParen && depth > 0) depth--;
    out.push(t);
  }
  return { tokens: out, diagnostics };
}

/** One number token spanning `first`…`last`, marked as cut (to-ast.ts reads it as an error node). */
function cutToken(first: IToken, last: IToken): IToken {
  const t = createTokenInstance(
    NumberLiteral, '0', first.startOffset, last.endOffset ?? last.startOffset,
    first.startLine ?? 1, last.endLine ?? last.startLine ?? 1, first.startColumn ?? 1, last.endColumn ?? last.startColumn ?? 1,
  );
  t.payload = first.payload;
  cutTokens.add(t);
  return t;
}
