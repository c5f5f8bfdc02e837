/**
 * The `compare` query over finished fits: AICc, ΔAICc and Akaike weights of
 * the fits that are results (engine/stats/compare.ts), and the
 * extra-sum-of-squares F test only for two fits whose nesting is established
 * (engine/run/nesting.ts) or declared by the spec (`compare a within b`).
 *
 * - A fit that failed or did not converge is left out of the ranking, listed
 *   in `excluded` with its stop code and why; the others are still ranked.
 * - The F test also needs the same rows, the same weighting (the same `sigma`
 *   or `weight` expression, so both sums of squares are on one scale) and the
 *   squared loss; otherwise `noFTest` says why there is none.
 */
import type { FitPlan, Query } from '../../parser/plan';
import { compareText, errorText, runText } from '../messages';
import type { CompareExclusion, CompareNesting, FitResult, QueryResult, RunError } from '../result';
import { akaikeRows, nestedF, type CompareInput, type FTestRefusal } from '../stats/compare';
import { exprText } from '../../parser/plan-expr';
import { checkNesting, NESTING_TOLERANCE, TRIALS } from './nesting';

export interface CompareContext {
  fitPlans: ReadonlyMap<string, FitPlan>;
  results: ReadonlyMap<string, FitResult[]>;
}

type Out = { results: QueryResult[]; errors: RunError[] };
type Compare = Extract<Query, { kind: 'compare' }>;

export interface Ranked {
  input: CompareInput;
  plan: FitPlan;
  result: FitResult;
}

export function compareQuery(q: Compare, ctx: CompareContext): Out {
  const ranked: Ranked[] = [];
  const excluded: CompareExclusion[] = [];
  for (const name of q.fits) {
    const plan = ctx.fitPlans.get(name);
    if (!plan) return { results: [], errors: [{ code: 'unknown_fit', message: errorText.unknownFit(name), range: q.range }] };
    const results = ctx.results.get(name) ?? [];
    if (results.length === 0) return { results: [], errors: [{ code: 'fit_not_run', message: runText.fitNotRun(name), range: q.range, fit: name }] };
    if (results.length !== 1 || results[0].group !== undefined) {
      // (fits with groups are compared by engine/run/compare-groups.ts; here only a plan without groups that gave several results)
      const other = q.fits.find((f) => f !== name) ?? name;
      return { results: [], errors: [{ code: 'compare_grouped', message: errorText.comparePerGroup(name, other), range: q.range, fit: name }] };
    }
    const r = results[0];
    if (!r.stop.converged) {
      excluded.push({ fit: name, code: r.stop.code, reason: compareText.excluded(r.stop.code, r.stop.message) });
      continue;
    }
    const g = r.goodness;
    ranked.push({ input: { fit: name, n: g.n, p: g.p, ssr: g.ssr, aic: g.aic, aicc: g.aicc, bic: g.bic }, plan, result: r });
  }
  const plans = ranked.map((x) => x.plan);
  const sameData = plans.every(
    (p) => p.blocks[0].data === plans[0].blocks[0].data && exprText(p.blocks[0].response) === exprText(plans[0].blocks[0].response),
  );
  const errors: RunError[] = [];
  if (!sameData || ranked.some((r) => r.input.n !== ranked[0].input.n)) {
    errors.push({ code: 'compare_different_data', message: errorText.compareMismatch(q.fits), range: q.range });
  }
  const test = ranked.length === 2 && sameData ? pairTest(ranked[0], ranked[1], q.within === true ? q.fits : null) : { noFTest: noPair(ranked.length, sameData) };
  return {
    results: [{
      kind: 'compare',
      fits: [...q.fits],
      rows: akaikeRows(ranked.map((r) => r.input)),
      ...('fTest' in test && test.fTest ? { fTest: test.fTest } : {}),
      ...(excluded.length ? { excluded } : {}),
      ...('nesting' in test && test.nesting ? { nesting: test.nesting } : {}),
      ...(test.noFTest ? { noFTest: test.noFTest } : {}),
    }],
    errors,
  };
}

function noPair(count: number, sameData: boolean): string | undefined {
  if (count < 2) return compareText.noF.tooFew;
  if (!sameData) return compareText.noF.differentData;
  return compareText.noF.manyFits;
}

const weighting = (p: FitPlan) => `${p.blocks[0].sigma ? exprText(p.blocks[0].sigma) : ''}|${p.blocks[0].weight ? exprText(p.blocks[0].weight) : ''}`;

/** Nesting and the F test of two ranked fits; `declared` is [simpler, richer] as the spec wrote them. */
export function pairTest(a: Ranked, b: Ranked, declared: readonly string[] | null): { fTest?: NonNullable<Extract<QueryResult, { kind: 'compare' }>['fTest']>; nesting?: CompareNesting; noFTest?: string } {
  if (a.input.p === b.input.p) {
    if (declared) return { noFTest: `${compareText.noF.sameCount} (${compareText.declaredReversed(declared[0], declared[1])})` };
    return { noFTest: compareText.noF.sameCount };
  }
  const [simple, rich] = a.input.p < b.input.p ? [a, b] : [b, a];
  if (declared && declared[0] !== simple.input.fit) return { noFTest: `No nested test: ${compareText.declaredReversed(declared[0], declared[1])}.` };
  const check = checkNesting(simple.plan, simple.result, rich.plan, rich.result);
  const s = simple.input.fit;
  const r = rich.input.fit;
  const checked =
    check.status === 'established' ? compareText.established(s, r, check.distance ?? 0, NESTING_TOLERANCE, TRIALS)
      : check.status === 'not_nested' ? compareText.notNested(s, r, check.distance ?? NaN, NESTING_TOLERANCE)
        : compareText.notChecked(s, r, check.reason ?? 'several_columns');
  const nesting: CompareNesting = {
    simpler: s,
    richer: r,
    status: declared ? 'declared' : check.status,
    distance: check.distance,
    tolerance: NESTING_TOLERANCE,
    detail: declared ? compareText.declared(s, r, checked) : checked,
  };
  if (nesting.status === 'not_nested') return { nesting, noFTest: compareText.noF.notNested };
  if (nesting.status === 'not_checked') return { nesting, noFTest: compareText.noF.notChecked };
  if (weighting(simple.plan) !== weighting(rich.plan) || simple.result.sigmaAbsolute !== rich.result.sigmaAbsolute) {
    return { nesting, noFTest: compareText.noF.weighting };
  }
  if (simple.result.loss !== 'squared' || rich.result.loss !== 'squared') return { nesting, noFTest: compareText.noF.robust };
  const f = nestedF(simple.input, rich.input);
  if ('refused' in f) return { nesting, noFTest: refusal(f.refused, s, r) };
  return { nesting, fTest: f };
}

function refusal(code: FTestRefusal, simpler: string, richer: string): string {
  switch (code) {
    case 'same_count': return compareText.noF.sameCount;
    case 'different_n': return compareText.noF.differentData;
    case 'no_dof': return compareText.noF.noDof;
    case 'exact': return compareText.noF.exact;
    case 'richer_worse': return compareText.noF.richerWorse(simpler, richer);
  }
}
