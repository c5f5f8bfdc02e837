/**
 * Public API of the `.lsq` parser (see LANGUAGE.md for the language).
 *
 *   parse(text)          -> syntax tree + syntax diagnostics; never throws
 *   check(ast, ctx?)     -> plan + semantic diagnostics; never throws
 *   analyze(text, ctx?)  -> both passes at once
 *   lexTokens(text)      -> classified tokens for editor highlighting
 *
 * A plan is always returned, possibly partial: consumers must not run it when
 * any diagnostic has severity `error`.
 */
import type { SpecAst } from './ast';
import type { Diagnostic, Plan } from './plan';
import { parseSpec } from './parse';
import { checkSpec, type CheckContext } from './check';
import { lexSpecTokens, type LexToken, type LexTokenKind } from './lex-tokens';

export type { SpecAst } from './ast';
export type { CheckContext } from './check';
export type { LexToken, LexTokenKind } from './lex-tokens';
export type { Diagnostic, Plan } from './plan';
export * from './registry';
export { KEYWORDS, RESERVED_WORDS } from './tokens';
export { CODES, type DiagnosticCode } from './messages';

export function parse(text: string): { ast: SpecAst; diagnostics: Diagnostic[] } {
  return parseSpec(text);
}

export function check(ast: SpecAst, ctx?: CheckContext): { plan: Plan; diagnostics: Diagnostic[] } {
  return checkSpec(ast, ctx);
}

export function analyze(text: string, ctx?: CheckContext): { ast: SpecAst; plan: Plan; diagnostics: Diagnostic[] } {
  const parsed = parseSpec(text);
  const checked = checkSpec(parsed.ast, ctx);
  return { ast: parsed.ast, plan: checked.plan, diagnostics: [...parsed.diagnostics, ...checked.diagnostics] };
}

export function lexTokens(text: string): LexToken[] {
  return lexSpecTokens(text);
}

/** True when any diagnostic is an error (the plan must not be run). */
export function hasErrors(diagnostics: readonly Diagnostic[]): boolean {
  return diagnostics.some((d) => d.severity === 'error');
}
