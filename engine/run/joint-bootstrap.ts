/**
 * Bootstrap of a joint fit (engine/run/joint.ts): B resampled copies of all
 * groups' data, each refitted jointly by the block Levenberg–Marquardt
 * (engine/solve/block-lm.ts; no dense n × P matrix) from the joint estimate,
 * with percentile and BCa intervals of every shared and per-group parameter
 * (Efron & Tibshirani 1993, §13.3 and §14.3; engine/run/bootstrap-summary.ts).
 *
 * Resampling keeps the design of the groups (Davison & Hinkley 1997,
 * *Bootstrap Methods and Their Application*, §3.8 on stratified resampling:
 * each stratum resampled on its own, so every replicate has the groups and
 * row counts of the data):
 * - `residuals`: within each group, yᵢ* = ŷᵢ + eᵢ* ÷ √wᵢ with eᵢ* drawn from that
 *   group's weighted residuals √wⱼ(yⱼ − ŷⱼ), centred on the group's mean;
 * - `adjusted`: the same with eⱼ/√(1 − hⱼ), hⱼ the leverages of the joint fit
 *   (engine/run/joint-leverage.ts; Davison & Hinkley 1997, §6.2.3); rows of
 *   leverage one are left out of their group's pool;
 * - `cases`: within each group, n_g of its rows drawn with replacement.
 * The BCa acceleration comes from the n leave-one-out joint refits (one row of
 * one group left out each time), up to JOINT_BCA_MAX_ROWS rows.
 *
 * Replicate b draws from its own stream (bootstrap-rng.ts, a function of
 * (seed, b)), the groups in their order, so the result does not depend on the
 * others. The refits run in this thread (the worker pool of single fits,
 * engine/groups/bootstrap-threads.ts, ships one data table per job).
 * Cost: B (+ n) joint fits, each O(Σ n_g (pₛ + p_l)²) per iteration.
 */
import type { FitPlan } from '../../parser/plan';
import type { BootstrapInterval, BootstrapSummary, FitWarning } from '../result';
import { compileModel } from '../compile';
import { modelProblem } from '../solve/model-problem';
import type { CancelToken } from '../solve/problem';
import { leverageOneTolerance } from '../stats/influence';
import { bootstrapText, jointIntervalText } from '../messages';
import { replicateStream } from './bootstrap-rng';
import { summarizeBootstrap, type BootstrapDraws } from './bootstrap-summary';
import { freeModel } from './curve';
import { blockProblem, type JointRun, type JointSetup, type JointSolved } from './joint';
import { solveBlockLM } from '../solve/block-lm';
import { jointLeverages } from './joint-leverage';
import { jointVector } from './joint-profile';
import { jointSolveOptions } from './joint-intervals';

/** Rows above which no leave-one-out joint refits are run for BCa (each is a joint fit of all groups: n of them cost O(n²)). */
export const JOINT_BCA_MAX_ROWS = 2000;

export interface JointBootstrap {
  summary: BootstrapSummary;
  /** Per entry of the joint vector (joint-profile.ts layout), null when withheld. */
  intervals: (BootstrapInterval | null)[];
  warnings: FitWarning[];
  /** The refits over the joint vector (for derived quantities), null when withheld. */
  draws: BootstrapDraws | null;
  xHat: Float64Array;
}

/** The bootstrap of a converged joint fit; `fitted` per group (setup order) in data units. */
export function jointBootstrap(fit: FitPlan, solved: JointSolved, fitted: readonly ArrayLike<number>[], level: number, cancel?: CancelToken): JointBootstrap | null {
  const asked = fit.options.bootstrap;
  if (!asked) return null;
  const setup = solved.setup;
  const G = setup.data.length;
  const xHat = jointVector(solved);
  const P = xHat.length;
  const ps = setup.sharedIdx.length;
  const { expr, free } = freeModel(fit);
  const model = compileModel(expr, free, setup.data[0].modelColumns);
  const pools: Float64Array[] = [];
  if (asked.resample !== 'cases') {
    const lev = asked.resample === 'adjusted' ? jointLeverages(solved) : null;
    const tol = leverageOneTolerance(solved.n);
    setup.data.forEach((d, g) => {
      const e: number[] = [];
      for (let i = 0; i < d.n; i++) {
        let v = (d.weights ? Math.sqrt(d.weights[i]) : 1) * (d.y[i] - fitted[g][i]);
        if (lev) {
          const h = lev[g][i];
          if (!Number.isFinite(h) || 1 - h <= tol) continue;
          v /= Math.sqrt(1 - h);
        }
        e.push(v);
      }
      const mean = e.reduce((a, v) => a + v, 0) / Math.max(1, e.length);
      pools.push(Float64Array.from(e, (v) => v - mean));
    });
  }
  const pl = setup.localIdx.length;
  const options = { ...jointSolveOptions(fit), ...(cancel ? { cancel } : {}) };

  /** The setup with each group's rows chosen (`rows[g]`, null: all) and response replaced (`ys[g]`, null: the data's). */
  const resampled = (rows: (Int32Array | null)[], ys: (Float64Array | null)[]): JointSetup => {
    const data = setup.data.map((d, g) => ({ ...d, n: rows[g] ? rows[g]!.length : d.n }));
    const problems = setup.data.map((d, g) => {
      const pick = (a: Float64Array) => (rows[g] ? Float64Array.from(rows[g]!, (i) => a[i]) : a);
      const y = pick(ys[g] ?? d.y);
      const sw = d.weights ? pick(d.weights).map(Math.sqrt) : undefined;
      return modelProblem({ model, columns: d.columns.map(pick), response: y, n: data[g].n, ...(sw ? { sqrtWeights: sw } : {}), lower: setup.lower, upper: setup.upper });
    });
    return { ...setup, data, problems };
  };
  const refit = (s: JointSetup): Float64Array | string => {
    if (s.data.some((d) => d.n < Math.max(1, pl))) return jointIntervalText.tooFewRows;
    const out = solveBlockLM(blockProblem(s), solved.outcome.shared, solved.outcome.local, options);
    if (!out.stop.converged) return bootstrapText.notConverged(out.stop.code);
    const x = new Float64Array(P);
    x.set(out.shared);
    x.set(out.local, ps);
    return x.every(Number.isFinite) ? x : bootstrapText.notFinite;
  };

  const B = asked.replicates;
  const jackknife = solved.n <= JOINT_BCA_MAX_ROWS;
  const total = B + (jackknife ? solved.n : 0);
  const all = new Float64Array(total * P).fill(NaN);
  const failures: (string | null)[] = [];
  for (let b = 0; b < total; b++) {
    if (cancel?.cancelled) {
      failures.push(bootstrapText.cancelled);
      continue;
    }
    let got: Float64Array | string;
    if (b < B) {
      const rng = replicateStream(asked.seed, b);
      const rows: (Int32Array | null)[] = [];
      const ys: (Float64Array | null)[] = [];
      for (let g = 0; g < G; g++) {
        const d = setup.data[g];
        if (asked.resample === 'cases') {
          const r = new Int32Array(d.n);
          for (let i = 0; i < d.n; i++) r[i] = rng.index(d.n);
          rows.push(r);
          ys.push(null);
        } else {
          const pool = pools[g];
          rows.push(null);
          if (pool.length === 0) {
            ys.push(null);
            continue;
          }
          const y = new Float64Array(d.n);
          for (let i = 0; i < d.n; i++) y[i] = fitted[g][i] + pool[rng.index(pool.length)] / (d.weights ? Math.sqrt(d.weights[i]) : 1);
          ys.push(y);
        }
      }
      got = asked.resample !== 'cases' && pools.some((p) => p.length === 0) ? bootstrapText.noResiduals : refit(resampled(rows, ys));
    } else {
      // leave-one-out: row `out` of the rows of all groups in order
      let out = b - B;
      let g = 0;
      while (out >= setup.data[g].n) out -= setup.data[g++].n;
      const rows = setup.data.map((d, h) => (h === g ? Int32Array.from({ length: d.n - 1 }, (_, i) => (i < out ? i : i + 1)) : null));
      got = refit(resampled(rows, setup.data.map(() => null)));
    }
    if (typeof got === 'string') failures.push(got);
    else {
      all.set(got, b * P);
      failures.push(null);
    }
  }
  const draws: BootstrapDraws = { p: P, replicates: B, theta: all.subarray(0, B * P), jack: jackknife ? all.subarray(B * P) : null, failures };
  const s = summarizeBootstrap({ resample: asked.resample, seed: asked.seed, theta: xHat }, draws, level, jackknife ? null : jointIntervalText.bcaTooMany(solved.n, JOINT_BCA_MAX_ROWS));
  const failed = s.summary.failed;
  const single = bootstrapText.computed(B, asked.resample, asked.seed, level, failed);
  const summary = s.summary.status === 'computed' ? { ...s.summary, note: s.summary.note.replace(single, jointIntervalText.bootstrapComputed(B, asked.resample, asked.seed, level, failed)) } : s.summary;
  return { summary, intervals: s.intervals, warnings: s.warnings, draws: summary.status === 'computed' ? draws : null, xHat };
}

/**
 * The joint run with its bootstrap (when the fit asks for one): every kept group's parameter rows get the
 * intervals of their entries (the shared ones alike in every group), the summary and any warning; the joint
 * estimates get the shared parameters' intervals. A joint fit that did not converge gets a summary saying so.
 */
export function withJointBootstrap(fit: FitPlan, run: JointRun, cancel?: CancelToken): { run: JointRun; bootstrap: JointBootstrap | null } {
  const asked = fit.options.bootstrap;
  if (!asked || !run.solved) return { run, bootstrap: null };
  const { solved, ok, keep } = run.solved;
  const results = run.results.slice();
  const level = fit.options.level;
  if (!ok) {
    const summary: BootstrapSummary = { status: 'skipped', note: bootstrapText.notConverged2, resample: asked.resample, replicates: asked.replicates, seed: asked.seed, level, failed: 0, failures: [], bca: false, bcaNote: '', jackknife: 0, jackknifeFailed: 0 };
    for (const g of keep) results[g] = { ...results[g], bootstrap: summary };
    return { run: { ...run, results }, bootstrap: null };
  }
  const boot = jointBootstrap(fit, solved, keep.map((g) => run.results[g].points.fitted), level, cancel);
  if (!boot) return { run, bootstrap: null };
  const setup = solved.setup;
  const ps = setup.sharedIdx.length;
  const pl = setup.localIdx.length;
  const sharedNames = setup.sharedIdx.map((j) => setup.free[j]);
  const localNames = setup.localIdx.map((j) => setup.free[j]);
  keep.forEach((g, k) => {
    const r = results[g];
    const parameters = r.parameters.map((row) => {
      if (row.fixed) return row;
      const js = sharedNames.indexOf(row.name);
      const jl = localNames.indexOf(row.name);
      const iv = js >= 0 ? boot.intervals[js] : jl >= 0 ? boot.intervals[ps + k * pl + jl] : null;
      return iv ? { ...row, bootstrap: iv } : row;
    });
    results[g] = { ...r, parameters, bootstrap: boot.summary, warnings: [...r.warnings, ...boot.warnings] };
  });
  const estimates = run.joint.estimates.map((e) => {
    const iv = boot.intervals[sharedNames.indexOf(e.name)];
    return iv ? { ...e, bootstrap: iv } : e;
  });
  return { run: { ...run, results, joint: { ...run.joint, estimates } }, bootstrap: boot };
}
