/**
 * Plain-text summary of a run for terminals: per fit a parameter table,
 * goodness of fit, residual checks, warnings and the stopping reason; then
 * query tables, derived quantities and expectation verdicts. Digits follow format.ts.
 */
import type { FitResult, RunResult } from '../result';
import {
  derivedBlock, expectationLine, expectationTally, fitHeading, goodnessEntries, PARAMETER_HEADERS,
  parameterRows, queryBlocks, stopLine, warningLines,
} from './summary';
import { textTable } from './table';

/** The summary of one fit, as lines. */
export function fitTextLines(fit: FitResult): string[] {
  const lines: string[] = [fitHeading(fit), `  ${stopLine(fit)}`, ''];
  lines.push(...textTable(PARAMETER_HEADERS(fit.level), parameterRows(fit), ['left', 'right', 'right', 'right', 'right', 'left', 'left']));
  lines.push('', '  Goodness of fit');
  const entries = goodnessEntries(fit);
  const w = Math.max(...entries.map((e) => [...e.label].length));
  const vw = Math.max(...entries.map((e) => e.value.length));
  for (const e of entries) {
    const line = `    ${e.label.padEnd(w)}  ${e.value.padStart(vw)}${e.note ? `   (${e.note})` : ''}`;
    lines.push(line);
  }
  const warnings = warningLines(fit);
  if (warnings.length) {
    lines.push('', '  Warnings');
    for (const wline of warnings) lines.push(`    ! ${wline}`);
  }
  return lines;
}

/** Query tables (predictions, inverse predictions, comparisons), as lines. */
export function queryTextLines(result: RunResult): string[] {
  const lines: string[] = [];
  for (const b of queryBlocks(result)) {
    if (lines.length) lines.push('');
    lines.push(b.heading, ...textTable(b.headers, b.rows, b.align));
    for (const n of b.notes) lines.push(`  ${n}`);
  }
  return lines;
}

/** The derived-quantity table and its notes, as lines (none when the run has no derived quantities). */
export function derivedTextLines(result: RunResult): string[] {
  const b = derivedBlock(result);
  if (!b) return [];
  return [b.heading, ...textTable(b.headers, b.rows, b.align), ...b.notes.map((n) => `  ${n}`)];
}

/** Expectation verdicts, one per line, and the tally. */
export function expectationTextLines(result: RunResult): string[] {
  if (result.expectations.length === 0) return [];
  const rows = result.expectations.map(expectationLine);
  const tw = Math.max(...rows.map((r) => r.text.length));
  const lines = ['Expectations'];
  for (const r of rows) lines.push(`  ${r.verdict}  ${r.text.padEnd(tw)}  actual ${r.actual}${r.verdict === 'FAIL' && r.message ? `  (${r.message})` : ''}`);
  lines.push(`  ${expectationTally(result)}`);
  return lines;
}

/** The whole run summary (fits, queries, derived quantities, expectations) ending with a newline. */
export function runText(result: RunResult): string {
  const sections: string[][] = [];
  for (const fit of result.fits) sections.push(fitTextLines(fit));
  const q = queryTextLines(result);
  if (q.length) sections.push(q);
  const d = derivedTextLines(result);
  if (d.length) sections.push(d);
  const e = expectationTextLines(result);
  if (e.length) sections.push(e);
  return sections.map((s) => s.join('\n')).join('\n\n') + '\n';
}
