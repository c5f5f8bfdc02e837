/**
 * Where an unclosed construct starts. When the parser expects a `)`, `]` or
 * `}` it reports the spot where the closer was missed, which is one token
 * (often the last `)` of the line) and says nothing of where the open one is.
 * `unclosedOpener` finds the opener left open before that spot by matching
 * brackets over the token stream, so the diagnostic can cover the construct
 * from its opening through the last token read.
 *
 * Matching follows the parser's recovery: a statement keyword first on its
 * line (tokens.ts `startsStatement`) ends every open `(` and `[` before it
 * (the parser reported them there), braces stay open across lines; a closer
 * that matches no opener is skipped.
 */
import type { IToken, TokenType } from 'chevrotain';
import { LBrace, LBracket, LParen, RBrace, RBracket, RParen, startsStatement } from './tokens';

const OPENER_OF = new Map<TokenType, TokenType>([[RParen, LParen], [RBracket, LBracket], [RBrace, LBrace]]);
const OPENERS = new Set<TokenType>([LParen, LBracket, LBrace]);

/** The closers the parser may report missing, by their labels (`')'`) as the parser's messages name them. */
export const CLOSERS: readonly TokenType[] = [RParen, RBracket, RBrace];

/**
 * The innermost opener of `closer`'s kind still open after the tokens that
 * start before `before` (an offset), or undefined.
 */
export function unclosedOpener(tokens: readonly IToken[], before: number, closer: TokenType): IToken | undefined {
  const want = OPENER_OF.get(closer);
  if (!want) return undefined;
  const open: IToken[] = [];
  for (const t of tokens) {
    if (!(t.startOffset < before)) break;
    if (startsStatement(t)) {
      // a new statement: only the braces of blocks stay open
      for (let i = open.length - 1; i >= 0; i--) if (open[i].tokenType !== LBrace) open.splice(i, 1);
    }
    if (OPENERS.has(t.tokenType)) open.push(t);
    else {
      const o = OPENER_OF.get(t.tokenType);
      if (!o) continue;
      const at = findLast(open, o);
      if (at >= 0) open.splice(at);
    }
  }
  const at = findLast(open, want);
  return at >= 0 ? open[at] : undefined;
}

function findLast(open: readonly IToken[], type: TokenType): number {
  for (let i = open.length - 1; i >= 0; i--) if (open[i].tokenType === type) return i;
  return -1;
}
