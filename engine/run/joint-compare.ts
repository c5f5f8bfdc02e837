/**
 * Comparisons between the groups of a joint fit (engine/run/joint.ts):
 *
 * - Shared versus separate. The joint fit (shared parameters common) is nested
 *   in the groups' separate fits (every parameter per group) by construction:
 *   the extra-sum-of-squares F test F = ((SSR₀ − SSR₁)/(dof₀ − dof₁)) / (SSR₁/dof₁)
 *   with the restricted model 0 and the general model 1 (Draper & Smith 1998,
 *   *Applied Regression Analysis*, 3rd ed., the "extra sum of squares"
 *   principle; approximate for models nonlinear in their parameters, Bates &
 *   Watts 1988, *Nonlinear Regression Analysis and Its Applications*). For a
 *   relative-potency assay whose only per-group parameter is the potency, it is
 *   the usual significance test of parallelism (common practice; USP general
 *   chapter <1034> "Analysis of Biological Assays" discusses it and prefers
 *   equivalence limits set by the laboratory, so the views call it a check).
 * - Per shared parameter: the joint fit against the joint fit with that one
 *   parameter released to a value per group (solved again by the block solver
 *   from the joint estimates), the same F test.
 * - Pairs of groups, per per-group parameter: the difference b − a with its
 *   standard error from the joint covariance (Var a + Var b − 2 Cov(a, b); the
 *   groups share the shared parameters, so Cov(a, b) ≠ 0) and a Student-t
 *   interval; the ratio b / a with Fieller's interval (Fieller 1954, "Some
 *   problems in interval estimation", J. R. Stat. Soc. B 16:175–185): with
 *   g = t²·Var a / a², the interval is unbounded when g ≥ 1 (a is not
 *   distinguishable from 0 at this level), else
 *   [ρ − g·C/Va ∓ (t/|a|)·√(Vb − 2ρC + ρ²Va − g(Vb − C²/Va))] / (1 − g),
 *   ρ = b/a, C = Cov(a, b). All pairs up to PAIR_GROUPS groups; beyond, each group
 *   against the first (the table would otherwise grow with the square of the groups).
 */
import type { FitResult, GroupPair, JointFitResult, NestedFTest } from '../result';
import { fUpper, tCritical } from '../stats/distributions';
import { crossCovariance } from '../solve/block-covariance';
import type { CancelToken } from '../solve/problem';
import { jointSetup, solveJoint, type JointSolved } from './joint';
import { jointText } from '../messages';

/** Most groups whose every pair is compared (6 groups: 15 pairs); beyond, each group against the first. A readable table, not a statistical limit. */
export const PAIR_GROUPS = 6;

/** The F test of a restricted model against the general one it is nested in (module comment). */
export function nestedF(restricted: { ssr: number; dof: number; p: number }, general: { ssr: number; dof: number; p: number }): NestedFTest {
  const df1 = restricted.dof - general.dof;
  const df2 = general.dof;
  const base = { restricted, general, df1, df2 };
  if (!(df1 > 0) || !(df2 > 0) || !(general.ssr > 0)) return { ...base, f: NaN, pValue: NaN, note: jointText.noTest };
  const raw = (restricted.ssr - general.ssr) / df1 / (general.ssr / df2);
  if (raw < 0) {
    // the general model fits worse than the model it contains: one of the two fits missed its minimum
    return { ...base, f: 0, pValue: 1, note: jointText.generalWorse(restricted.ssr, general.ssr) };
  }
  return { ...base, f: raw, pValue: fUpper(raw, df1, df2) };
}

type Comparisons = Pick<JointFitResult, 'sharedVsSeparate' | 'perParameter' | 'pairs'>;

export function compareGroups(solved: JointSolved, separate: FitResult[], keep: number[], s2: number, opts: { cancel?: CancelToken; maxIterations?: number; tolerance?: number }): Comparisons {
  const { setup, outcome } = solved;
  const ps = setup.sharedIdx.length;
  const pl = setup.localIdx.length;
  const G = keep.length;
  const joint = { ssr: solved.ssr, dof: solved.dof, p: ps + G * pl };

  // every shared parameter released: the groups' separate fits
  const sep = keep.map((g) => separate[g]);
  const sharedVsSeparate = sep.every((r) => r && r.stop.converged)
    ? (() => {
      const t = nestedF(joint, { ssr: sep.reduce((a, r) => a + r.goodness.ssr, 0), dof: sep.reduce((a, r) => a + r.goodness.dof, 0), p: sep.reduce((a, r) => a + r.goodness.p, 0) });
      return t;
    })()
    : null;

  // one shared parameter released at a time
  const perParameter: Comparisons['perParameter'] = [];
  for (let m = 0; m < ps; m++) {
    if (opts.cancel?.cancelled) break;
    const name = setup.free[setup.sharedIdx[m]];
    const rest = new Set(setup.sharedIdx.filter((_, k) => k !== m).map((j) => setup.free[j]));
    const released = jointSetup(setup.fit, setup.data, rest);
    const value = (j: number, g: number) => {
      const k = setup.sharedIdx.indexOf(j);
      return k >= 0 ? outcome.shared[k] : outcome.local[g * pl + setup.localIdx.indexOf(j)];
    };
    const s0 = Float64Array.from(released.sharedIdx, (j) => value(j, 0));
    const pl2 = released.localIdx.length;
    const l0 = new Float64Array(G * pl2);
    for (let g = 0; g < G; g++) released.localIdx.forEach((j, k) => (l0[g * pl2 + k] = value(j, g)));
    const general = solveJoint(released, s0, l0, opts);
    const test = general.outcome.stop.converged
      ? nestedF(joint, { ssr: general.ssr, dof: general.dof, p: (ps - 1) + G * pl2 })
      : { ...nestedF(joint, { ssr: general.ssr, dof: general.dof, p: (ps - 1) + G * pl2 }), note: jointText.releasedNotConverged(general.outcome.stop.message) };
    perParameter.push({ parameter: name, ...test });
  }

  // pairs of groups
  const pairs: GroupPair[] = [];
  const t = tCritical(setup.fit.options.level, solved.dof);
  const q = ps + pl;
  const groupNames = setup.data.map((d) => d.group ?? '');
  const pairList: [number, number][] = [];
  if (G <= PAIR_GROUPS) for (let a = 0; a < G; a++) for (let b = a + 1; b < G; b++) pairList.push([a, b]);
  else for (let b = 1; b < G; b++) pairList.push([0, b]);
  for (let m = 0; m < pl; m++) {
    const name = setup.free[setup.localIdx[m]];
    for (const [a, b] of pairList) {
      const va = outcome.local[a * pl + m];
      const vb = outcome.local[b * pl + m];
      const ca = solved.cov.groups[a];
      const cb = solved.cov.groups[b];
      const Va = s2 * ca.cov[(ps + m) * q + ps + m];
      const Vb = s2 * cb.cov[(ps + m) * q + ps + m];
      const C = s2 * crossCovariance(solved.cov, ps, a, m, b, m);
      const varDiff = Va + Vb - 2 * C;
      const se = ca.determined && cb.determined && varDiff >= 0 ? Math.sqrt(varDiff) : NaN;
      const d = vb - va;
      const fl = fieller(va, vb, Va, Vb, C, t);
      pairs.push({
        parameter: name, a: groupNames[a], b: groupNames[b],
        difference: d,
        differenceSe: Number.isFinite(se) ? se : null,
        differenceLower: Number.isFinite(se) ? d - t * se : null,
        differenceUpper: Number.isFinite(se) ? d + t * se : null,
        ratio: vb / va,
        ratioLower: fl ? fl[0] : null,
        ratioUpper: fl ? fl[1] : null,
      });
    }
  }
  return { sharedVsSeparate, perParameter, pairs };
}

/** Fieller's interval of b / a (module comment); null when it is not bounded. */
export function fieller(a: number, b: number, Va: number, Vb: number, C: number, t: number): [number, number] | null {
  if (![a, b, Va, Vb, C, t].every(Number.isFinite) || a === 0 || !(Va >= 0)) return null;
  const g = (t * t * Va) / (a * a);
  if (g >= 1) return null;
  const rho = b / a;
  const disc = Vb - 2 * rho * C + rho * rho * Va - g * (Vb - (C * C) / Va);
  if (!(disc >= 0)) return null;
  const centre = rho - (Va > 0 ? (g * C) / Va : 0);
  const half = (t / Math.abs(a)) * Math.sqrt(disc);
  return [(centre - half) / (1 - g), (centre + half) / (1 - g)];
}
