/**
 * The comparison between groups of a joint fit (engine/run/joint.ts,
 * joint-compare.ts) as view-neutral blocks, rendered by the text summary and
 * the Markdown report alike: the joint solve and its shared estimates, the
 * shared-versus-separate F tests with the reading of each, and the pairwise
 * differences and ratios of the per-group parameters.
 */
import type { JointFitResult, NestedFTest } from '../../result';
import { inlineText as label } from './escape';
import { DIGITS, formatEstimate, formatInterval, formatLevel, formatNumber, formatP, pClause } from '../../format';

export interface JointTable {
  title: string;
  headers: string[];
  rows: string[][];
  align: ('left' | 'right')[];
}

export interface JointBlock {
  heading: string;
  /** Sentences before the tables. */
  lead: string[];
  tables: JointTable[];
  /** Sentences after the tables (readings and cautions). */
  notes: string[];
}

/** The caution every comparison block ends with (the tests are checks, not a validated suitability procedure). */
export const JOINT_CAUTION =
  'These tests are statistical checks of this data set. Where the comparison feeds a release, potency or other regulated ' +
  'decision, use the validated procedure of the laboratory (for bioassays, equivalence limits set in advance, as USP general ' +
  'chapter <1034> describes) and have the result reviewed by qualified people.';

function ssrPair(t: NestedFTest): string {
  return `${formatNumber(t.restricted.ssr)} → ${formatNumber(t.general.ssr)}`;
}

function reading(t: NestedFTest, alpha: number, what: string, groups = 'groups'): string {
  if (t.note) return `${what}: ${t.note}.`;
  return t.pValue < alpha
    ? `${what}: the ${groups} differ (${pClause(t.pValue)} < ${formatNumber(alpha)}); a common value does not describe them.`
    : `${what}: no evidence that the ${groups} differ (${pClause(t.pValue)} ≥ ${formatNumber(alpha)}); this does not show they are equal.`;
}

/** The words for a joint fit's groups: the values of a column, or the tables of a fit over several tables (`over: 'tables'`). */
function groupWords(j: JointFitResult): { one: string; many: string; per: string; over: string } {
  const n = j.groups.length;
  if (j.over === 'tables') return { one: 'table', many: 'tables', per: 'per table', over: `${n} table${n === 1 ? '' : 's'} (${j.groups.map(label).join(', ')})` };
  return { one: 'group', many: 'groups', per: 'per group', over: `${n} group${n === 1 ? '' : 's'} of ${label(j.groupBy)}` };
}

export function jointBlocks(joint: readonly JointFitResult[]): JointBlock[] {
  return joint.map((j) => {
    const alpha = 1 - j.level;
    const level = formatLevel(j.level);
    const w = groupWords(j);
    const lead = [
      `Joint fit over ${w.over}: ${j.stop.converged ? 'converged' : 'NOT converged'} (${j.stop.code}: ${j.stop.message}; ${j.iterations} iterations).`,
      `n ${j.n}, ${j.p} parameters (${j.shared.length} shared + ${j.groups.length} × ${j.perGroup.length} ${w.per}), ${j.dof} degrees of freedom, SSR ${formatNumber(j.ssr)}, s ${formatNumber(j.rmse)}.`,
      ...j.leftOut.map((l) => `Left out: ${label(l.group)} (${l.reason}).`),
      // the lack-of-fit test pooled over the groups (engine/run/joint-group-stats.ts)
      ...(j.lackOfFit && j.lackOfFit.f !== null && j.lackOfFit.pValue !== null
        ? [`Lack of fit, pooled over the groups: F(${j.lackOfFit.dfLackOfFit}, ${j.lackOfFit.dfPureError}) = ${formatNumber(j.lackOfFit.f, DIGITS.statistic)}, p = ${formatP(j.lackOfFit.pValue)} (pure error of ${j.lackOfFit.replicatedRows} replicated rows at ${j.lackOfFit.levels} settings within the groups).`]
        : []),
    ];
    const tables: JointTable[] = [];
    tables.push({
      title: 'Shared parameters',
      headers: ['parameter', 'estimate', 'std. error', `${level} low`, `${level} high`, 'unit'],
      rows: j.estimates.map((e) => {
        const f = formatEstimate(e.estimate, e.stderr, e.lower, e.upper);
        return [e.name, f.estimate, f.stderr, f.lower, f.upper, e.unit ?? ''];
      }),
      align: ['left', 'right', 'right', 'right', 'right', 'left'],
    });
    const tests: string[][] = [];
    if (j.sharedVsSeparate) {
      const t = j.sharedVsSeparate;
      tests.push([`all of ${j.shared.join(', ')}`, formatNumber(t.f, DIGITS.statistic), `${t.df1}, ${t.df2}`, formatP(t.pValue), ssrPair(t)]);
    }
    for (const t of j.perParameter) tests.push([t.parameter, formatNumber(t.f, DIGITS.statistic), `${t.df1}, ${t.df2}`, formatP(t.pValue), ssrPair(t)]);
    if (tests.length) {
      tables.push({
        title: `Shared or ${w.per} (extra-sum-of-squares F test: the joint fit against the fit with these parameters ${w.per})`,
        headers: [`${w.per} instead`, 'F', 'df', 'p', `SSR shared → ${w.per}`],
        rows: tests,
        align: ['left', 'right', 'right', 'right', 'right'],
      });
    }
    if (j.pairs.length) {
      tables.push({
        title: `Between ${w.many} (b − a with a Student-t interval, b / a with Fieller's interval, ${level})`,
        headers: ['parameter', 'a', 'b', 'b − a', 'interval', 'b / a', 'interval'],
        rows: j.pairs.map((p) => {
          // The difference to the digits of its standard error (JCGM 100:2008, 7.2.6; engine/format.ts rule 4).
          const d = formatEstimate(p.difference, p.differenceSe, p.differenceLower, p.differenceUpper);
          return [
          p.parameter, p.a, p.b,
          d.estimate, `[${d.lower}, ${d.upper}]`,
          formatNumber(p.ratio, DIGITS.statistic),
          p.ratioLower === null || p.ratioUpper === null ? 'not bounded' : formatInterval(p.ratioLower, p.ratioUpper, DIGITS.statistic),
          ];
        }),
        align: ['left', 'left', 'left', 'right', 'right', 'right', 'right'],
      });
    }
    const notes: string[] = [];
    if (j.sharedVsSeparate) notes.push(reading(j.sharedVsSeparate, alpha, `Shared ${j.shared.join(', ')}`, w.many));
    else notes.push(`No test of all shared parameters at once: a ${w.one}'s separate fit did not converge.`);
    if (j.perGroup.length === 1 && j.sharedVsSeparate) {
      notes.push(`With ${j.perGroup[0]} the only parameter per group, this is the parallelism check of a relative-potency comparison (common practice): the ratio of ${j.perGroup[0]} between two groups is then their relative potency (or its inverse).`);
    }
    // (with one shared parameter its own test is the one above)
    if (j.shared.length > 1 || !j.sharedVsSeparate) for (const t of j.perParameter) notes.push(reading(t, alpha, t.parameter, w.many));
    notes.push(JOINT_CAUTION);
    return { heading: `Between ${w.many}: ${j.fit}`, lead, tables, notes };
  });
}
