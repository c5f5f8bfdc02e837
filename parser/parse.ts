/**
 * parse(text): lexing + parsing + CST-to-AST, with every lexer and parser
 * error turned into a located 'syntax' diagnostic. Never throws: an
 * unexpected internal failure becomes one 'internal' diagnostic.
 */
import { EOF, type IRecognitionException, type IToken, type ILexingError } from 'chevrotain';
import type { SpecAst } from './ast';
import type { Diagnostic, Range } from './plan';
import { getParser } from './grammar';
import { FIRST_ON_LINE, lexer, markLineStarts } from './tokens';
import { LineIndex, EMPTY_RANGE, tokenRange } from './source';
import { toAst } from './to-ast';
import { limitNesting } from './nesting';
import { MSG } from './messages';

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
    const lastToken = limited.tokens[limited.tokens.length - 1];
    for (const e of parser.errors) diagnostics.push(parseDiagnostic(e, lastToken, lines));
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

function parseDiagnostic(e: IRecognitionException, lastToken: IToken | undefined, lines: LineIndex): Diagnostic {
  let range: Range;
  let message = e.message;
  const tok = e.token;
  const prevTok = (e as { previousToken?: IToken }).previousToken;
  const prevReal = prevTok && prevTok.tokenType !== EOF && Number.isFinite(prevTok.startOffset) ? prevTok : undefined;
  if (tok && tok.tokenType !== EOF && Number.isFinite(tok.startOffset)) {
    // Something missing at the end of a line is shown on that line, not on the next statement.
    const missingAtLineEnd = prevReal && e.name !== 'NotAllInputParsedException' && tok.payload === FIRST_ON_LINE && (prevReal.endLine ?? 0) < (tok.startLine ?? 0);
    range = missingAtLineEnd ? tokenRange(prevReal) : tokenRange(tok);
    if (missingAtLineEnd) message = message.replace(/ but found .*$/s, ' at the end of this line');
  } else {
    // At the end of the input (or on an invented token): point at the last token read, where something is missing.
    const prev = (e as { previousToken?: IToken }).previousToken;
    const anchor = prev && Number.isFinite(prev.startOffset) ? prev : lastToken;
    range = anchor ? tokenRange(anchor) : lines.range(lines.text.length, lines.text.length);
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
