/**
 * A quoted group label (`FIT."GROUP".NAME` in derive and expect) against the
 * labels found in the data: the distinct values of the fit's `per` column, read
 * by the caller (`CheckContext.groupLabels`, the same reader for the checker and
 * editor completion). A label that is no value of the column is reported where
 * it is written, with the nearest labels; unknown labels (no reader, file not
 * read) are left to the run, which reports `unknown_group` too.
 */
import type { Range } from './plan';
import type { Env, FitInfo } from './check-env';
import { MSG } from './messages';

/** The labels of a fit's groups, when known. */
export function groupLabelsOf(env: Env, fit: FitInfo): readonly string[] | undefined {
  const column = fit.plan.groupBy;
  const dataName = fit.plan.blocks[0]?.data;
  if (column === undefined || dataName === undefined) return undefined;
  const d = env.data.get(dataName);
  if (!d) return undefined;
  try {
    const labels = env.ctx.groupLabels?.(dataName, d.plan.path, column, { ...(d.plan.delimiter ? { delimiter: d.plan.delimiter } : {}), ...(d.plan.decimal ? { decimal: d.plan.decimal } : {}) });
    return Array.isArray(labels) ? labels.map(String) : undefined;
  } catch {
    return undefined; // a failing callback means "labels unknown", not a crash
  }
}

/** False (and a located `unknown_group`) when the labels are known and `group` is not one of them. */
export function checkGroupLabel(env: Env, fit: FitInfo | undefined, group: string, range: Range): boolean {
  if (!fit) return true;
  const labels = groupLabelsOf(env, fit);
  if (!labels || labels.includes(group)) return true;
  env.r.report('unknown_group', MSG.unknownGroup(fit.plan.name, group, fit.plan.groupBy ?? ''), range, env.suggester.suggest(group, labels));
  return false;
}
