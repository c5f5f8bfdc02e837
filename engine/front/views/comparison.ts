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
 * engine/stats/compare.ts.
 */
import type { QueryResult } from '../../result';
import { formatInteger, formatNumber, formatP } from '../../format';
import { AICC_CLEAR, AICC_TIE } from '../../thresholds';
import { withheldText } from '../../messages';
import type { Align } from './table';

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

export function comparisonBlock(q: Comparison): ComparisonBlock {
  const heading = `${COMPARISON_HEADING}: ${q.fits.join(', ')}`;
  if (q.withheld) return { heading, lead: [], headers: [], rows: [], align: [], notes: [q.withheld] };
  const ranked = q.rows.filter((r) => Number.isFinite(r.aicc)).sort((a, b) => a.aicc - b.aicc);
  const best = ranked[0] ?? q.rows[0];
  const lead = q.rows.filter((r) => r !== best).map((r) => decisionSentence(best, r));
  if (q.fTest) lead.push(nestedTestSentence(q.fTest));
  const measure = (label: string, cell: (r: Row) => string): string[] => [label, ...q.rows.map(cell)];
  const rows = [
    measure('points', (r) => formatInteger(r.n)),
    measure('free parameters', (r) => formatInteger(r.p)),
    measure('residual sum of squares', (r) => formatNumber(r.ssr, 6)),
    measure('AICc', (r) => formatNumber(r.aicc, 6)),
    measure('AICc above the lowest', (r) => formatNumber(r.deltaAicc, 3)),
    measure('Akaike weight', (r) => formatNumber(r.akaikeWeight, 3)),
  ];
  const notes = q.leftOut?.length ? [withheldText.compareLeftOut(q.leftOut)] : [];
  notes.push('AICc weighs how closely a model follows the data against how many parameters it spends; the Akaike weights share the support among these fits and add up to 1.');
  if (q.fTest) notes.push(`The nested test holds only if ${q.fTest.simpler} is ${q.fTest.richer} with some parameters fixed; the spec says which fits are nested, the test does not check it.`);
  return { heading, lead, headers: ['evidence', ...q.rows.map((r) => r.fit)], rows, align: ['left', ...q.rows.map((): Align => 'right')], notes };
}
