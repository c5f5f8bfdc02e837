/**
 * Collects located diagnostics for the checker. Severity always comes from
 * the code (messages.ts `CODES`); suggestions, when any,
 * are appended to the message as "did you mean" and kept for quick fixes.
 */
import type { Diagnostic, Range } from './plan';
import { CODES, MSG, type DiagnosticCode } from './messages';

export class Reporter {
  readonly diagnostics: Diagnostic[] = [];

  report(code: DiagnosticCode, message: string, range: Range, suggestions?: readonly string[]): void {
    const d: Diagnostic = { severity: CODES[code].severity, code, message: message + MSG.didYouMean(suggestions ?? []), range };
    if (suggestions && suggestions.length) d.suggestions = [...suggestions];
    this.diagnostics.push(d);
  }

  get errorCount(): number {
    return this.diagnostics.filter((d) => d.severity === 'error').length;
  }
}
