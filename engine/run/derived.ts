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
 * - statistics (`rmse`, `r2`, `n`, ...) are fixed numbers; their own sampling
 *   uncertainty is not propagated (for LOD = 3.3·s/slope this understates the
 *   uncertainty: s alone has a relative standard error of about 1/√(2·dof));
 * - parameters of different fits are independent (zero cross-covariance),
 *   which holds when the fits read different data.
 *
 * Interval: value ± q·se. When every free parameter read comes from one fit,
 * q = t_{(1+level)/2, dof} with that fit's level and degrees of freedom (as
 * for its own parameters); otherwise q = z_{(1+level)/2} (normal) at the
 * common level of the fits, or 0.95 when their levels differ.
 *
 * Per-group fits give one value per group; a fit without groups is shared by
 * every group. Derived quantities named in the expression are expanded into
 * their own expressions first, so the gradient reaches the fit parameters.
 *
 * Guards: a failed or missing fit, a missing parameter, a non-finite statistic
 * or value give `value: null` with the reason; a non-finite derivative or
 * covariance entry (where the derivative is not zero) gives `stderr: null`. A
 * negative gᵀCg is rounding when it is within NEGATIVE_VARIANCE_TOLERANCE of
 * Σ|gⱼCⱼₖgₖ| (then the variance is 0), else the covariance is unusable.
 */
import type { DerivedPlan, Expr } from '../../parser/plan';
import { compileModel, type CompiledModel } from '../compile';
import { derivedText, num } from '../messages';
import type { DerivedResult, FitResult } from '../result';
import { normalQuantile, tCritical } from '../stats/distributions';
import { statisticValue } from './expectations';
import { exprText, mapLeaves } from '../../parser/plan-expr';

/** A gᵀCg with gᵀCg < 0 and |gᵀCg| ≤ this·Σ|gⱼCⱼₖgₖ| is rounding error and taken as 0. */
export const NEGATIVE_VARIANCE_TOLERANCE = 1e-10;

/** Node limit of an expression after expanding derived quantities (each expansion may double it; guards untrusted specs). */
export const MAX_EXPANDED_NODES = 100_000;

/** Confidence level used for a normal interval over fits with different levels. */
const FALLBACK_LEVEL = 0.95;

type Result = Extract<Expr, { kind: 'result' }>;

interface Slot {
  fit: string;
  name: string;
  of: Result['of'];
}

interface Prepared {
  plan: DerivedPlan;
  fits: string[];
  slots: Slot[];
  model: CompiledModel | null;
  /** Why the expression cannot be evaluated at all. */
  error?: string;
}

type Numbers = Pick<DerivedResult, 'value' | 'stderr' | 'lower' | 'upper' | 'level' | 'dof' | 'note'>;

const sentence = (s: string): string => (s.endsWith('.') ? s : `${s}.`);
const missing = (note: string): Numbers => ({ value: null, stderr: null, lower: null, upper: null, level: null, dof: null, note: sentence(note) });

/** Tree size of `e`, counting shared subtrees once per use (memoized by object identity). */
function treeSize(e: Expr, memo = new Map<Expr, number>()): number {
  const hit = memo.get(e);
  if (hit !== undefined) return hit;
  let n = 1;
  switch (e.kind) {
    case 'negate': case 'not': n += treeSize(e.arg, memo); break;
    case 'binary': case 'compare': case 'logic': n += treeSize(e.left, memo) + treeSize(e.right, memo); break;
    case 'call': case 'chain': for (const a of e.args) n += treeSize(a, memo); break;
    default: break;
  }
  memo.set(e, n);
  return n;
}

const slotKey = (s: Slot): string => `${s.of}\u0000${s.fit}\u0000${s.name}`;

/**
 * Expands derived names (from `defs`: already expanded, or null when that
 * quantity could not be expanded), collects the fits and numbers read, compiles.
 */
function prepare(plan: DerivedPlan, defs: ReadonlyMap<string, Expr | null>): { prepared: Prepared; expanded: Expr | null } {
  const unknown: string[] = [];
  const broken: string[] = [];
  const expanded = mapLeaves(plan.expr, (e) => {
    if (e.kind !== 'derived') return e;
    const d = defs.get(e.name);
    if (d === undefined) unknown.push(e.name);
    if (d === null) broken.push(e.name);
    return d ?? { kind: 'number', value: 0 };
  });
  const base: Prepared = { plan, fits: [], slots: [], model: null };
  if (unknown.length) return { prepared: { ...base, error: derivedText.unknownDerived(unknown[0]) }, expanded: null };
  if (broken.length) return { prepared: { ...base, error: derivedText.dependsOnBroken(broken[0]) }, expanded: null };
  if (treeSize(expanded) > MAX_EXPANDED_NODES) {
    return { prepared: { ...base, error: derivedText.compileFailed(`more than ${MAX_EXPANDED_NODES} terms after expanding derived quantities`) }, expanded: null };
  }
  const slots = new Map<string, Slot>();
  const fits: string[] = [];
  const withSlots = mapLeaves(expanded, (e) => {
    if (e.kind !== 'result') return e;
    const slot: Slot = { fit: e.fit, name: e.name, of: e.of };
    const key = slotKey(slot);
    if (!slots.has(key)) slots.set(key, slot);
    if (!fits.includes(e.fit)) fits.push(e.fit);
    return { kind: 'param', name: key, range: e.range };
  });
  const list = [...slots.values()];
  try {
    const model = compileModel(withSlots, list.map(slotKey), []);
    return { prepared: { plan, fits, slots: list, model }, expanded };
  } catch (err) {
    return { prepared: { plan, fits, slots: list, model: null, error: derivedText.compileFailed(err instanceof Error ? err.message : String(err)) }, expanded };
  }
}

const levelText = (level: number): string => `${num(level * 100)}%`;

/** Value, standard error and interval with the fit result chosen for each fit read. */
function evaluate(p: Prepared, pick: ReadonlyMap<string, FitResult>): Numbers {
  if (p.error || !p.model) return missing(p.error ?? derivedText.compileFailed('no evaluator'));
  const notes: string[] = [];
  for (const fit of p.fits) {
    const r = pick.get(fit)!;
    if (r.stop.code === 'failed' || r.stop.code === 'cancelled') return missing(derivedText.fitFailed(fit, r.stop.message));
    // withheld like the fit's own statistics (engine/front/views/summary.ts fitStatus): its values are not estimates
    if (!r.stop.converged) return missing(derivedText.notConverged(fit));
  }
  const theta = new Float64Array(p.slots.length);
  /** Per slot: index of the parameter in its fit result, or -1 (statistic or fixed parameter). */
  const free: number[] = [];
  for (let j = 0; j < p.slots.length; j++) {
    const s = p.slots[j];
    const r = pick.get(s.fit)!;
    free.push(-1);
    if (s.of === 'statistic') {
      theta[j] = statisticValue(r, s.name as Parameters<typeof statisticValue>[1]);
    } else {
      const k = r.parameters.findIndex((q) => q.name === s.name);
      if (k < 0) return missing(derivedText.noParameter(s.fit, s.name));
      theta[j] = r.parameters[k].estimate;
      if (!r.parameters[k].fixed) free[j] = k;
    }
    if (!Number.isFinite(theta[j])) return missing(derivedText.notComputable(`${s.fit}.${s.name}`));
  }
  const out = new Float64Array(1);
  const g = new Float64Array(p.slots.length);
  p.model.valueAndJacobian(theta, [], 1, out, g);
  const value = out[0];
  if (!Number.isFinite(value)) return missing(derivedText.notFinite);

  const statistics = p.slots.filter((s) => s.of === 'statistic').map((s) => `${s.fit}.${s.name}`);
  if (statistics.length) notes.push(derivedText.fixedStatistics(statistics));
  const paramFits = p.fits.filter((fit) => p.slots.some((s, j) => s.fit === fit && free[j] >= 0));
  const result: Numbers = { value, stderr: null, lower: null, upper: null, level: null, dof: null, note: '' };
  const finish = (lead: string): Numbers => ({ ...result, note: sentence([lead, ...notes].join('; ')) });
  if (paramFits.length === 0) return finish(derivedText.noFreeParameter);

  // gᵀCg, fit by fit (zero covariance between fits), with C = diag(se)·ρ·diag(se) of each fit and
  // every term divided by the largest |gⱼ·seⱼ| first, so nothing is squared out of range.
  const perFit: { m: number; q: number }[] = [];
  const badCovariance: string[] = [];
  for (const fit of paramFits) {
    const r = pick.get(fit)!;
    const idx = p.slots.map((s, j) => (s.fit === fit && free[j] >= 0 ? j : -1)).filter((j) => j >= 0);
    const v = new Map<number, number>();
    let m = 0;
    for (const a of idx) {
      if (!Number.isFinite(g[a])) return finish(derivedText.badGradient);
      if (g[a] === 0) continue;
      const se = r.parameters[free[a]].stderr;
      const va = typeof se === 'number' ? g[a] * se : NaN;
      if (!Number.isFinite(va)) {
        if (!badCovariance.includes(fit)) badCovariance.push(fit);
        continue;
      }
      if (va === 0) continue; // an estimate that does not vary (e.g. an exact fit) adds nothing
      v.set(a, va);
      m = Math.max(m, Math.abs(va));
    }
    let q = 0;
    let scale = 0;
    for (const [a, va] of v) {
      for (const [b, vb] of v) {
        const rho = r.correlation?.[free[a]]?.[free[b]];
        if (typeof rho !== 'number' || !Number.isFinite(rho)) {
          if (!badCovariance.includes(fit)) badCovariance.push(fit);
          continue;
        }
        const term = (va / m) * rho * (vb / m);
        q += term;
        scale += Math.abs(term);
      }
    }
    if (q < 0) {
      if (-q > NEGATIVE_VARIANCE_TOLERANCE * scale) return finish(derivedText.noCovariance(paramFits));
      q = 0;
    }
    if (m > 0) perFit.push({ m, q });
  }
  if (badCovariance.length) return finish(derivedText.noCovariance(badCovariance));
  const big = perFit.reduce((a, f) => Math.max(a, f.m), 0);
  const variance = big === 0 ? 0 : perFit.reduce((a, f) => a + (f.m / big) ** 2 * f.q, 0);
  const se = big * Math.sqrt(variance);
  result.stderr = se;
  const lead = paramFits.length === 1 ? derivedText.deltaOne(paramFits[0]) : derivedText.deltaMany(paramFits);

  let q: number;
  let level: number;
  let dof: number | null = null;
  if (paramFits.length === 1) {
    const r = pick.get(paramFits[0])!;
    level = r.level;
    dof = r.goodness.dof;
    q = tCritical(level, dof);
    notes.push(Number.isFinite(q) ? derivedText.tInterval(levelText(level), dof) : derivedText.noInterval);
  } else {
    const levels = paramFits.map((fit) => pick.get(fit)!.level);
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
function evaluateAll(p: Prepared, results: ReadonlyMap<string, FitResult[]>): DerivedResult[] {
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
  const grouped = p.fits.filter((fit) => results.get(fit)!.some((r) => r.group !== undefined));
  if (grouped.length === 0) {
    const pick = new Map(p.fits.map((fit) => [fit, results.get(fit)![0]] as const));
    return [row(undefined, evaluate(p, pick))];
  }
  const groups: string[] = [];
  for (const fit of grouped) for (const r of results.get(fit)!) if (r.group !== undefined && !groups.includes(r.group)) groups.push(r.group);
  return groups.map((group) => {
    const pick = new Map<string, FitResult>();
    for (const fit of p.fits) {
      const rs = results.get(fit)!;
      const r = grouped.includes(fit) ? rs.find((x) => x.group === group) : rs[0];
      if (!r) return row(group, missing(derivedText.noGroup(fit, group)));
      pick.set(fit, r);
    }
    return row(group, evaluate(p, pick));
  });
}

/**
 * Evaluates the derived quantities of a plan, in order, against the fit
 * results. A quantity that reads a fit that did not run (`ran` false, e.g.
 * `--fit` chose others) is left out, like the queries of such fits.
 */
export function runDerived(plans: readonly DerivedPlan[], results: ReadonlyMap<string, FitResult[]>, ran: (fit: string) => boolean = () => true): DerivedResult[] {
  const defs = new Map<string, Expr | null>();
  const out: DerivedResult[] = [];
  for (const d of plans) {
    let step: ReturnType<typeof prepare>;
    try {
      step = prepare(d, defs);
    } catch (err) {
      // e.g. a RangeError from recursion over an extremely deep expansion (untrusted spec): reported, not thrown.
      step = { prepared: { plan: d, fits: [], slots: [], model: null, error: derivedText.compileFailed(err instanceof Error ? err.message : String(err)) }, expanded: null };
    }
    const { prepared, expanded } = step;
    defs.set(d.name, expanded);
    if (!prepared.fits.every(ran)) continue;
    for (const d of evaluateAll(prepared, results)) out.push(d);
  }
  return out;
}
