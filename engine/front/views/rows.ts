/**
 * How a fit's n came from its data rows, in words: the one wording of the
 * reasons a row is left out (result.ts `RowLeftOutReason`, counted once in
 * engine/run/fit-data.ts), used wherever a view states n — the CLI summary and
 * the Markdown report (goodness of fit, the per-group heading) and the results
 * panel's header (extension/logic/panel-rows.ts). The JSON carries the same
 * counts as data (`FitResult.rowAccount`). Parity of the views:
 * test/front/views/rows.test.ts.
 *
 *   n = 14 fitted (of 17 rows: 1 removed by where, 1 with an empty or NA cell, 1 with weight 0)
 */
import { ROW_LEFT_OUT_REASONS, type FitResult, type RowAccount, type RowLeftOutReason } from '../../result';
import { formatInteger } from '../../format';

/** Each reason as it follows its count ("2 removed by where"). */
export const ROW_REASON_TEXT: Record<RowLeftOutReason, string> = {
  where: 'removed by where',
  missing_cell: 'with an empty or NA cell',
  no_group: 'without a group label',
  weight_zero: 'with weight 0',
};

/**
 * The fit's account: `rowAccount` as the engine wrote it, or for a result written before it existed, what the
 * older fields say (rows dropped for empty cells, rows with weight 0; rows a `where` removed are not known there).
 */
export function accountOf(fit: FitResult): RowAccount {
  if (fit.rowAccount) return fit.rowAccount;
  const counts: [RowLeftOutReason, number][] = [['missing_cell', fit.rowsDropped], ['weight_zero', fit.excluded?.row.length ?? 0]];
  const leftOut = counts.filter(([, c]) => c > 0).map(([reason, count]) => ({ reason, count }));
  return { rows: fit.goodness.n + leftOut.reduce((a, l) => a + l.count, 0), fitted: fit.goodness.n, leftOut };
}

/** Rows left out in all. */
export function leftOutTotal(a: RowAccount): number {
  return a.leftOut.reduce((k, l) => k + l.count, 0);
}

/** Text appended after a reason's count in one view (the panel adds file lines), keyed by reason. */
export type ReasonDetail = Partial<Record<RowLeftOutReason, string>>;

/** "of 17 rows: 1 removed by where, 1 with an empty or NA cell", or null when no row was left out. */
export function leftOutClause(a: RowAccount, detail: ReasonDetail = {}): string | null {
  if (!a.leftOut.length) return null;
  const parts = ROW_LEFT_OUT_REASONS.flatMap((r) => {
    const l = a.leftOut.find((x) => x.reason === r);
    return l ? [`${formatInteger(l.count)} ${ROW_REASON_TEXT[r]}${detail[r] ?? ''}`] : [];
  });
  return `of ${formatInteger(a.rows)} row${a.rows === 1 ? '' : 's'}: ${parts.join(', ')}`;
}

/** "n = 14 fitted (of 17 rows: …)", or "n = 14 fitted (every row)" when nothing was left out; `over` names what n spans ("over 2 groups"). */
export function nSentence(a: RowAccount, detail: ReasonDetail = {}, over?: string): string {
  const clause = leftOutClause(a, detail);
  return `n = ${formatInteger(a.fitted)} fitted${over ? ` ${over}` : ''} (${clause ?? `all ${formatInteger(a.rows)} row${a.rows === 1 ? '' : 's'}`})`;
}

/** The account of a per-group fit as a whole: the engine's `fitRowAccount`, else the groups' accounts added up. */
export function groupsAccount(fits: readonly FitResult[]): RowAccount {
  const whole = fits.find((f) => f.fitRowAccount)?.fitRowAccount;
  if (whole) return whole;
  const counts = new Map<RowLeftOutReason, number>();
  let fitted = 0;
  for (const f of fits) {
    const a = accountOf(f);
    fitted += a.fitted;
    for (const l of a.leftOut) counts.set(l.reason, (counts.get(l.reason) ?? 0) + l.count);
  }
  const leftOut = ROW_LEFT_OUT_REASONS.filter((r) => counts.has(r)).map((reason) => ({ reason, count: counts.get(reason)! }));
  return { rows: fitted + leftOut.reduce((a, l) => a + l.count, 0), fitted, leftOut };
}

/** The line under a per-group heading: "n = 14 fitted over 2 groups (of 17 rows: …)". */
export function groupsNSentence(fits: readonly FitResult[]): string {
  return nSentence(groupsAccount(fits), {}, `over ${formatInteger(fits.length)} group${fits.length === 1 ? '' : 's'}`);
}
