/**
 * Plain-text summary of a run for terminals: per fit a parameter table,
 * goodness of fit, residual checks, warnings and the stopping reason; per
 * per-group fit the group table, the summary across groups, the worst groups
 * and full blocks only for some groups (rule in groups.ts); then query
 * tables, derived quantities and expectation verdicts. Digits follow format.ts.
 */
import type { FitResult, RunResult } from '../../result';
import { groupsNSentence } from './rows';
import {
  derivedBlock, expectationRows, expectationTally, fitHeading, goodnessEntries, modelLine, notFittedNote, PARAMETER_HEADERS,
  parameterRows, queryBlocks, robustLine, searchLine, stopLine, TRACE_HEADERS, traceHeading, traceRows, warningLines,
} from './summary';
import { append, maxOf, textTable } from './table';
import { flaggedPointRows, flaggedPointsNote } from './influence';
import { inlineText } from './escape';
import {
  detailIndices, detailNote, fitSections, groupCountLine, groupHeading, groupSummaryBlock, groupTableBlock, sharedSummaryLine, worstGroupLines, type FitSection,
} from './groups';
import { jointBlocks } from './joint';
import { hasProfileTable, PROFILE_HEADERS, profileLine, profileRows } from './profile';
import { BOOTSTRAP_ALIGN, BOOTSTRAP_HEADERS, bootstrapLine, bootstrapRows, derivedIntervalBlock, hasBootstrapTable } from './bootstrap';

/** The bootstrap section of a fit (engine/front/views/bootstrap.ts): a table, or the line saying why there is none. */
function bootstrapTextLines(fit: FitResult): string[] {
  const line = bootstrapLine(fit);
  if (!line) return [];
  const lines = ['', `  ${line}`];
  if (hasBootstrapTable(fit)) append(lines, textTable(BOOTSTRAP_HEADERS(fit.level), bootstrapRows(fit), [...BOOTSTRAP_ALIGN]));
  return lines;
}

/** The profile-interval section of a fit (engine/front/views/profile.ts): a table, or the line saying why there is none. */
function profileTextLines(fit: FitResult): string[] {
  const line = profileLine(fit);
  if (!line) return [];
  const lines = ['', `  ${line}`];
  if (hasProfileTable(fit)) append(lines, textTable(PROFILE_HEADERS(fit.level), profileRows(fit), ['left', 'right', 'right', 'left']));
  return lines;
}

/** The summary of one fit, as lines. */
export function fitTextLines(fit: FitResult): string[] {
  const search = searchLine(fit);
  const robust = robustLine(fit);
  const model = modelLine(fit);
  const lines: string[] = [fitHeading(fit), ...(model ? [`  ${model}`] : []), `  ${stopLine(fit)}`, ...(search ? [`  ${search}`] : []), ...(robust ? [`  ${robust}`] : [])];
  const marked = notFittedNote(fit);
  if (marked) lines.push(`  ! ${marked}`);
  lines.push('');
  append(lines, textTable(PARAMETER_HEADERS(fit.level), parameterRows(fit), ['left', 'right', 'right', 'right', 'right', 'left', 'left']));
  append(lines, profileTextLines(fit));
  append(lines, bootstrapTextLines(fit));
  lines.push('', '  Goodness of fit');
  const entries = goodnessEntries(fit);
  const w = maxOf(entries.map((e) => [...e.label].length));
  const vw = maxOf(entries.map((e) => e.value.length));
  for (const e of entries) {
    const line = `    ${e.label.padEnd(w)}  ${e.value.padStart(vw)}${e.note ? `   (${e.note})` : ''}`;
    lines.push(line);
  }
  const flagged = flaggedPointRows(fit);
  const flaggedNote = flaggedPointsNote(fit);
  if (flagged.rows.length) append(lines, '', '  Rows to check', textTable(flagged.headers, flagged.rows, flagged.align, '    '));
  if (flaggedNote) lines.push(`    ${flaggedNote}`);
  const warnings = warningLines(fit);
  if (warnings.length) {
    lines.push('', '  Warnings');
    for (const wline of warnings) lines.push(`    ! ${wline}`);
  }
  const trace = traceHeading(fit);
  if (trace) {
    lines.push('', `  ${trace}`, ...textTable(TRACE_HEADERS, traceRows(fit), ['right', 'right', 'right', 'right', 'right', 'right', 'right', 'left', 'left', 'left'], '    '));
  }
  return lines;
}

/** Query tables (predictions, inverse predictions, comparisons), as lines. */
export function queryTextLines(result: RunResult): string[] {
  const lines: string[] = [];
  for (const b of queryBlocks(result)) {
    if (lines.length) lines.push('');
    append(lines, b.heading, (b.lead ?? []).map((l) => `  ${l}`), b.rows.length ? textTable(b.headers, b.rows, b.align) : []);
    for (const n of b.notes) lines.push(`  ${n}`);
  }
  return lines;
}

/** The derived-quantity table and its notes, as lines (none when the run has no derived quantities). */
export function derivedTextLines(result: RunResult): string[] {
  const b = derivedBlock(result);
  if (!b) return [];
  const lines = append([b.heading], textTable(b.headers, b.rows, b.align), b.notes.map((n) => `  ${n}`));
  const iv = derivedIntervalBlock(result);
  if (iv) append(lines, '', iv.heading, textTable(iv.headers, iv.rows, iv.align), iv.notes.map((n) => `  ${n}`));
  return lines;
}

/** Expectation verdicts, one per line, and the tally. */
export function expectationTextLines(result: RunResult): string[] {
  if (result.expectations.length === 0) return [];
  const rows = expectationRows(result);
  const tw = maxOf(rows.map((r) => r.text.length));
  const lines = ['Expectations'];
  for (const r of rows) lines.push(`  ${r.verdict}  ${r.actual ? r.text.padEnd(tw) : r.text}${r.actual ? `  actual ${r.actual}` : ''}${r.verdict === 'FAIL' && r.message ? `  (${r.message})` : ''}`);
  lines.push(`  ${expectationTally(result)}`);
  return lines;
}

/** A per-group fit: heading, group table, counts, summary across groups, worst groups, and which groups follow in full. */
export function groupTextLines(section: Extract<FitSection, { kind: 'groups' }>, shown: readonly number[]): string[] {
  const t = section.table;
  const lines = [groupHeading(section), `  ${groupCountLine(t)}`, `  ${groupsNSentence(section.fits)}`, ''];
  const table = groupTableBlock(t);
  append(lines, textTable(table.headers, table.rows, table.align));
  const summary = groupSummaryBlock(t, section.shared);
  append(lines, '', `  Across converged groups`, textTable(summary.headers, summary.rows, summary.align, '    ', { mixed: true }));
  const sharedLine = sharedSummaryLine(t, section.shared);
  if (sharedLine) lines.push(`    ${sharedLine}`);
  const worst = worstGroupLines(t);
  if (worst.length) append(lines, '', '  Worst groups', worst.map((w) => `    ${w}`));
  const note = detailNote(section, shown.length);
  if (note) lines.push('', `  ${note}`);
  return lines;
}

/**
 * The run with its group labels (CSV cell text, any characters) in one-line
 * terminal form (escape.ts `inlineText`): the summary shows them escaped, in
 * headings, tables and lists alike, and no label can start a line of its own.
 */
function withTerminalLabels(result: RunResult): RunResult {
  const g = <T extends { group?: string }>(x: T): T => (x.group !== undefined ? { ...x, group: inlineText(x.group) } : x);
  return {
    ...result,
    fits: result.fits.map(g),
    queries: result.queries.map((q) => (q.kind === 'compare' ? q : g(q))),
    derived: result.derived?.map(g),
    expectations: result.expectations.map(g),
  };
}

/** The comparisons between groups of the run's joint fits (joint.ts), as lines. */
export function jointTextLines(result: RunResult): string[] {
  const lines: string[] = [];
  for (const b of jointBlocks(result.joint ?? [])) {
    if (lines.length) lines.push('');
    lines.push(b.heading, ...b.lead.map((l) => `  ${inlineText(l)}`));
    for (const t of b.tables) append(lines, '', `  ${t.title}`, textTable(t.headers, t.rows.map((r) => r.map(inlineText)), t.align, '    '));
    lines.push('', ...b.notes.map((n) => `  ${inlineText(n)}`));
  }
  return lines;
}

/** The whole run summary (fits, queries, derived quantities, expectations) ending with a newline. */
export function runText(run: RunResult): string {
  const result = withTerminalLabels(run);
  const sections: string[][] = [];
  for (const s of fitSections(result)) {
    if (s.kind === 'single') {
      sections.push(fitTextLines(s.fit));
      continue;
    }
    const shown = detailIndices(s);
    sections.push(groupTextLines(s, shown));
    for (const i of shown) sections.push(fitTextLines(result.fits[i]));
  }
  const j = jointTextLines(result);
  if (j.length) sections.push(j);
  const q = queryTextLines(result);
  if (q.length) sections.push(q);
  const d = derivedTextLines(result);
  if (d.length) sections.push(d);
  const e = expectationTextLines(result);
  if (e.length) sections.push(e);
  return sections.map((s) => s.join('\n')).join('\n\n') + '\n';
}
