/**
 * `compare` of fits with groups (`per COLUMN`, or several tables): fits of the same groups only (the same
 * grouping column of the same data, or the same tables; and, known once the data are read, the same group
 * labels), each refusal a run error at the `compare` statement.
 *
 * The ranking takes each fit as a whole, as one model of all the groups' rows: n and SSR summed over the
 * groups, p the free parameters of the whole (a joint fit's shared parameters once, its per-group ones once per
 * group; a separate per-group fit every parameter of every group), and one residual variance for all groups,
 * so that a joint fit and the separate fits are on one footing. The Gaussian log-likelihood is that of
 * engine/stats/goodness.ts over the pooled rows: with an estimated variance
 * ln L = −(n/2)(ln 2π + ln(SSR/n) + 1) + ½ Σ ln wᵢ (the Σ ln wᵢ recovered from each group's own ln L), k = p + 1;
 * with absolute σ the groups' ln L add up, k = p. AIC, AICc, BIC as there (Burnham & Anderson 2002, ch. 2).
 *
 * Nesting of two fits with groups is decided by construction: the same model, response, weighting and loss,
 * and the shared parameters of one a proper superset of the other's (a separate per-group fit shares none):
 * the fit sharing more is the other with those parameters tied across groups, so the extra-sum-of-squares
 * F test applies (Draper & Smith 1998; for the joint fit against the separate fits it is the F test of
 * engine/run/joint-compare.ts `sharedVsSeparate`). Other pairs get AICc only, unless the spec declares
 * nesting (`compare a within b`).
 *
 * Two separate per-group fits of different models count as nested as wholes when the numerical check
 * (engine/run/nesting.ts) establishes the nesting on every group's rows; the F test then pools the groups.
 *
 * Group by group (no fit is a joint fit): one row per group with each fit's AICc for that group and, for two
 * fits, the F test of that group's pair when the two models are nested (checked numerically on that group's
 * rows, engine/run/nesting.ts, as for two single fits). A joint fit's groups share parameters and are no fits of
 * their own, so a comparison with one has no such table (`noPerGroup` says so).
 */
import type { FitPlan, Query } from '../../parser/plan';
import { exprText, groupingOf, sameGrouping } from '../../parser/plan-expr';
import { compareText, errorText, runText } from '../messages';
import type { CompareExclusion, CompareGroupRow, CompareGrouped, CompareNesting, FitResult, JointFitResult, QueryResult, RunError } from '../result';
import { akaikeRows, nestedF, type CompareInput } from '../stats/compare';
import { informationCriteria, likelihoodParameterCount } from '../stats/goodness';
import { pairTest, type CompareContext } from './compare-query';

type Out = { results: QueryResult[]; errors: RunError[] };
type Compare = Extract<Query, { kind: 'compare' }>;
type CompareResult = Extract<QueryResult, { kind: 'compare' }>;

export interface GroupedContext extends CompareContext {
  joint?: readonly JointFitResult[];
}

/** Whether a compare lists a fit with groups (then this module answers it). */
export function comparesGroups(q: Compare, ctx: CompareContext): boolean {
  return q.fits.some((f) => {
    const p = ctx.fitPlans.get(f);
    return p !== undefined && groupingOf(p).kind !== 'none';
  });
}

function groupingWords(plan: FitPlan): string {
  const g = groupingOf(plan);
  return g.kind === 'column' ? `per ${g.column} of ${g.data}` : g.kind === 'tables' ? `over the tables ${g.tables.join(', ')}` : 'without groups';
}

/** Free parameters tied across groups: the shared ones of a joint fit (none for separate fits). */
function sharedOf(plan: FitPlan, joint: JointFitResult | undefined): Set<string> {
  return new Set(joint ? joint.shared : []);
}

const weighting = (p: FitPlan) => `${p.blocks[0].sigma ? exprText(p.blocks[0].sigma) : ''}|${p.blocks[0].weight ? exprText(p.blocks[0].weight) : ''}`;
const sameModel = (a: FitPlan, b: FitPlan) =>
  exprText(a.blocks[0].model) === exprText(b.blocks[0].model) && exprText(a.blocks[0].response) === exprText(b.blocks[0].response) && weighting(a) === weighting(b)
  && JSON.stringify(a.parameters.map((p) => [p.name, p.fixed, p.fixed ? p.initial : null])) === JSON.stringify(b.parameters.map((p) => [p.name, p.fixed, p.fixed ? p.initial : null]));

interface Whole {
  input: CompareInput;
  plan: FitPlan;
  results: FitResult[];
  joint: JointFitResult | undefined;
  sigmaAbsolute: boolean;
}

/** A fit as one model of all its groups' rows (module comment), or why it cannot be ranked. */
function whole(name: string, plan: FitPlan, results: FitResult[], joint: JointFitResult | undefined): Whole | CompareExclusion {
  if (joint) {
    if (!joint.stop.converged) return { fit: name, code: joint.stop.code, reason: compareText.jointExcluded(joint.stop.code, joint.stop.message) };
    if (joint.leftOut.length) return { fit: name, code: 'failed', reason: compareText.jointLeftOut(joint.leftOut.map((l) => l.group)) };
  }
  const bad = results.find((r) => !r.stop.converged);
  if (bad) return { fit: name, code: bad.stop.code, reason: compareText.groupExcluded(bad.group ?? '', bad.stop.code, bad.stop.message) };
  const n = results.reduce((a, r) => a + r.goodness.n, 0);
  const ssr = results.reduce((a, r) => a + r.goodness.ssr, 0);
  const p = joint ? joint.p : results.reduce((a, r) => a + r.goodness.p, 0);
  const sigmaAbsolute = results[0]?.sigmaAbsolute ?? false;
  // ln L of the whole fit from its residuals and weights (engine/stats/goodness.ts), not from the groups'
  // own ln L: a joint fit's groups carry none (engine/run/joint-group-stats.ts). ½ Σ ln wᵢ over every fitted row.
  const halfLogW = results.reduce((a, r) => a + (r.points.weight ? 0.5 * r.points.weight.reduce((b, w) => b + Math.log(w), 0) : 0), 0);
  const logL = sigmaAbsolute
    ? -0.5 * n * Math.log(2 * Math.PI) + halfLogW - 0.5 * ssr
    : -(n / 2) * (Math.log(2 * Math.PI) + Math.log(ssr / n) + 1) + halfLogW;
  const ic = informationCriteria(logL, likelihoodParameterCount(p, sigmaAbsolute), n);
  return { input: { fit: name, n, p, ssr, ...ic }, plan, results, joint, sigmaAbsolute };
}

export function compareGrouped(q: Compare, ctx: GroupedContext): Out {
  const refuse = (e: RunError): Out => ({ results: [], errors: [e] });
  const entries: { name: string; plan: FitPlan; results: FitResult[]; joint: JointFitResult | undefined }[] = [];
  for (const name of q.fits) {
    const plan = ctx.fitPlans.get(name);
    if (!plan) return refuse({ code: 'unknown_fit', message: errorText.unknownFit(name), range: q.range });
    const results = ctx.results.get(name) ?? [];
    if (results.length === 0) return refuse({ code: 'fit_not_run', message: runText.fitNotRun(name), range: q.range, fit: name });
    entries.push({ name, plan, results, joint: ctx.joint?.find((j) => j.fit === name) });
  }
  // the same groups: by the plan (also the checker's rule), then by the labels the data gave
  const first = entries[0];
  const g0 = groupingOf(first.plan);
  for (const e of entries.slice(1)) {
    const g = groupingOf(e.plan);
    if ((g0.kind === 'none') !== (g.kind === 'none')) {
      const [grouped, single] = g0.kind === 'none' ? [e.name, first.name] : [first.name, e.name];
      return refuse({ code: 'compare_grouped', message: errorText.comparePerGroup(grouped, single), range: q.range, fit: e.name });
    }
    if (!sameGrouping(g0, g)) return refuse({ code: 'compare_groups_differ', message: errorText.compareGroupsDiffer(first.name, e.name, groupingWords(first.plan), groupingWords(e.plan)), range: q.range, fit: e.name });
    const a = new Set(first.results.map((r) => r.group ?? ''));
    const b = new Set(e.results.map((r) => r.group ?? ''));
    const onlyA = [...a].find((x) => !b.has(x));
    const onlyB = [...b].find((x) => !a.has(x));
    if (onlyA !== undefined || onlyB !== undefined) {
      return refuse({ code: 'compare_groups_differ', message: errorText.compareGroupLabels(first.name, e.name, (onlyA ?? onlyB)!, onlyA !== undefined ? first.name : e.name), range: q.range, fit: e.name });
    }
  }
  const sameData = entries.every((e) => exprText(e.plan.blocks[0].response) === exprText(first.plan.blocks[0].response));
  const errors: RunError[] = [];

  // the ranking of the fits as wholes
  const ranked: Whole[] = [];
  const excluded: CompareExclusion[] = [];
  for (const e of entries) {
    const w = whole(e.name, e.plan, e.results, e.joint);
    if ('input' in w) ranked.push(w);
    else excluded.push(w);
  }
  if (!sameData || ranked.some((r) => r.input.n !== ranked[0].input.n)) errors.push({ code: 'compare_different_data', message: errorText.compareMismatch(q.fits), range: q.range });
  const labels = first.results.map((r) => r.group ?? '');
  const joint = entries.filter((e) => e.joint).map((e) => e.name);
  const byGroup = !joint.length && sameData ? perGroupRows(entries, labels, q.within === true ? q.fits : null) : null;
  const declared = q.within === true ? q.fits : null;
  const test = ranked.length === 2 && sameData ? wholeTest(ranked[0], ranked[1], declared, byGroup?.nestedEverywhere ?? false) : { noFTest: ranked.length < 2 ? compareText.noF.tooFew : !sameData ? compareText.noF.differentData : compareText.noF.manyFits };

  const grouped: CompareGrouped = {
    by: g0.kind === 'column' ? g0.column : '',
    over: g0.kind === 'tables' ? 'tables' : 'column',
    groups: labels,
    joint,
    ...(joint.length ? { noPerGroup: compareText.noPerGroupJoint(joint) } : byGroup ? { perGroup: byGroup.rows } : {}),
  };
  const result: CompareResult = {
    kind: 'compare',
    fits: [...q.fits],
    rows: akaikeRows(ranked.map((r) => r.input)),
    ...(test.fTest ? { fTest: test.fTest } : {}),
    ...(excluded.length ? { excluded } : {}),
    ...(test.nesting ? { nesting: test.nesting } : {}),
    ...(test.noFTest ? { noFTest: test.noFTest } : {}),
    grouped,
  };
  return { results: [result], errors };
}

type Test = { fTest?: NonNullable<CompareResult['fTest']>; nesting?: CompareNesting; noFTest?: string };

/** Nesting by construction (module comment) and the F test of two whole fits; `declared` is [simpler, richer] as written. */
function wholeTest(a: Whole, b: Whole, declared: readonly string[] | null, nestedEverywhere: boolean): Test {
  if (a.input.p === b.input.p) return { noFTest: compareText.noF.sameCount };
  const [simple, rich] = a.input.p < b.input.p ? [a, b] : [b, a];
  const s = simple.input.fit;
  const r = rich.input.fit;
  if (declared && declared[0] !== s) return { noFTest: `No nested test: ${compareText.declaredReversed(declared[0], declared[1])}.` };
  const sharedS = sharedOf(simple.plan, simple.joint);
  const sharedR = sharedOf(rich.plan, rich.joint);
  const model = sameModel(simple.plan, rich.plan);
  const subset = [...sharedR].every((x) => sharedS.has(x)) && sharedS.size > sharedR.size;
  const base = { simpler: s, richer: r, distance: null, tolerance: 0 };
  let nesting: CompareNesting;
  if (model && subset) nesting = { ...base, status: 'established', detail: compareText.sharedNested(s, r, [...sharedS].filter((x) => !sharedR.has(x)), groupingOf(simple.plan).kind === 'tables' ? 'tables' : 'groups') };
  else if (!model && nestedEverywhere && !simple.joint && !rich.joint) nesting = { ...base, status: 'established', detail: compareText.nestedEveryGroup(s, r) };
  else if (declared) nesting = { ...base, status: 'declared', detail: compareText.declared(s, r, model ? compareText.sharedNotNested(s, r) : compareText.modelsDiffer(s, r)) };
  else if (model) return { nesting: { ...base, status: 'not_nested', detail: compareText.sharedNotNested(s, r) }, noFTest: compareText.noF.notNested };
  else return { nesting: { ...base, status: 'not_checked', detail: compareText.modelsDiffer(s, r) }, noFTest: compareText.noF.notChecked };
  if (weighting(simple.plan) !== weighting(rich.plan) || simple.sigmaAbsolute !== rich.sigmaAbsolute) return { nesting, noFTest: compareText.noF.weighting };
  if (simple.plan.options.loss !== 'squared' || rich.plan.options.loss !== 'squared') return { nesting, noFTest: compareText.noF.robust };
  const f = nestedF(simple.input, rich.input);
  if ('refused' in f) {
    const why = f.refused === 'richer_worse' ? compareText.noF.richerWorse(s, r) : f.refused === 'no_dof' ? compareText.noF.noDof : f.refused === 'exact' ? compareText.noF.exact : compareText.noF.differentData;
    return { nesting, noFTest: why };
  }
  return { nesting, fTest: f };
}

/** Group by group (module comment): each fit's AICc for the group, the best, and for two fits the group's F test. */
function perGroupRows(entries: { name: string; plan: FitPlan; results: FitResult[] }[], labels: string[], declared: readonly string[] | null): { rows: CompareGroupRow[]; nestedEverywhere: boolean } {
  const byGroup = entries.map((e) => new Map(e.results.map((r) => [r.group ?? '', r])));
  let nestedEverywhere = entries.length === 2;
  const rows = labels.map((group) => {
    const rs = byGroup.map((m) => m.get(group)!);
    const aicc = rs.map((r) => (r.stop.converged ? r.goodness.aicc : NaN));
    const order = aicc.map((v, i) => [v, i] as const).filter(([v]) => Number.isFinite(v)).sort((x, y) => x[0] - y[0]);
    const best = order.length >= 2 ? entries[order[0][1]].name : null;
    const deltaAicc = order.length >= 2 ? order[1][0] - order[0][0] : NaN;
    const row: CompareGroupRow = { group, aicc, best, deltaAicc };
    if (entries.length === 2) {
      if (!rs[0].stop.converged || !rs[1].stop.converged) row.noFTest = compareText.noF.tooFew;
      else {
        const ranked = rs.map((r, i) => ({ input: { fit: entries[i].name, n: r.goodness.n, p: r.goodness.p, ssr: r.goodness.ssr, aic: r.goodness.aic, aicc: r.goodness.aicc, bic: r.goodness.bic }, plan: entries[i].plan, result: r }));
        const t: Test = ranked[0].input.n !== ranked[1].input.n ? { noFTest: compareText.noF.differentData } : pairTest(ranked[0], ranked[1], declared);
        if (t.nesting?.status !== 'established') nestedEverywhere = false;
        if (t.fTest) row.fTest = t.fTest;
        else if (t.noFTest) row.noFTest = t.noFTest;
      }
    }
    if (!row.fTest && !row.noFTest) nestedEverywhere = false;
    return row;
  });
  return { rows, nestedEverywhere: nestedEverywhere && rows.length > 0 };
}
