/**
 * Checking the spec's `expect` statements against fit results. Bounds:
 * `within LOW .. HIGH` is LOW ≤ actual ≤ HIGH; `above X` is actual > X;
 * `below X` is actual < X. A non-finite or missing actual value fails.
 * Per-group fits give one result per group.
 */
import type { Bound, Expectation, StatisticName } from '../../parser/plan';
import { num } from '../messages';
import type { ExpectationResult, FitResult } from '../result';

/** The number an expectation reads from a fit result (NaN when it cannot be computed). */
export function statisticValue(result: FitResult, name: StatisticName): number {
  const g = result.goodness;
  switch (name) {
    case 'r2': return g.r2;
    case 'adj_r2': return g.adjR2;
    case 'rmse': return g.rmse;
    case 'ssr': return g.ssr;
    case 'chi2': return g.chi2 ?? NaN;
    case 'chi2_reduced': return g.chi2Reduced ?? NaN;
    case 'aic': return g.aic;
    case 'aicc': return g.aicc;
    case 'bic': return g.bic;
    case 'n': return g.n;
    case 'dof': return g.dof;
    case 'iterations': return result.iterations;
  }
}

export function boundHolds(actual: number, bound: Bound): boolean {
  if (!Number.isFinite(actual)) return false;
  switch (bound.kind) {
    case 'within': return actual >= bound.low && actual <= bound.high;
    case 'above': return actual > bound.value;
    case 'below': return actual < bound.value;
  }
}

function boundText(bound: Bound): string {
  switch (bound.kind) {
    case 'within': return `within ${num(bound.low)} .. ${num(bound.high)}`;
    case 'above': return `above ${num(bound.value)}`;
    case 'below': return `below ${num(bound.value)}`;
  }
}

function targetText(e: Expectation): string {
  const t = e.target;
  return t.kind === 'parameter' ? `${t.fit}.${t.name}${t.of === 'stderr' ? '.se' : ''}` : `${t.fit}.${t.name}`;
}

export function checkExpectations(expectations: readonly Expectation[], results: ReadonlyMap<string, FitResult[]>): ExpectationResult[] {
  const out: ExpectationResult[] = [];
  for (const e of expectations) {
    const fits = results.get(e.target.fit) ?? [];
    if (fits.length === 0) {
      out.push({ expectation: e, actual: null, passed: false, message: `${targetText(e)}: fit ${e.target.fit} has no result` });
      continue;
    }
    for (const r of fits) out.push(checkOne(e, r));
  }
  return out;
}

function checkOne(e: Expectation, r: FitResult): ExpectationResult {
  const where = r.group !== undefined ? ` [${r.group}]` : '';
  const group = r.group !== undefined ? { group: r.group } : {};
  const t = e.target;
  let actual: number;
  if (t.kind === 'parameter') {
    const par = r.parameters.find((p) => p.name === t.name);
    if (!par) return { expectation: e, ...group, actual: null, passed: false, message: `${targetText(e)}${where}: no parameter ${t.name}` };
    actual = t.of === 'estimate' ? par.estimate : par.stderr ?? NaN;
  } else {
    actual = statisticValue(r, t.name);
  }
  const passed = boundHolds(actual, e.bound);
  const failedFit = r.stop.code === 'failed' ? ` (the fit failed: ${r.stop.message})` : '';
  const message = !Number.isFinite(actual)
    ? `${targetText(e)}${where} could not be computed${failedFit}`
    : `${targetText(e)}${where} = ${num(actual)} is ${passed ? '' : 'not '}${boundText(e.bound)}`;
  return { expectation: e, ...group, actual: Number.isFinite(actual) ? actual : null, passed, message };
}
