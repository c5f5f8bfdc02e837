/**
 * Checking the spec's `expect` statements against fit results and derived
 * quantities. Bounds: `within LOW .. HIGH` is LOW ≤ actual ≤ HIGH; `above X`
 * is actual > X; `below X` is actual < X. A non-finite or missing actual
 * value fails; so does an expectation on a fit that did not converge (its
 * values are not estimates), except on the counts n, dof and iterations. Per-group fits (and derived quantities of them) give one
 * result per group.
 */
import { memberName, type MemberOf } from '../../parser/registry/statistics';
import type { Bound, Expectation, ExpectTarget, StatisticName } from '../../parser/plan';
import { expectationText, withheldText } from '../messages';
import type { DerivedResult, ExpectationResult, FitResult, RunError } from '../result';
import { statisticValue } from './statistics';
import { suggest } from '../../parser/suggest';

/** Statistics are read through the one table of getters (statistics.ts); re-exported for the derived quantities. */
export { statisticValue };

export function boundHolds(actual: number, bound: Bound): boolean {
  if (!Number.isFinite(actual)) return false;
  switch (bound.kind) {
    case 'within': return actual >= bound.low && actual <= bound.high;
    case 'above': return actual > bound.value;
    case 'below': return actual < bound.value;
  }
}


/** `.se`, `.lower`, `.upper` after the name, or nothing for the estimate (parser/registry/statistics.ts MEMBER_SPECS). */
function member(of: MemberOf): string {
  const m = memberName(of);
  return m ? `.${m}` : '';
}

/** `."GROUP"` of a target naming one group, as the spec writes it. */
const groupText = (group: string | undefined): string => (group !== undefined ? `.${JSON.stringify(group)}` : '');

function targetText(e: Expectation): string {
  const t = e.target;
  switch (t.kind) {
    case 'parameter': return `${t.fit}${groupText(t.group)}.${t.name}${member(t.of)}`;
    case 'statistic': return `${t.fit}${groupText(t.group)}.${t.name}`;
    case 'derived': return `${t.name}${member(t.of)}`;
    case 'query': return `${t.fit}.${t.member} at ${t.column} = ${t.value}`;
  }
}

/** The number of a query target at its point (engine/run/queries.ts `queryNumber`), NaN with why when there is none. */
export type QueryNumber = (t: Extract<ExpectTarget, { kind: 'query' }>, r: FitResult, e: Expectation) => { value: number; why?: string };

/**
 * True when an expectation belongs to this run: its fit ran, or (for a
 * derived quantity) the quantity was evaluated.
 */
export function expectationApplies(e: Expectation, ran: (fit: string) => boolean, derived: readonly DerivedResult[]): boolean {
  const t = e.target;
  return t.kind === 'derived' ? derived.some((d) => d.name === t.name) : ran(t.fit);
}

export function checkExpectations(
  expectations: readonly Expectation[],
  results: ReadonlyMap<string, FitResult[]>,
  derived: readonly DerivedResult[] = [],
  queryNumber?: QueryNumber,
  /** Located errors of the run: a group label the fit does not have is also reported here. */
  errors?: RunError[],
): ExpectationResult[] {
  const out: ExpectationResult[] = [];
  for (const e of expectations) {
    const t = e.target;
    if (t.kind === 'derived') {
      const rows = derived.filter((d) => d.name === t.name);
      if (rows.length === 0) out.push({ expectation: e, actual: null, passed: false, message: expectationText.noDerived(targetText(e), t.name) });
      for (const d of rows) out.push(checkDerived(e, d));
      continue;
    }
    const all = results.get(t.fit) ?? [];
    if (all.length === 0) {
      out.push({ expectation: e, actual: null, passed: false, message: expectationText.noResult(targetText(e), t.fit) });
      continue;
    }
    // FIT."GROUP".NAME: that one group's result only
    const pinned = t.kind !== 'query' ? t.group : undefined;
    const fits = pinned === undefined ? all : all.filter((r) => r.group === pinned);
    if (fits.length === 0) {
      const labels = all.map((r) => r.group).filter((g): g is string => g !== undefined);
      const message = expectationText.noGroup(targetText(e), t.fit, pinned!, suggest(pinned!, labels));
      errors?.push({ code: 'unknown_group', message, range: e.range, fit: t.fit });
      out.push({ expectation: e, actual: null, passed: false, message });
      continue;
    }
    for (const r of fits) out.push(checkOne(e, r, queryNumber));
  }
  return out;
}

function verdict(e: Expectation, actual: number, where: string, why: string): { actual: number | null; passed: boolean; message: string } {
  const passed = boundHolds(actual, e.bound);
  const message = !Number.isFinite(actual)
    ? expectationText.notComputed(`${targetText(e)}${where}`, why)
    : expectationText.verdict(`${targetText(e)}${where}`, actual, passed, expectationText.bound(e.bound));
  return { actual: Number.isFinite(actual) ? actual : null, passed, message };
}

function checkDerived(e: Expectation, d: DerivedResult): ExpectationResult {
  const where = d.group !== undefined ? ` [${d.group}]` : '';
  const group = d.group !== undefined ? { group: d.group } : {};
  const of = e.target.kind === 'derived' ? e.target.of : 'estimate';
  const actual = (of === 'stderr' ? d.stderr : of === 'lower' ? d.lower : of === 'upper' ? d.upper : d.value) ?? NaN;
  return { expectation: e, ...group, ...verdict(e, actual, where, ` (${d.note.replace(/\.$/, '')})`) };
}

function checkOne(e: Expectation, r: FitResult, queryNumber?: QueryNumber): ExpectationResult {
  const where = r.group !== undefined ? ` [${r.group}]` : '';
  const group = r.group !== undefined ? { group: r.group } : {};
  const t = e.target;
  if (t.kind === 'derived') return { expectation: e, ...group, actual: null, passed: false, message: expectationText.notFitTarget(targetText(e)) };
  // a fit that did not converge has no estimates to check; the counts of the run (n, dof, iterations) still hold
  const count = t.kind === 'statistic' && (t.name === 'n' || t.name === 'dof' || t.name === 'iterations');
  if (!r.stop.converged && !count) {
    return { expectation: e, ...group, actual: null, passed: false, message: withheldText.expectation(`${targetText(e)}${where}`, t.fit, r.stop.code === 'failed' ? `failed: ${r.stop.message}` : r.stop.code) };
  }
  let actual: number;
  if (t.kind === 'parameter') {
    const par = r.parameters.find((p) => p.name === t.name);
    if (!par) return { expectation: e, ...group, actual: null, passed: false, message: expectationText.noParameter(`${targetText(e)}${where}`, t.name) };
    actual = (t.of === 'estimate' ? par.estimate : t.of === 'stderr' ? par.stderr : t.of === 'lower' ? par.lower : par.upper) ?? NaN;
  } else if (t.kind === 'query') {
    const got = queryNumber ? queryNumber(t, r, e) : { value: NaN, why: '' };
    return { expectation: e, ...group, ...verdict(e, got.value, where, got.why ? ` (${got.why.replace(/\.$/, '')})` : '') };
  } else {
    actual = statisticValue(r, t.name);
  }
  return { expectation: e, ...group, ...verdict(e, actual, where, '') };
}
