/**
 * A quoted group label (`FIT."GROUP".NAME` in derive and expect) against the
 * labels found in the data: the distinct values of the fit's `per` column, read
 * by the caller (`CheckContext.groupLabels`, the same reader for the checker and
 * editor completion). A label that is no value of the column is reported where
 * it is written, with the nearest labels; unknown labels (no reader, file not
 * read) are left to the run, which reports `unknown_group` too. Labels that the
 * data's `where` condition removes by a text comparison on the label column
 * (`where sample != "Blank"`) are no groups (`labelsKept`).
 */
import type { Expr, Range } from './plan';
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
    // the rows the data's where condition removes by their label alone are no group either (labelsKept)
    return Array.isArray(labels) ? [...labelsKept(d.plan.filter, column, labels.map(String))] : undefined;
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

/**
 * The labels a data source's `where` condition keeps, when the condition reads only the label column through
 * text comparisons (`sample != "Blank"`, `and`, `or`, `not`): those are exact (a cell equals the text or not);
 * any other condition (numbers, other columns) cannot be decided from the labels, so all are returned.
 */
export function labelsKept(where: Expr | undefined, column: string, labels: readonly string[]): readonly string[] {
  if (!where) return labels;
  const test = (e: Expr, label: string): boolean | null => {
    switch (e.kind) {
      case 'compare': {
        if (e.op !== '==' && e.op !== '!=') return null;
        const [col, text] = e.left.kind === 'column' ? [e.left, e.right] : [e.right, e.left];
        if (col.kind !== 'column' || col.name !== column || text.kind !== 'text') return null;
        return (label === text.value) === (e.op === '==');
      }
      case 'logic': {
        const l = test(e.left, label);
        const r = test(e.right, label);
        return l === null || r === null ? null : e.op === 'and' ? l && r : l || r;
      }
      case 'not': {
        const v = test(e.arg, label);
        return v === null ? null : !v;
      }
      default:
        return null;
    }
  };
  const kept: string[] = [];
  for (const l of labels) {
    const v = test(where, l);
    if (v === null) return labels;
    if (v) kept.push(l);
  }
  return kept;
}
