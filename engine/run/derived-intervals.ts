/**
 * Profile-likelihood and bootstrap intervals of derived quantities, added to
 * the results of engine/run/derived.ts after it has run (their values, standard
 * errors and symmetric intervals are its own).
 *
 * Both need a quantity of one single fit (not per group) whose rows are at
 * hand (`RefitContext`; a gathered run of shards has none):
 * - profile (engine/run/derived-profile.ts): when the fit's own profile ran or
 *   its model is linear in its parameters (a derived quantity of a linear model,
 *   such as a ratio, need not be linear), with a `profile_differs` warning as
 *   for a parameter (engine/run/profile-fit.ts `materiallyDifferent`);
 * - bootstrap: when the fit ran one, the quantity evaluated at each refit's
 *   estimates (and at the leave-one-out estimates for BCa), intervals as for a
 *   parameter (engine/run/bootstrap-summary.ts). Statistics the expression reads
 *   are held at the fit's values in both, as in the delta method.
 */
import type { DerivedPlan, FitPlan } from '../../parser/plan';
import type { BootstrapSummary, DerivedBootstrap, DerivedProfile, DerivedResult, FitResult, FitWarning } from '../result';
import { bootstrapText, derivedProfileText, num, profileIntervalText } from '../messages';
import { derivedFunctions, type DerivedFunction } from './derived';
import { profileDerived } from './derived-profile';
import { bootstrapInterval, type BootstrapDraws } from './bootstrap-summary';
import type { FitData } from './fit-data';
import { materiallyDifferent } from './profile-fit';
import { PROFILE_WORK_BOUND } from './profile-limits';

/** What a single fit leaves for the intervals of its derived quantities. */
export interface RefitContext {
  fit: FitPlan;
  data: FitData;
  result: FitResult;
  /** The bootstrap refits, when it ran and was not withheld. */
  draws: BootstrapDraws | null;
}

export function derivedIntervals(plans: readonly DerivedPlan[], results: ReadonlyMap<string, FitResult[]>, derived: readonly DerivedResult[], refits: ReadonlyMap<string, RefitContext>): DerivedResult[] {
  if (derived.length === 0) return [...derived];
  const fns = derivedFunctions(plans, results);
  return derived.map((d) => {
    const fn = fns.get(d.name);
    if (fn === undefined || d.value === null) return d;
    if (typeof fn === 'string') {
      if (fn === 'unusable') return d;
      const skipped = fn === 'groups' ? derivedProfileText.groups : derivedProfileText.manyFits;
      const fitsBootstrap = d.fits.some((f) => refits.get(f)?.fit.options.bootstrap);
      return {
        ...d,
        profile: { status: 'skipped', note: skipped, interval: null },
        ...(fitsBootstrap ? { bootstrap: { status: 'skipped', note: fn === 'groups' ? bootstrapText.derivedGroups : bootstrapText.derivedManyFits, interval: null } } : {}),
      };
    }
    const ctx = refits.get(fn.fit);
    if (!ctx) return d;
    const prof = profileOf(d, fn, ctx);
    const boot = bootstrapOf(d, fn, ctx);
    return { ...d, profile: prof.profile, ...(boot ? { bootstrap: boot } : {}), ...(prof.warnings.length ? { warnings: [...(d.warnings ?? []), ...prof.warnings] } : {}) };
  });
}

function profileOf(d: DerivedResult, fn: DerivedFunction, ctx: RefitContext): { profile: DerivedProfile; warnings: FitWarning[] } {
  const skip = (note: string) => ({ profile: { status: 'skipped' as const, note, interval: null }, warnings: [] });
  const r = ctx.result;
  const status = r.profile?.status;
  if (status !== 'computed' && status !== 'linear') return skip(`${derivedProfileText.notRun(fn.fit)}${r.profile ? `: ${r.profile.note}` : ''}`);
  const np = r.goodness.n * r.goodness.p;
  if (np > PROFILE_WORK_BOUND && ctx.fit.options.profile !== 'always') return skip(derivedProfileText.overBound(np, PROFILE_WORK_BOUND));
  if (!(d.stderr !== null && d.stderr > 0 && Number.isFinite(d.stderr))) return skip(d.stderr === null ? derivedProfileText.noParameter : derivedProfileText.noStderr);
  const out = profileDerived({ fit: ctx.fit, data: ctx.data, result: r, g: fn, value: d.value!, stderr: d.stderr });
  if (!out) return skip(derivedProfileText.noParameter);
  const { lower, upper, refits } = out.profile;
  const wald = { lower: d.lower ?? NaN, upper: d.upper ?? NaN };
  const differs = materiallyDifferent(lower, wald.lower, wald) || materiallyDifferent(upper, wald.upper, wald);
  const notes = [derivedProfileText.computed(r.level, out.critical, out.eliminated), ...(fn.readsStatistics ? [bootstrapText.statisticsFixed] : [])];
  const warnings: FitWarning[] = differs
    ? [{ code: 'profile_differs', message: derivedProfileText.differs(d.name, profileIntervalText(lower, upper), `[${num(wald.lower)}, ${num(wald.upper)}]`) }]
    : [];
  return { profile: { status: 'computed', note: notes.join('; '), interval: { lower, upper, differs, refits } }, warnings };
}

function bootstrapOf(d: DerivedResult, fn: DerivedFunction, ctx: RefitContext): DerivedBootstrap | null {
  const s = ctx.result.bootstrap;
  if (!ctx.fit.options.bootstrap || !s) return null;
  return derivedBootstrapFromDraws(d.value!, fn, s, ctx.draws);
}

/**
 * The bootstrap interval of a derived quantity from its fit's replicate estimates (the quantity evaluated at each
 * replicate and, for BCa, at each leave-one-out estimate), for single fits and joint fits alike (joint-derived.ts).
 */
export function derivedBootstrapFromDraws(value: number, fn: { at(x: Float64Array): { value: number }; readsStatistics: boolean }, s: BootstrapSummary, draws: BootstrapDraws | null): DerivedBootstrap {
  if (s.status !== 'computed' || !draws) return { status: s.status === 'withheld' ? 'withheld' : 'skipped', note: s.note, interval: null };
  const { p, replicates, theta, jack, failures } = draws;
  const values = new Float64Array(replicates).fill(NaN);
  let notFinite = 0;
  for (let b = 0; b < replicates; b++) {
    if (failures[b] !== null) continue;
    const v = fn.at(theta.subarray(b * p, (b + 1) * p)).value;
    if (Number.isFinite(v)) values[b] = v;
    else notFinite++;
  }
  let jv: Float64Array | null = null;
  if (jack && s.bca) {
    const n = jack.length / p;
    jv = new Float64Array(n);
    for (let i = 0; i < n; i++) jv[i] = fn.at(jack.subarray(i * p, (i + 1) * p)).value;
  }
  const notes = [s.note, ...(notFinite ? [bootstrapText.derivedNotFinite(notFinite)] : []), ...(fn.readsStatistics ? [bootstrapText.statisticsFixed] : [])];
  // the fit's withholding rule (engine/run/bootstrap-summary.ts) with the replicates that give no value counted as failed
  const allowed = Math.floor((replicates * (1 - s.level)) / 2);
  if (s.failed + notFinite > allowed) return { status: 'withheld', note: bootstrapText.withheld(s.failed + notFinite, replicates, allowed), interval: null };
  const iv = bootstrapInterval(values, jv, value, s.level);
  return iv ? { status: 'computed', note: notes.join('; '), interval: iv } : { status: 'withheld', note: notes.join('; '), interval: null };
}
