/**
 * The comparison of fits (`compare a, b`) as the views show it, shared by the
 * CLI text, the Markdown report and the results panel: a block headed "Which
 * model the data support", which says first, in one plain sentence per pair,
 * what the data favour, then gives the evidence — the nested test when there
 * is one, and a table with one column per fit and one row per measure.
 *
 * The sentence reads the AICc difference Δ between the fit with the lowest
 * AICc and each other fit, on the scale of Burnham & Anderson (2002, Model
 * Selection and Multimodel Inference, 2nd ed., §2.6, p. 70): Δ ≤ 2, both
 * have substantial support; Δ above 10, the other has essentially none; in
 * between, less support for the other. The F test's p is stated as what it
 * is, without a verdict of its own: the statistics are those of
 * engine/stats/compare.ts. The F test is there only for two fits whose
 * nesting was established or declared (engine/run/nesting.ts); otherwise the
 * block says why it is not shown. Fits that failed or did not converge are
 * not ranked: the lead names them and the notes give each one's reason.
 */
import type { QueryResult } from '../../result';
import { formatInteger, formatNumber, formatP } from '../../format';
import { AICC_CLEAR, AICC_TIE } from '../../thresholds';
import { compareText } from '../../messages';
import type { Align } from './table';
import { inlineText } from './escape';

type Comparison = Extract<QueryResult, { kind: 'compare' }>;
type Row = Comparison['rows'][number];


/** A comparison for the views: heading, the decision sentences (`lead`), the evidence table and closing notes. */
export interface ComparisonBlock {
  heading: string;
  lead: string[];
  headers: string[];
  rows: string[][];
  align: Align[];
  notes: string[];
}

export const COMPARISON_HEADING = 'Which model the data support';

/** What the data say about one pair: the fit with the lowest AICc (`best`) against `other`. */
export function decisionSentence(best: Row, other: Row): string {
  const delta = other.aicc - best.aicc;
  if (!Number.isFinite(delta)) {
    const missing = Number.isFinite(best.aicc) ? other.fit : best.fit;
    return `No verdict between ${best.fit} and ${other.fit}: ${missing} has no AICc (too few points for its parameters).`;
  }
  const by = formatNumber(delta, 3);
  if (delta <= AICC_TIE) return `The data do not tell ${best.fit} and ${other.fit} apart: their AICc differ by ${by}, within ${AICC_TIE}.`;
  if (delta > AICC_CLEAR) return `The data clearly favour ${best.fit} over ${other.fit}: its AICc is lower by ${by}, more than ${AICC_CLEAR}.`;
  return `The data favour ${best.fit} over ${other.fit}: its AICc is lower by ${by}.`;
}

/** The nested test in words: how many parameters the richer fit adds, F with its degrees of freedom, and what p means. */
export function nestedTestSentence(t: NonNullable<Comparison['fTest']>): string {
  const more = `${t.df1} more parameter${t.df1 === 1 ? '' : 's'}`;
  const p = formatP(t.pValue);
  return `Nested test: ${t.richer} has ${more} than ${t.simpler}; F(${t.df1}, ${t.df2}) = ${formatNumber(t.f, 4)}, p ${p.startsWith('<') ? p : `= ${p}`}, the chance that scatter alone would lower the residual sum of squares this much.`;
}

/** A nesting detail as a sentence of the lead. */
const sentence = (t: string) => `Nesting: ${t}${t.endsWith('.') ? '' : '.'}`;

export function comparisonBlock(q: Comparison): ComparisonBlock {
  const heading = `${COMPARISON_HEADING}: ${q.fits.join(', ')}`;
  if (q.withheld) return { heading, lead: [], headers: [], rows: [], align: [], notes: [q.withheld] };
  const ranked = q.rows.filter((r) => Number.isFinite(r.aicc)).sort((a, b) => a.aicc - b.aicc);
  const best = ranked[0] ?? q.rows[0];
  const lead = q.rows.filter((r) => r !== best).map((r) => decisionSentence(best, r));
  const excluded = q.excluded ?? [];
  if (q.rows.length === 1) lead.push(compareText.onlyOne(q.rows[0].fit));
  if (excluded.length) lead.push(compareText.leftOut(excluded.map((e) => e.fit)));
  if (q.nesting) lead.push(sentence(q.nesting.detail));
  if (q.fTest) lead.push(nestedTestSentence(q.fTest));
  else if (q.noFTest && q.rows.length >= 2) lead.push(q.noFTest);
  const measure = (label: string, cell: (r: Row) => string): string[] => [label, ...q.rows.map(cell)];
  const rows = [
    measure('points', (r) => formatInteger(r.n)),
    measure('free parameters', (r) => formatInteger(r.p)),
    measure('residual sum of squares', (r) => formatNumber(r.ssr, 6)),
    measure('AICc', (r) => formatNumber(r.aicc, 6)),
    measure('AICc above the lowest', (r) => formatNumber(r.deltaAicc, 3)),
    measure('Akaike weight', (r) => formatNumber(r.akaikeWeight, 3)),
  ];
  const notes = ['AICc weighs how closely a model follows the data against how many parameters it spends; the Akaike weights share the support among these fits and add up to 1.'];
  if (q.grouped) {
    const g = q.grouped;
    notes.unshift(compareText.wholeNote(g.groups.length, g.over === 'tables' ? 'tables' : `groups of ${inlineText(g.by)}`));
    if (g.noPerGroup) notes.push(g.noPerGroup);
  }
  if (q.fTest && q.nesting?.status === 'declared') notes.push(`The nested test holds only if ${q.fTest.simpler} is ${q.fTest.richer} with some parameters fixed or tied; the spec declares it, so the test rests on that declaration.`);
  for (const e of excluded) notes.push(`${e.fit} left out: ${e.reason}.`);
  return { heading, lead, headers: ['evidence', ...q.rows.map((r) => r.fit)], rows, align: ['left', ...q.rows.map((): Align => 'right')], notes };
}

/**
 * The group-by-group table of a `compare` of per-group fits (`grouped.perGroup`; engine/run/compare-groups.ts):
 * one row per group with each fit's AICc, the fit the group's data favour (on the scale of `decisionSentence`)
 * and, for two fits, the group's nested F test; null when there is no such table.
 */
export function groupComparisonBlock(q: Comparison): ComparisonBlock | null {
  const g = q.grouped;
  if (!g?.perGroup || q.withheld) return null;
  const two = q.fits.length === 2;
  const what = g.over === 'tables' ? 'table' : inlineText(g.by);
  const headers = [g.over === 'tables' ? 'table' : 'group', ...q.fits.map((f) => `AICc ${f}`), 'favoured', 'AICc above', ...(two ? ['F', 'df', 'p'] : [])];
  const verdict = (r: NonNullable<typeof g.perGroup>[number]) => (r.best === null ? 'n/a' : r.deltaAicc <= AICC_TIE ? 'neither' : r.best);
  const rows = g.perGroup.map((r) => [
    inlineText(r.group),
    ...r.aicc.map((v) => formatNumber(v, 6)),
    verdict(r),
    formatNumber(r.deltaAicc, 3),
    ...(two ? (r.fTest ? [formatNumber(r.fTest.f, 4), `${r.fTest.df1}, ${r.fTest.df2}`, formatP(r.fTest.pValue)] : ['', '', '']) : []),
  ]);
  const count = (v: string) => g.perGroup!.filter((r) => verdict(r) === v).length;
  const lead = [
    [...q.fits.map((f) => `${f} favoured in ${count(f)}`), `neither (AICc within ${AICC_TIE}) in ${count('neither')}`].join(', ') + ` of ${g.perGroup.length} ${what === 'table' ? 'tables' : 'groups'}.`,
  ];
  const noF = [...new Set(g.perGroup.filter((r) => !r.fTest && r.noFTest).map((r) => r.noFTest!))];
  const notes = two ? noF.map((n) => (g.perGroup!.every((r) => !r.fTest) ? n : `Some groups: ${n}`)) : [];
  notes.push('Each row compares the two fits of that group alone, with its own residual variance; the groups are independent fits, so a p-value below 0.05 will appear in about one group in twenty by chance.');
  return {
    heading: `Group by group: ${q.fits.join(', ')}`,
    lead,
    headers,
    rows,
    align: ['left', ...q.fits.map((): Align => 'right'), 'left', 'right', ...(two ? (['right', 'right', 'right'] as Align[]) : [])],
    notes,
  };
}
