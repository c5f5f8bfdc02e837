/**
 * parse(text): lexing + parsing + CST-to-AST, with every lexer and parser
 * error turned into a located 'syntax' diagnostic. Never throws: an
 * unexpected internal failure becomes one 'internal' diagnostic.
 */
import { EOF, type IRecognitionException, type IToken, type ILexingError } from 'chevrotain';
import type { SpecAst } from './ast';
import type { Diagnostic, Range } from './plan';
import { getParser } from './grammar';
import { FIRST_ON_LINE, LBracket, RBracket, lexer, markLineStarts } from './tokens';
import { LineIndex, EMPTY_RANGE, tokenRange } from './source';
import { toAst } from './to-ast';
import { limitNesting } from './nesting';
import { MSG } from './messages';
import { CLOSERS, unclosedOpener } from './unclosed';

export interface ParseResult {
  ast: SpecAst;
  diagnostics: Diagnostic[];
}

const emptyAst = (): SpecAst => ({ kind: 'spec', statements: [], range: EMPTY_RANGE });

export function parseSpec(text: string): ParseResult {
  const source = typeof text === 'string' ? text : String(text ?? '');
  const lines = new LineIndex(source);
  try {
    const lexed = lexer.tokenize(source);
    const diagnostics: Diagnostic[] = lexed.errors.map((e) => lexDiagnostic(e, source, lines));
    for (const t of lexed.groups.unterminated ?? []) {
      diagnostics.push({ severity: 'error', code: 'syntax', message: MSG.unterminatedString, range: tokenRange(t) });
    }
    markLineStarts(lexed.tokens);
    const limited = limitNesting(lexed.tokens);
    for (const d of limited.diagnostics) diagnostics.push(d);
    const parser = getParser();
    parser.input = limited.tokens;
    const cst = parser.spec();
    const unterminated = lexed.groups.unterminated ?? [];
    for (const e of parser.errors) {
      const d = parseDiagnostic(e, limited.tokens, lines);
      // "expected a text at the end of this line" where the text is there but unclosed: that is reported already
      if (d.message.endsWith(LINE_END) && unterminated.some((u) => u.startLine === d.range.end.line && u.startOffset >= d.range.end.offset)) continue;
      diagnostics.push(d);
    }
    const built = toAst(cst, source);
    const ast = built.ast;
    for (const d of built.diagnostics) diagnostics.push(d);
    diagnostics.sort((a, b) => a.range.start.offset - b.range.start.offset);
    return { ast, diagnostics: dedupe(diagnostics) };
  } catch (err) {
    return { ast: emptyAst(), diagnostics: [internalDiagnostic(err, lines)] };
  }
}

function lexDiagnostic(e: ILexingError, text: string, lines: LineIndex): Diagnostic {
  const ch = text.charAt(e.offset) || '?';
  return { severity: 'error', code: 'syntax', message: MSG.unexpectedCharacter(ch), range: lines.range(e.offset, e.offset + Math.max(1, e.length)) };
}

const LINE_END = ' at the end of this line';

/**
 * A `[` the lexer could not read as a unit and nothing closes on its line
 * (`[mg`): the parser reports whatever it expected there; the missing `]` is the error.
 */
function unclosedBracket(tok: IToken, tokens: readonly IToken[], lines: LineIndex): Diagnostic | undefined {
  if (tok.tokenType !== LBracket) return undefined;
  let last = tok;
  for (let i = tokens.indexOf(tok) + 1; i < tokens.length && tokens[i].startLine === tok.startLine; i++) {
    if (tokens[i].tokenType === RBracket) return undefined;
    last = tokens[i];
  }
  return { severity: 'error', code: 'syntax', message: MSG.unclosed('[', `expected ']'${LINE_END}`), range: lines.range(tok.startOffset, (last.endOffset ?? last.startOffset) + 1) };
}

function parseDiagnostic(e: IRecognitionException, tokens: readonly IToken[], lines: LineIndex): Diagnostic {
  const lastToken = tokens[tokens.length - 1];
  let range: Range;
  let message = e.message;
  const tok = e.token;
  const prevTok = (e as { previousToken?: IToken }).previousToken;
  const prevReal = prevTok && prevTok.tokenType !== EOF && Number.isFinite(prevTok.startOffset) ? prevTok : undefined;
  /** The last token read before the error (where the construct being read ends). */
  let lastRead: IToken | undefined;
  /** Where the parser stopped: the unexpected token, or the end of the input. */
  let stop: number;
  if (tok && tok.tokenType !== EOF && Number.isFinite(tok.startOffset)) {
    const bracket = unclosedBracket(tok, tokens, lines);
    if (bracket) return bracket;
    // Something missing at the end of a line is shown on that line, not on the next statement.
    const missingAtLineEnd = prevReal && e.name !== 'NotAllInputParsedException' && tok.payload === FIRST_ON_LINE && (prevReal.endLine ?? 0) < (tok.startLine ?? 0);
    range = missingAtLineEnd ? tokenRange(prevReal) : tokenRange(tok);
    if (missingAtLineEnd) message = message.replace(/ but found .*$/s, LINE_END);
    lastRead = prevReal;
    stop = tok.startOffset;
  } else {
    // At the end of the input (or on an invented token): point at the last token read, where something is missing.
    const anchor = prevReal ?? lastToken;
    range = anchor ? tokenRange(anchor) : lines.range(lines.text.length, lines.text.length);
    lastRead = anchor;
    stop = lines.text.length;
  }
  // A missing `)`, `]` or `}`: cover the construct from its opener through the last token read.
  const closer = e.name === 'MismatchedTokenException' ? CLOSERS.find((c) => message.startsWith(`expected ${c.LABEL} `)) : undefined;
  const opener = closer && lastRead ? unclosedOpener(tokens, stop, closer) : undefined;
  if (opener && lastRead && lastRead.startOffset >= opener.startOffset) {
    range = lines.range(opener.startOffset, (lastRead.endOffset ?? lastRead.startOffset) + 1);
    // (a block left open over lines: "this line" would not say which)
    const endLine = lastRead.endLine ?? lastRead.startLine ?? 0;
    message = MSG.unclosed(opener.image, endLine > (opener.startLine ?? 0) ? `expected ${closer!.LABEL} after line ${endLine}` : message);
  }
  return { severity: 'error', code: 'syntax', message, range };
}

export function internalDiagnostic(err: unknown, lines: LineIndex): Diagnostic {
  const detail = err instanceof Error ? err.message : String(err);
  return { severity: 'error', code: 'internal', message: MSG.internal(detail), range: lines.range(0, 0) };
}

/** Recovery can report the same spot twice; keep the first message per (offset, message). */
function dedupe(ds: Diagnostic[]): Diagnostic[] {
  const seen = new Set<string>();
  return ds.filter((d) => {
    const key = `${d.range.start.offset}:${d.range.end.offset}:${d.message}`;
    if (seen.has(key)) return false;
    seen.add(key);
    return true;
  });
}
