/**
 * Derived quantities (`derive NAME = EXPRESSION [UNIT]`): numbers computed
 * from fit results after fitting, each with a standard error and an interval.
 *
 * Value: the expression at the estimates θ̂ and the named statistics.
 *
 * Standard error: first-order delta method (law of propagation of
 * uncertainty), Var f(θ̂) ≈ gᵀ C g with g = ∂f/∂θ at θ̂ and C the covariance of
 * the estimates, taken as C = diag(se)·ρ·diag(se) from the standard errors and
 * the correlation matrix of the FitResult and formed with every term divided
 * by the largest |gⱼ·seⱼ| (so estimates near 1e-300 or 1e+300 keep their
 * standard errors); e.g. Casella & Berger (2002),
 * Statistical Inference, 2nd ed., §5.5.4, and JCGM 100:2008 (GUM) §5.2.2,
 * eq. (13). The gradient is exact: the expression is compiled (engine/compile,
 * symbolic differentiation) as a one-row "model" whose parameters are the
 * numbers it reads, so its Jacobian row is g.
 *
 * Assumptions, stated in every result's note:
 * - statistics (`rmse`, `r2`, `n`, ...) and standard errors read as
 *   `FIT.PARAM.se` (e.g. LOD = 3.3·se(intercept)/slope) are fixed numbers; their own sampling
 *   uncertainty is not propagated (for LOD = 3.3·s/slope this understates the
 *   uncertainty: s alone has a relative standard error of about 1/√(2·dof));
 * - parameters of different fits are independent (zero cross-covariance),
 *   which holds when the fits read different data;
 * - a number on a weighted fit's scale (its statistics but the counts, its
 *   standard errors) is noted: the value then changes with the weighting.
 *
 * Interval: value ± q·se. When every free parameter read comes from one fit,
 * q = t_{(1+level)/2, dof} with that fit's level and degrees of freedom (as
 * for its own parameters); otherwise q = z_{(1+level)/2} (normal) at the
 * common level of the fits, or 0.95 when their levels differ.
 *
 * Per-group fits give one value per group; a fit without groups is shared by
 * every group. A derived quantity named in the expression is read as a number
 * with its own value and gradient (computed once per group, when it was
 * evaluated above): the gradient with respect to the fit numbers is
 * ∂f/∂θ + Σᵢ ∂f/∂dᵢ · ∇dᵢ (the chain rule; a zero factor gives 0 even when the
 * other is not finite, as in engine/compile), so a chain of N derived
 * quantities costs O(N), not the O(N²) of expanding each into the others.
 *
 * Guards: a failed or missing fit, a missing parameter, a non-finite statistic
 * or value give `value: null` with the reason; a non-finite derivative or
 * covariance entry (where the derivative is not zero) gives `stderr: null`. A
 * negative gᵀCg is rounding when it is within NEGATIVE_VARIANCE_TOLERANCE of
 * Σ|gⱼCⱼₖgₖ| (then the variance is 0), else the covariance is unusable.
 */
import type { DerivedPlan, Expr, Range } from '../../parser/plan';
import { compileModel, type CompiledModel } from '../compile';
import { derivedText, num, weightingText } from '../messages';
import type { DerivedResult, FitResult, JointFitResult, RunError } from '../result';
import { suggest } from '../../parser/suggest';
import { normalQuantile, tCritical } from '../stats/distributions';
import { statisticValue } from './expectations';
import { exprText, mapLeaves } from '../../parser/plan-expr';

/** A gᵀCg with gᵀCg < 0 and |gᵀCg| ≤ this·Σ|gⱼCⱼₖgₖ| is rounding error and taken as 0. */
export const NEGATIVE_VARIANCE_TOLERANCE = 1e-10;

/** Confidence level used for a normal interval over fits with different levels. */
const FALLBACK_LEVEL = 0.95;

type Result = Extract<Expr, { kind: 'result' }>;

/** `FIT.NAME`, `FIT.PARAM.se` or `FIT."GROUP".NAME`, as the spec writes it. */
const slotText = (s: { fit: string; name: string; of: Result['of']; group?: string }): string =>
  `${s.fit}${s.group !== undefined ? `.${JSON.stringify(s.group)}` : ''}.${s.name}${s.of === 'stderr' ? '.se' : ''}`;

/**
 * Numbers whose value depends on how the points are weighted, beyond the estimates: a parameter's standard error
 * and every statistic but the counts (n, dof, iterations). E.g. 3.3·rmse/slope is 3.23, 0.45 or 0.14 for no
 * weights, 1/x and 1/x² on one calibration: rmse is in weighted units.
 */
const COUNT_STATISTICS: ReadonlySet<string> = new Set(['n', 'dof', 'iterations']);
const isOnWeightedScale = (s: { name: string; of: Result['of'] }): boolean => s.of === 'stderr' || (s.of === 'statistic' && !COUNT_STATISTICS.has(s.name));

interface Slot {
  fit: string;
  name: string;
  of: Result['of'];
  /** FIT."GROUP".NAME: this group of a per-group fit, whatever group the row is for. */
  group?: string;
  /** Where the spec first reads it (not part of its identity: for a located error). */
  range?: Range;
}

interface Prepared {
  plan: DerivedPlan;
  /** The fits read, directly or through derived quantities, in reading order. */
  fits: string[];
  /** The fit numbers read, directly or through derived quantities, in reading order (the gradient's order). */
  slots: Slot[];
  /** Index in `slots` of each number the expression reads itself (the compiled model's first parameters). */
  direct: number[];
  /** The derived quantities the expression reads (the model's remaining parameters), each with the index in `slots` of its own slots. */
  deps: { name: string; map: Int32Array }[];
  model: CompiledModel | null;
  /** Why the expression cannot be evaluated at all. */
  error?: string;
}

type Numbers = Pick<DerivedResult, 'value' | 'stderr' | 'lower' | 'upper' | 'level' | 'dof' | 'note'>;

/** Value and gradient (over its `slots`) of a derived quantity for one group (or none), kept for the quantities that read it. */
interface Raw {
  value: number;
  grad: Float64Array;
}

/** Per derived quantity: its raw numbers by group label ('' for a quantity that reads no per-group fit). */
type Memo = Map<string, Map<string, Raw>>;

const sentence = (s: string): string => (s.endsWith('.') ? s : `${s}.`);
const missing = (note: string): Numbers => ({ value: null, stderr: null, lower: null, upper: null, level: null, dof: null, note: sentence(note) });

const slotKey = (s: Slot): string => `${s.of}\u0000${s.fit}\u0000${s.name}${s.group !== undefined ? `\u0000${JSON.stringify(s.group)}` : ''}`;
/** Parameter name of a derived quantity read by another (a NUL cannot occur in a name of the spec). */
const derivedKey = (name: string): string => `derived\u0000${name}`;

/**
 * `prepare`, with a failure (e.g. a compiler limit on an untrusted spec) as a prepared entry carrying its error,
 * reported and never thrown; recorded in `defs` (null when it failed) for the quantities that read it.
 * `withMessage`: the error names the compiler's message (the run's own list), not only that it failed.
 */
function prepareInto(d: DerivedPlan, defs: Map<string, Prepared | null>, withMessage: boolean): Prepared {
  let prepared: Prepared;
  try {
    prepared = prepare(d, defs);
  } catch (err) {
    prepared = { plan: d, fits: [], slots: [], direct: [], deps: [], model: null, error: derivedText.compileFailed(withMessage ? (err instanceof Error ? err.message : String(err)) : '') };
  }
  defs.set(d.name, prepared.error ? null : prepared);
  return prepared;
}

/**
 * Collects the fits and numbers read (through the derived quantities in `defs`:
 * prepared, or null when that quantity could not be prepared) and compiles
 * the expression with each number and each derived quantity as a parameter.
 */
function prepare(plan: DerivedPlan, defs: ReadonlyMap<string, Prepared | null>): Prepared {
  const unknown: string[] = [];
  const broken: string[] = [];
  const slots: Slot[] = [];
  const slotIndex = new Map<string, number>();
  const fits: string[] = [];
  const addSlot = (slot: Slot): number => {
    const key = slotKey(slot);
    let k = slotIndex.get(key);
    if (k === undefined) {
      k = slots.length;
      slotIndex.set(key, k);
      slots.push(slot);
      if (!fits.includes(slot.fit)) fits.push(slot.fit);
    }
    return k;
  };
  const directKeys: string[] = [];
  const direct: number[] = [];
  const deps: { name: string; map: Int32Array }[] = [];
  const seen = new Set<string>();
  const withParams = mapLeaves(plan.expr, (e) => {
    if (e.kind === 'derived') {
      const d = defs.get(e.name);
      if (d === undefined) unknown.push(e.name);
      else if (d === null) broken.push(e.name);
      else if (!seen.has(derivedKey(e.name))) {
        seen.add(derivedKey(e.name));
        deps.push({ name: e.name, map: Int32Array.from(d.slots, addSlot) });
      }
      return { kind: 'param', name: derivedKey(e.name), range: e.range };
    }
    if (e.kind !== 'result') return e;
    const slot: Slot = { fit: e.fit, name: e.name, of: e.of, ...(e.group !== undefined ? { group: e.group } : {}), ...(e.range ? { range: e.range } : {}) };
    const key = slotKey(slot);
    const k = addSlot(slot);
    if (!seen.has(key)) {
      seen.add(key);
      directKeys.push(key);
      direct.push(k);
    }
    return { kind: 'param', name: key, range: e.range };
  });
  const base: Prepared = { plan, fits, slots, direct, deps, model: null };
  const none: Prepared = { plan, fits: [], slots: [], direct: [], deps: [], model: null };
  if (unknown.length) return { ...none, error: derivedText.unknownDerived(unknown[0]) };
  if (broken.length) return { ...none, error: derivedText.dependsOnBroken(broken[0]) };
  try {
    return { ...base, model: compileModel(withParams, [...directKeys, ...deps.map((d) => derivedKey(d.name))], []) };
  } catch (err) {
    return { ...base, error: derivedText.compileFailed(err instanceof Error ? err.message : String(err)) };
  }
}

/**
 * The value and gradient of `p` at the numbers `theta` (over `p.slots`), with
 * the derived quantities it reads taken from `memo` (computed here when
 * missing, from the same numbers).
 */
function rawNumbers(p: Prepared, theta: Float64Array, group: string, memo: Memo, defs: ReadonlyMap<string, Prepared | null>, grouped: (fit: string) => boolean): Raw {
  const nd = p.direct.length;
  const args = new Float64Array(nd + p.deps.length);
  for (let i = 0; i < nd; i++) args[i] = theta[p.direct[i]];
  const depRaw: Raw[] = [];
  for (let k = 0; k < p.deps.length; k++) {
    const dep = p.deps[k];
    const prepared = defs.get(dep.name)!;
    const key = variesByGroup(prepared, grouped) ? group : '';
    let r = memo.get(dep.name)?.get(key);
    if (!r) r = rawNumbers(prepared, Float64Array.from(dep.map, (j) => theta[j]), key, memo, defs, grouped);
    depRaw.push(r);
    args[nd + k] = r.value;
  }
  const out = new Float64Array(1);
  const jac = new Float64Array(args.length);
  p.model!.valueAndJacobian(args, [], 1, out, jac);
  const grad = new Float64Array(p.slots.length);
  for (let i = 0; i < nd; i++) grad[p.direct[i]] += jac[i];
  for (let k = 0; k < p.deps.length; k++) {
    const outer = jac[nd + k];
    if (outer === 0) continue;
    const { map } = p.deps[k];
    const inner = depRaw[k].grad;
    for (let i = 0; i < map.length; i++) if (inner[i] !== 0) grad[map[i]] += outer * inner[i];
  }
  const raw: Raw = { value: out[0], grad };
  let byGroup = memo.get(p.plan.name);
  if (!byGroup) memo.set(p.plan.name, (byGroup = new Map()));
  byGroup.set(group, raw);
  return raw;
}

/** A quantity gives one value per group when it reads a per-group fit without naming the group (a `FIT."GROUP".NAME` is the same for every row). */
const variesByGroup = (p: Prepared, grouped: (fit: string) => boolean): boolean => p.slots.some((s) => s.group === undefined && grouped(s.fit));

const levelText = (level: number): string => `${num(level * 100)}%`;

/** What `evaluate` needs of the quantities above: their preparation and raw numbers, and which fits are per group. */
interface Context {
  defs: ReadonlyMap<string, Prepared | null>;
  memo: Memo;
  grouped: (fit: string) => boolean;
  /** The joint solve of a fit with shared parameters (engine/run/joint.ts), for the covariance between its groups. */
  joint: ReadonlyMap<string, JointFitResult>;
  /** Located errors of the run (a group label the fit does not have). */
  errors: RunError[];
}

/**
 * The correlation of free parameters a (index ka in result ra) and b, read from slots of fit `fit`.
 * One result: its correlation matrix. Two groups of a separate per-group fit: 0 (independent, fitted to
 * different rows). Two groups of a joint fit: a shared parameter is one number in every group, so its
 * correlation with the other is read in the other's group result; two per-group parameters have
 * Cov(θ_g,i, θ_h,j) = s²·(X_g X_hᵀ)ᵢⱼ (engine/solve/block-covariance.ts, Björck 1996 §6.3.2). NaN: not available.
 */
function correlationOf(ra: FitResult, ka: number, rb: FitResult, kb: number, joint: JointFitResult | undefined): number {
  if (ra === rb) return ra.correlation?.[ka]?.[kb] ?? NaN;
  if (ra.name !== rb.name) return 0;
  const ga = joint && ra.group !== undefined ? joint.groups.indexOf(ra.group) : -1;
  const gb = joint && rb.group !== undefined ? joint.groups.indexOf(rb.group) : -1;
  if (!joint || ga < 0 || gb < 0) return 0;
  const na = ra.parameters[ka].name;
  const nb = rb.parameters[kb].name;
  if (joint.shared.includes(na)) {
    const k = rb.parameters.findIndex((q) => q.name === na);
    return k < 0 ? NaN : rb.correlation?.[k]?.[kb] ?? NaN;
  }
  if (joint.shared.includes(nb)) {
    const k = ra.parameters.findIndex((q) => q.name === nb);
    return k < 0 ? NaN : ra.correlation?.[ka]?.[k] ?? NaN;
  }
  const ia = joint.perGroup.indexOf(na);
  const ib = joint.perGroup.indexOf(nb);
  const xa = joint.cross.x[ga];
  const xb = joint.cross.x[gb];
  const sa = ra.parameters[ka].stderr;
  const sb = rb.parameters[kb].stderr;
  if (ia < 0 || ib < 0 || !xa || !xb || typeof sa !== 'number' || typeof sb !== 'number') return NaN;
  const ps = joint.shared.length;
  let c = 0;
  for (let k = 0; k < ps; k++) c += xa[ia * ps + k] * xb[ib * ps + k];
  return ((joint.cross.scale * c) / sa) / sb;
}

/** Value, standard error and interval with the fit result chosen for each slot (`res`, parallel to p.slots; `group`: the row's group label, '' for none). */
function evaluate(p: Prepared, res: readonly FitResult[], group: string, ctx: Context): Numbers {
  if (p.error || !p.model) return missing(p.error ?? derivedText.compileFailed('no evaluator'));
  const notes: string[] = [];
  for (const r of new Set(res)) {
    const fit = r.name;
    if (r.stop.code === 'failed' || r.stop.code === 'cancelled') return missing(derivedText.fitFailed(fit, r.stop.message));
    // withheld like the fit's own statistics (engine/front/views/summary.ts fitStatus): its values are not estimates
    if (!r.stop.converged) return missing(derivedText.notConverged(fit));
  }
  const theta = new Float64Array(p.slots.length);
  /** Per slot: index of the parameter in its fit result, or -1 (statistic or fixed parameter). */
  const free: number[] = [];
  for (let j = 0; j < p.slots.length; j++) {
    const s = p.slots[j];
    const r = res[j];
    free.push(-1);
    if (s.of === 'statistic') {
      theta[j] = statisticValue(r, s.name as Parameters<typeof statisticValue>[1]);
    } else {
      const k = r.parameters.findIndex((q) => q.name === s.name);
      if (k < 0) return missing(derivedText.noParameter(s.fit, s.name));
      // FIT.PARAM.se: the standard error as a fixed number (like a statistic); the estimate: free unless fixed
      if (s.of === 'stderr') theta[j] = r.parameters[k].stderr ?? NaN;
      else {
        theta[j] = r.parameters[k].estimate;
        if (!r.parameters[k].fixed) free[j] = k;
      }
    }
    if (!Number.isFinite(theta[j])) return missing(derivedText.notComputable(slotText(s)));
  }
  const { value, grad: g } = rawNumbers(p, theta, group, ctx.memo, ctx.defs, ctx.grouped);
  if (!Number.isFinite(value)) return missing(derivedText.notFinite);

  const statistics = p.slots.filter((s) => s.of !== 'estimate').map(slotText);
  if (statistics.length) notes.push(derivedText.fixedStatistics(statistics));
  // numbers on a weighted fit's scale (its rmse, ssr, standard errors, ...): the value changes with the weighting
  for (const fit of p.fits) {
    const w = res[p.slots.findIndex((s) => s.fit === fit)].model?.weighting;
    if (!w || w.kind === 'none') continue;
    const scaled = p.slots.filter((s) => s.fit === fit && isOnWeightedScale(s)).map(slotText);
    if (scaled.length) notes.push(weightingText.derivedNote(scaled, fit, w));
  }
  const paramFits = p.fits.filter((fit) => p.slots.some((s, j) => s.fit === fit && free[j] >= 0));
  const result: Numbers = { value, stderr: null, lower: null, upper: null, level: null, dof: null, note: '' };
  const finish = (lead: string): Numbers => ({ ...result, note: sentence([lead, ...notes].join('; ')) });
  if (paramFits.length === 0) return finish(derivedText.noFreeParameter);

  // gᵀCg over every pair of free numbers read, with C = diag(se)·ρ·diag(se) and ρ between two numbers from
  // correlationOf (one fit result, two groups of a joint fit, or 0 between independent fits and groups), and
  // every term divided by the largest |gⱼ·seⱼ| first, so nothing is squared out of range.
  const v = new Map<number, number>();
  const badCovariance: string[] = [];
  const bad = (fit: string) => {
    if (!badCovariance.includes(fit)) badCovariance.push(fit);
  };
  let m = 0;
  for (let a = 0; a < p.slots.length; a++) {
    if (free[a] < 0) continue;
    if (!Number.isFinite(g[a])) return finish(derivedText.badGradient);
    if (g[a] === 0) continue;
    const se = res[a].parameters[free[a]].stderr;
    const va = typeof se === 'number' ? g[a] * se : NaN;
    if (!Number.isFinite(va)) {
      bad(p.slots[a].fit);
      continue;
    }
    if (va === 0) continue; // an estimate that does not vary (e.g. an exact fit) adds nothing
    v.set(a, va);
    m = Math.max(m, Math.abs(va));
  }
  let variance = 0;
  let scale = 0;
  for (const [a, va] of v) {
    for (const [b, vb] of v) {
      const rho = correlationOf(res[a], free[a], res[b], free[b], ctx.joint.get(p.slots[a].fit));
      if (!Number.isFinite(rho)) {
        bad(p.slots[a].fit);
        continue;
      }
      const term = (va / m) * rho * (vb / m);
      variance += term;
      scale += Math.abs(term);
    }
  }
  if (badCovariance.length) return finish(derivedText.noCovariance(badCovariance));
  if (variance < 0) {
    if (-variance > NEGATIVE_VARIANCE_TOLERANCE * scale) return finish(derivedText.noCovariance(paramFits));
    variance = 0;
  }
  const se = m * Math.sqrt(variance);
  result.stderr = se;
  // the covariance between groups: of the joint solve, or none between separately fitted groups
  for (const fit of paramFits) {
    const groupsRead = new Set(p.slots.map((s, j) => (s.fit === fit && free[j] >= 0 ? res[j].group : undefined)).filter((x) => x !== undefined));
    if (groupsRead.size < 2) continue;
    const joint = ctx.joint.get(fit);
    if (!joint) notes.push(derivedText.groupsIndependent(fit));
    else {
      notes.push(derivedText.jointCross(fit));
      // a group left out of the joint solve keeps its separate fit: independent of the others
      const out = [...groupsRead].filter((x) => !joint.groups.includes(x!)) as string[];
      if (out.length) notes.push(derivedText.leftOutIndependent(fit, out));
    }
  }
  const lead = paramFits.length === 1 ? derivedText.deltaOne(paramFits[0]) : derivedText.deltaMany(paramFits);

  let q: number;
  let level: number;
  let dof: number | null = null;
  // one source of free parameters: one fit result, or the groups of one joint solve (its level and dof)
  const sources = new Set<FitResult | JointFitResult>();
  for (let j = 0; j < p.slots.length; j++) {
    if (free[j] < 0) continue;
    const joint = ctx.joint.get(p.slots[j].fit);
    sources.add(joint && res[j].group !== undefined && joint.groups.includes(res[j].group!) ? joint : res[j]);
  }
  if (sources.size === 1) {
    const src = [...sources][0];
    level = src.level;
    dof = 'goodness' in src ? src.goodness.dof : src.dof;
    q = tCritical(level, dof);
    notes.push(Number.isFinite(q) ? derivedText.tInterval(levelText(level), dof) : derivedText.noInterval);
  } else {
    const levels = [...sources].map((x) => x.level);
    const same = levels.every((l) => l === levels[0]);
    level = same ? levels[0] : FALLBACK_LEVEL;
    q = normalQuantile((1 + level) / 2);
    notes.push(derivedText.normalInterval(levelText(level)));
    if (!same) notes.push(derivedText.levelsDiffer);
  }
  if (Number.isFinite(q)) {
    result.lower = value - q * se;
    result.upper = value + q * se;
    result.level = level;
    result.dof = dof;
  }
  return finish(lead);
}

/** One result per group of the per-group fits read (a single result when none is per group). */
function evaluateAll(p: Prepared, results: ReadonlyMap<string, FitResult[]>, ctx: Context): DerivedResult[] {
  const d = p.plan;
  const expression = typeof d.text === 'string' && d.text ? d.text : exprText(d.expr);
  /** The result in reading order: name, group, expression, numbers, unit, fits, note, range. */
  const row = (group: string | undefined, n: Numbers): DerivedResult => ({
    name: d.name,
    ...(group !== undefined ? { group } : {}),
    expression,
    value: n.value,
    stderr: n.stderr,
    lower: n.lower,
    upper: n.upper,
    level: n.level,
    dof: n.dof,
    ...(d.unit !== undefined ? { unit: d.unit } : {}),
    fits: [...p.fits],
    note: n.note,
    ...(d.range ? { range: d.range } : {}),
  });
  if (p.error) return [row(undefined, missing(p.error))];
  for (const fit of p.fits) {
    if ((results.get(fit) ?? []).length === 0) return [row(undefined, missing(derivedText.noResult(fit)))];
  }
  // FIT."GROUP".NAME: that group's result, for every row
  const pinned: (FitResult | undefined)[] = p.slots.map((s) => (s.group === undefined ? undefined : results.get(s.fit)!.find((x) => x.group === s.group)));
  for (let j = 0; j < p.slots.length; j++) {
    const s = p.slots[j];
    if (s.group === undefined || pinned[j]) continue;
    const labels = results.get(s.fit)!.map((x) => x.group).filter((x): x is string => x !== undefined);
    const message = derivedText.unknownGroup(s.fit, s.group, suggest(s.group, labels));
    ctx.errors.push({ code: 'unknown_group', message, ...(s.range ? { range: s.range } : d.range ? { range: d.range } : {}), fit: s.fit });
    return [row(undefined, missing(message))];
  }
  /** The fits read without naming a group whose results are per group: one row per group. */
  const grouped = p.fits.filter((fit) => ctx.grouped(fit) && p.slots.some((s) => s.fit === fit && s.group === undefined));
  const resolve = (group: string | undefined): FitResult[] | string =>
    p.slots.map((s, j) => pinned[j] ?? (grouped.includes(s.fit) ? results.get(s.fit)!.find((x) => x.group === group) : results.get(s.fit)![0]) ?? derivedText.noGroup(s.fit, group ?? '')).reduce<FitResult[] | string>(
      (acc, r) => (typeof acc === 'string' ? acc : typeof r === 'string' ? r : [...acc, r]),
      [],
    );
  if (grouped.length === 0) {
    const res = resolve(undefined);
    return [row(undefined, typeof res === 'string' ? missing(res) : evaluate(p, res, '', ctx))];
  }
  const groups: string[] = [];
  for (const fit of grouped) for (const r of results.get(fit)!) if (r.group !== undefined && !groups.includes(r.group)) groups.push(r.group);
  return groups.map((group) => {
    const res = resolve(group);
    return row(group, typeof res === 'string' ? missing(res) : evaluate(p, res, group, ctx));
  });
}

/**
 * Evaluates the derived quantities of a plan, in order, against the fit
 * results. A quantity that reads a fit that did not run (`ran` false, e.g.
 * `--fit` chose others) is left out, like the queries of such fits.
 */
export function runDerived(
  plans: readonly DerivedPlan[],
  results: ReadonlyMap<string, FitResult[]>,
  ran: (fit: string) => boolean = () => true,
  joint: readonly JointFitResult[] = [],
  errors: RunError[] = [],
): DerivedResult[] {
  const defs = new Map<string, Prepared | null>();
  const ctx: Context = { defs, memo: new Map(), grouped: (fit) => (results.get(fit) ?? []).some((r) => r.group !== undefined), joint: new Map(joint.map((j) => [j.fit, j])), errors };
  const out: DerivedResult[] = [];
  for (const d of plans) {
    const prepared = prepareInto(d, defs, true);
    if (!prepared.fits.every(ran)) continue;
    for (const r of evaluateAll(prepared, results, ctx)) out.push(r);
  }
  return out;
}

/**
 * A derived quantity as a function of the free parameters of the one fit it
 * reads (for its bootstrap and profile intervals, engine/run/derived-intervals.ts):
 * value and gradient at any parameter vector, statistics held at the fit's
 * values. A string says why there is none (several fits, a per-group fit, a
 * quantity that cannot be evaluated).
 */
export interface DerivedFunction {
  fit: string;
  /** The expression reads fit statistics (held fixed). */
  readsStatistics: boolean;
  at(thetaFree: Float64Array): { value: number; grad: Float64Array };
}

export function derivedFunctions(plans: readonly DerivedPlan[], results: ReadonlyMap<string, FitResult[]>): Map<string, DerivedFunction | 'many_fits' | 'groups' | 'unusable'> {
  const defs = new Map<string, Prepared | null>();
  const grouped = (fit: string) => (results.get(fit) ?? []).some((r) => r.group !== undefined);
  const out = new Map<string, DerivedFunction | 'many_fits' | 'groups' | 'unusable'>();
  for (const d of plans) {
    const prepared = prepareInto(d, defs, false);
    if (prepared.error || !prepared.model) out.set(d.name, 'unusable');
    else if (prepared.fits.length !== 1) out.set(d.name, 'many_fits');
    else if (grouped(prepared.fits[0])) out.set(d.name, 'groups');
    else {
      const fit = prepared.fits[0];
      const r = (results.get(fit) ?? [])[0];
      if (!r) {
        out.set(d.name, 'unusable');
        continue;
      }
      const freeIndex = new Map<string, number>();
      r.parameters.filter((q) => !q.fixed).forEach((q, j) => freeIndex.set(q.name, j));
      const p = freeIndex.size;
      const base = new Float64Array(prepared.slots.length);
      const map = new Int32Array(prepared.slots.length).fill(-1);
      let bad = false;
      prepared.slots.forEach((s, k) => {
        if (s.of === 'statistic') base[k] = statisticValue(r, s.name as Parameters<typeof statisticValue>[1]);
        else if (s.of === 'stderr') {
          // A standard error is a fixed number here, like a statistic: it does not follow θ.
          const q = r.parameters.find((x) => x.name === s.name);
          if (!q) bad = true;
          else base[k] = q.stderr ?? NaN;
        } else {
          const q = r.parameters.find((x) => x.name === s.name);
          if (!q) bad = true;
          else {
            base[k] = q.estimate;
            map[k] = freeIndex.get(s.name) ?? -1;
          }
        }
      });
      if (bad) {
        out.set(d.name, 'unusable');
        continue;
      }
      const pp = prepared;
      out.set(d.name, {
        fit,
        readsStatistics: prepared.slots.some((s) => s.of !== 'estimate'),
        at(thetaFree: Float64Array) {
          const theta = new Float64Array(base);
          for (let k = 0; k < map.length; k++) if (map[k] >= 0) theta[k] = thetaFree[map[k]];
          const raw = rawNumbers(pp, theta, '', new Map(), defs, () => false);
          const grad = new Float64Array(p);
          for (let k = 0; k < map.length; k++) if (map[k] >= 0) grad[map[k]] += raw.grad[k];
          return { value: raw.value, grad };
        },
      });
    }
  }
  return out;
}

/**
 * The derived quantities that read one joint fit (engine/run/joint.ts) and name a group in every
 * reference (`FIT."GROUP".NAME`), as functions of the joint vector x = (θₛ, θ₁ … θ_G) in the layout of
 * engine/run/joint-profile.ts, for their profile and bootstrap intervals (engine/run/joint-intervals.ts).
 * Standard errors and statistics read are fixed numbers, as in `derivedFunctions`. A quantity that is not of
 * this kind (several fits, a reference without a group, a group outside the joint solve) is left out.
 */
export function jointDerivedQuantities(plans: readonly DerivedPlan[], results: ReadonlyMap<string, FitResult[]>, joint: JointFitResult): Map<string, { reads: number[]; readsStatistics: boolean; at(x: Float64Array): { value: number; grad: Float64Array } }> {
  const defs = new Map<string, Prepared | null>();
  const out = new Map<string, { reads: number[]; readsStatistics: boolean; at(x: Float64Array): { value: number; grad: Float64Array } }>();
  const ps = joint.shared.length;
  const pl = joint.perGroup.length;
  const groupResults = results.get(joint.fit) ?? [];
  for (const d of plans) {
    const prepared = prepareInto(d, defs, false);
    if (prepared.error || !prepared.model || prepared.fits.length !== 1 || prepared.fits[0] !== joint.fit) continue;
    const base = new Float64Array(prepared.slots.length);
    const map = new Int32Array(prepared.slots.length).fill(-1);
    let bad = false;
    prepared.slots.forEach((s, k) => {
      const g = s.group === undefined ? -1 : joint.groups.indexOf(s.group);
      const r = g < 0 ? undefined : groupResults.find((x) => x.group === s.group);
      if (!r) {
        bad = true;
        return;
      }
      if (s.of === 'statistic') base[k] = statisticValue(r, s.name as Parameters<typeof statisticValue>[1]);
      else {
        const q = r.parameters.find((x) => x.name === s.name);
        if (!q) bad = true;
        else if (s.of === 'stderr') base[k] = q.stderr ?? NaN;
        else {
          base[k] = q.estimate;
          const js = joint.shared.indexOf(s.name);
          const jl = joint.perGroup.indexOf(s.name);
          map[k] = js >= 0 ? js : jl >= 0 ? ps + g * pl + jl : -1;
        }
      }
    });
    if (bad) continue;
    const reads = [...new Set(Array.from(map).filter((o) => o >= 0))];
    const pos = Int32Array.from(map, (o) => (o >= 0 ? reads.indexOf(o) : -1));
    const pp = prepared;
    out.set(d.name, {
      reads,
      readsStatistics: prepared.slots.some((s) => s.of !== 'estimate'),
      at(x: Float64Array) {
        const theta = new Float64Array(base);
        for (let k = 0; k < map.length; k++) if (map[k] >= 0) theta[k] = x[map[k]];
        const raw = rawNumbers(pp, theta, '', new Map(), defs, () => false);
        const grad = new Float64Array(reads.length);
        for (let k = 0; k < pos.length; k++) if (pos[k] >= 0) grad[pos[k]] += raw.grad[k];
        return { value: raw.value, grad };
      },
    });
  }
  return out;
}
