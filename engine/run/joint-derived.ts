/**
 * Profile and bootstrap intervals of derived quantities of one joint fit that
 * name a group in every reference (`derive rel = potency."Reference".ec50 /
 * potency."Test lot 7".ec50`), replacing the "not computed for a per-group
 * fit" that engine/run/derived-intervals.ts gives them.
 *
 * - Profile: the joint sum of squares minimised with the quantity held at each
 *   value (engine/run/joint-profile.ts), when the joint fit computed its
 *   parameters' profiles (engine/run/joint-intervals.ts policy). For a ratio of
 *   two groups' parameters this is the likelihood-based counterpart of
 *   Fieller's interval (Fieller 1954, "Some problems in interval estimation",
 *   J. R. Statist. Soc. B 16:175–185), which the between-groups table gives
 *   from the joint covariance: Fieller's treats the two estimates as jointly
 *   normal with the Wald covariance, the profile follows the model's curvature.
 * - Bootstrap: the quantity at each joint refit of the fit's bootstrap
 *   (engine/run/joint-bootstrap.ts), percentile and BCa, with the withholding
 *   rule of single fits (replicates without a finite value counted as failed).
 * Statistics and standard errors the expression reads are held at the fitted
 * values, as in the delta method.
 */
import type { DerivedPlan } from '../../parser/plan';
import type { DerivedBootstrap, DerivedResult, FitResult, FitWarning, JointFitResult } from '../result';
import { bootstrapText, derivedProfileText, jointIntervalText, num, profileIntervalText } from '../messages';
import { derivedBootstrapFromDraws } from './derived-intervals';
import { jointDerivedQuantities } from './derived';
import type { JointRun } from './joint';
import type { JointBootstrap } from './joint-bootstrap';
import { jointStandardErrors, profileJointQuantity } from './joint-profile';
import { materiallyDifferent } from './profile-fit';

/** What a joint fit leaves for its derived quantities. */
export interface JointRefit {
  joint: JointFitResult;
  solved: NonNullable<JointRun['solved']>;
  bootstrap: JointBootstrap | null;
  asksBootstrap: boolean;
}

export function jointDerivedIntervals(plans: readonly DerivedPlan[], results: ReadonlyMap<string, FitResult[]>, derived: readonly DerivedResult[], refits: ReadonlyMap<string, JointRefit>): DerivedResult[] {
  if (refits.size === 0 || derived.length === 0) return [...derived];
  const quantities = new Map<string, { q: ReturnType<typeof jointDerivedQuantities> extends Map<string, infer V> ? V : never; ctx: JointRefit }>();
  for (const ctx of refits.values()) for (const [name, q] of jointDerivedQuantities(plans, results, ctx.joint)) quantities.set(name, { q, ctx });
  return derived.map((d) => {
    const found = quantities.get(d.name);
    if (!found || d.value === null) return d;
    const { q, ctx } = found;
    const { solved, s2, profile: pctx } = ctx.solved;
    const fitName = ctx.joint.fit;
    const warnings: FitWarning[] = [];
    let profile: DerivedResult['profile'];
    if (!pctx) profile = { status: 'skipped', note: jointIntervalText.derivedNotRun(fitName), interval: null };
    else if (!(d.stderr !== null && d.stderr > 0 && Number.isFinite(d.stderr))) profile = { status: 'skipped', note: d.stderr === null ? derivedProfileText.noParameter : derivedProfileText.noStderr, interval: null };
    else {
      const seX = jointStandardErrors(solved, s2);
      const out = profileJointQuantity(solved, q, d.value, d.stderr, seX, pctx);
      if (!out) profile = { status: 'skipped', note: derivedProfileText.noParameter, interval: null };
      else {
        const { lower, upper, refits: n } = out.profile;
        const wald = { lower: d.lower ?? NaN, upper: d.upper ?? NaN };
        const differs = materiallyDifferent(lower, wald.lower, wald) || materiallyDifferent(upper, wald.upper, wald);
        if (differs) warnings.push({ code: 'profile_differs', message: derivedProfileText.differs(d.name, profileIntervalText(lower, upper), `[${num(wald.lower)}, ${num(wald.upper)}]`) });
        const notes = [jointIntervalText.derivedComputed(ctx.joint.level, pctx.critical, entryName(ctx.joint, out.eliminated)), ...(q.readsStatistics ? [bootstrapText.statisticsFixed] : [])];
        profile = { status: 'computed', note: notes.join('; '), interval: { lower, upper, differs, refits: n } };
      }
    }
    const bootstrap = ctx.asksBootstrap ? bootstrapOf(d, q, ctx) : null;
    return { ...d, profile, ...(bootstrap ? { bootstrap } : {}), ...(warnings.length ? { warnings: [...(d.warnings ?? []), ...warnings] } : {}) };
  });
}

/** An entry of the joint vector by name: a shared parameter, or `"GROUP".PARAM`. */
function entryName(joint: JointFitResult, o: number): string {
  const ps = joint.shared.length;
  const pl = joint.perGroup.length;
  if (o < ps) return joint.shared[o];
  return `${JSON.stringify(joint.groups[Math.floor((o - ps) / pl)])}.${joint.perGroup[(o - ps) % pl]}`;
}

function bootstrapOf(d: DerivedResult, q: { at(x: Float64Array): { value: number }; readsStatistics: boolean }, ctx: JointRefit): DerivedBootstrap {
  const boot = ctx.bootstrap;
  if (!boot) return { status: 'skipped', note: bootstrapText.notConverged2, interval: null };
  return derivedBootstrapFromDraws(d.value!, q, boot.summary, boot.draws);
}
