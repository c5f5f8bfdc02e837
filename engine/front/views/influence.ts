/**
 * The influence, outlier, lack-of-fit and curvature parts of a fit's summary,
 * shared by the text summary, the Markdown report and the panel (they differ
 * only in layout): hints for the serial tests that follow their values, the
 * entries of the residual tests, and the table of the rows the rules flag.
 * Reads the RunResult only; thresholds come with the result
 * (`FitResult.influence`) or from engine/thresholds.ts (INFLUENCE_THRESHOLDS).
 */
import type { FitResult } from '../../result';
import type { Align } from './table';
import type { Entry } from './summary';
import { INFLUENCE_THRESHOLDS as T } from '../../thresholds';
import { THRESHOLDS } from '../../thresholds';
import { formatInteger, formatNumber, formatP, isUsable } from '../../format';

/** What the residuals' order is: along the predictor (single-predictor fits) or the rows as read. */
function orderText(fit: FitResult): string {
  return fit.predictor ? `in order of ${fit.predictor}` : 'in row order';
}

/**
 * The hint beside a Durbin–Watson d: its reading follows the value. Within durbinWatsonNear of 2 (common practice):
 * no sign of serial correlation; up to the warning's distance (THRESHOLDS.durbinWatsonDistance): a hint only;
 * beyond it: the reading of the warning.
 */
export function durbinWatsonHint(d: number, fit: FitResult): string {
  const order = orderText(fit);
  const off = Math.abs(d - 2);
  if (off <= T.durbinWatsonNear) return `${order}; near 2: no sign of serial correlation`;
  const side = d < 2
    ? 'neighbouring residuals alike (positive serial correlation, or a trend or bend the model misses)'
    : 'neighbouring residuals alternating in sign (negative serial correlation)';
  return off <= THRESHOLDS.durbinWatsonDistance
    ? `${order}; ${d < 2 ? 'below' : 'above'} 2: a hint of ${side}, not conclusive`
    : `${order}; far ${d < 2 ? 'below' : 'above'} 2: ${side}`;
}

/** The hint beside the runs test: counts, and what too few or too many runs mean when p < runsHintLevel. */
export function runsHint(runs: NonNullable<FitResult['residuals']['runs']>, fit: FitResult): string {
  const counts = `${runs.observed} runs, ${formatNumber(runs.expected, 3)} expected, ${orderText(fit)}`;
  if (!(runs.pValue < T.runsHintLevel)) return counts;
  return runs.observed < runs.expected
    ? `${counts}; fewer than expected: the residuals come in long stretches of one sign (a trend or bend the model misses)`
    : `${counts}; more than expected: the residuals alternate in sign more than chance would`;
}

/** Entries for the lack-of-fit test, the curvature test and the outlier test, after the other residual checks. */
export function influenceEntries(fit: FitResult): Entry[] {
  const out: Entry[] = [];
  const lof = fit.residuals.lackOfFit;
  if (lof) {
    if (lof.f !== null && lof.pValue !== null) {
      out.push({
        label: 'lack-of-fit test p',
        value: formatP(lof.pValue),
        note: `F(${lof.dfLackOfFit}, ${lof.dfPureError}) = ${formatNumber(lof.f, 4)} against pure error of ${lof.replicatedRows} replicated rows at ${lof.levels} settings`,
      });
    } else {
      out.push({ label: 'lack-of-fit test', value: 'not run', note: lof.note ?? undefined });
    }
  }
  const cv = fit.residuals.curvature;
  if (cv === null && fit.stop.converged) {
    out.push({
      label: 'curvature test',
      value: 'not run',
      note: fit.residuals.shapiroWilk === null && fit.residuals.runs === null && fit.residuals.durbinWatson === null
        ? 'residuals at rounding level or no degrees of freedom'
        : "the model's own shape already contains the squared fitted value (as a logistic curve's does), the fitted values are constant, or too few degrees of freedom",
    });
  }
  if (cv) {
    out.push({
      label: 'curvature test p',
      value: formatP(cv.pValue),
      note: `t = ${formatNumber(cv.t, 4)} on ${cv.dof} dof for an added squared fitted value${fit.influence?.linearised ? ' (linearised model)' : ''}`,
    });
  }
  const inf = fit.influence;
  if (inf) {
    const n = fit.goodness.n;
    const flagged = inf.outliers.length;
    out.push({
      label: 'outlier test',
      value: flagged === 0 ? 'none' : `${formatInteger(flagged)} row${flagged === 1 ? '' : 's'}`,
      note: inf.outlierCritical !== null
        ? `studentized deleted residuals, Bonferroni: |t| > ${formatNumber(inf.outlierCritical, 4)} (level ${formatNumber(inf.outlierLevel, 2)}/${n}, t on ${fit.goodness.dof - 1} dof)`
        : 'not run: too few degrees of freedom',
    });
  }
  return out;
}

const HEADERS = ['row', 'y', 'fitted', 'leverage', "Cook's D", 'deleted t', 'flags'];
const ALIGN: Align[] = ['right', 'right', 'right', 'right', 'right', 'right', 'left'];

/** Rows shown in the table of flagged rows (the JSON has every row). */
export const FLAGGED_ROWS_SHOWN = 20;

/**
 * The rows the influence rules flag, one line each (at most FLAGGED_ROWS_SHOWN), with their figures and flags;
 * `more` counts the rows left out. Empty when nothing is flagged or the fit has no influence report.
 */
export function flaggedPointRows(fit: FitResult): { headers: string[]; align: Align[]; rows: string[][]; more: number } {
  const inf = fit.influence;
  const withX = fit.points.x !== null;
  // the response's name, and the predictor's column after the row for single-predictor fits (user text: escaped by each view's table)
  const named = [HEADERS[0], fit.response || HEADERS[1], ...HEADERS.slice(2)];
  const headers = withX ? [named[0], fit.predictor ?? 'x', ...named.slice(1)] : named;
  const align = withX ? [ALIGN[0], 'right' as const, ...ALIGN.slice(1)] : ALIGN;
  if (!inf) return { headers, align, rows: [], more: 0 };
  // Bounded work for large fits: the distinct flagged rows are counted from one numeric sort of their
  // numbers, and flags and indices are gathered for the FLAGGED_ROWS_SHOWN rows shown only.
  const all = new Float64Array(inf.exact.length + inf.outliers.length + inf.influential.length + inf.highLeverage.length);
  let k = 0;
  for (const r of inf.exact) all[k++] = r;
  for (const r of inf.outliers) all[k++] = r.row;
  for (const r of inf.influential) all[k++] = r;
  for (const r of inf.highLeverage) all[k++] = r;
  all.sort();
  const ordered: number[] = [];
  let distinct = 0;
  for (let i = 0; i < all.length; i++) {
    if (i > 0 && all[i] === all[i - 1]) continue;
    distinct++;
    if (ordered.length < FLAGGED_ROWS_SHOWN) ordered.push(all[i]);
  }
  const shown = new Set(ordered);
  const flags = new Map<number, string[]>();
  const add = (row: number, flag: string) => {
    if (!shown.has(row)) return;
    const list = flags.get(row);
    if (list) list.push(flag);
    else flags.set(row, [flag]);
  };
  for (const r of inf.exact) add(r, 'leverage 1: passes through it');
  for (const r of inf.outliers) add(r.row, `outlier (adjusted p ${formatP(r.pValue)})`);
  const influentialFlag = `influential (D > ${formatNumber(inf.cooksCutoff, 3)})`;
  for (const r of inf.influential) add(r, influentialFlag);
  const leverageFlag = `high leverage (h > ${formatNumber(inf.leverageCutoff, 3)})`;
  for (const r of inf.highLeverage) add(r, leverageFlag);
  // indices of the shown rows only (one pass that stops when all are found, no map over every row of a large fit)
  const indexOf = new Map<number, number>();
  const rowsOfPoints = fit.points.row;
  for (let i = 0; i < rowsOfPoints.length && indexOf.size < shown.size; i++) {
    const r = rowsOfPoints[i];
    if (shown.has(r) && !indexOf.has(r)) indexOf.set(r, i);
  }
  const p = fit.points;
  const cell = (v: number | null | undefined) => (isUsable(v) ? formatNumber(v, 4) : 'n/a');
  const rows = ordered.map((r) => {
    const i = indexOf.get(r) ?? -1;
    return [
      formatInteger(r), ...(p.x ? [cell(p.x[i])] : []), cell(p.y[i]), cell(p.fitted[i]), cell(p.leverage[i]), cell(p.cooksDistance[i]), cell(p.deletedStudentized?.[i]),
      (flags.get(r) ?? []).join('; '),
    ];
  });
  return { headers, align, rows, more: Math.max(0, distinct - FLAGGED_ROWS_SHOWN) };
}

/** The line under the flagged-rows table: the rules and their sources, the rows worth a look by 4/n, and rows left out. */
export function flaggedPointsNote(fit: FitResult): string | null {
  const inf = fit.influence;
  if (!inf) return null;
  const { rows, more } = flaggedPointRows(fit);
  if (rows.length === 0 && inf.notable.length === 0) return null;
  const parts = [
    `Rules: leverage above 2p/n and Cook's distance above 1 (rules of thumb, common practice); outliers by the Bonferroni-adjusted test on the studentized deleted residuals (Weisberg, Applied Linear Regression, §9.1.3)${inf.linearised ? '; for this nonlinear model all figures are those of its linearisation at the estimate' : ''}.`,
  ];
  const influential = new Set(inf.influential);
  const notice = inf.notable.filter((r) => !influential.has(r));
  if (notice.length) parts.push(`Cook's distance above 4/n = ${formatNumber(inf.cooksNotice, 3)} (worth a look, common practice): row${notice.length === 1 ? '' : 's'} ${notice.slice(0, 10).join(', ')}${notice.length > 10 ? ` and ${notice.length - 10} more` : ''}.`);
  if (more > 0) parts.push(`${more} more flagged row${more === 1 ? '' : 's'} in the JSON output.`);
  return parts.join(' ');
}
