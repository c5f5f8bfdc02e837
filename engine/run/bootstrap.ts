/**
 * Bootstrap refits of one fit (Efron & Tibshirani 1993, An Introduction to the
 * Bootstrap, ch. 9 "Regression models", §9.4–9.5; Davison & Hinkley 1997,
 * Bootstrap Methods and Their Application, §6.2–6.3).
 *
 * Replicate b draws one sample and refits the model to it:
 * - `residuals` (x fixed): yᵢ* = ŷᵢ + eᵢ* ÷ √wᵢ, with eᵢ* drawn with replacement
 *   from the weighted residuals eⱼ = √wⱼ·(yⱼ − ŷⱼ) centred on their mean
 *   (E&T §9.5, resampling the standardised errors of a weighted model: a
 *   weighted fit's eⱼ share one variance, its raw residuals do not);
 * - `adjusted`: the same with leverage-adjusted residuals eⱼ/√(1 − hⱼ), centred
 *   (Davison & Hinkley 1997, §6.2.3, Algorithm 6.1: raw residuals have
 *   variance σ²(1 − hⱼ), too small by the leverage; hⱼ from the fit's points,
 *   engine/stats/influence.ts, the tangent-plane leverages of a nonlinear fit);
 *   a row of leverage one (its residual carries no information) is left out of
 *   the pool;
 * - `cases`: n rows drawn with replacement, each with its x, y and weight
 *   (E&T §9.5, "bootstrapping pairs").
 * After the B replicates, a `jackknife` job refits the n leave-one-out samples
 * (indices B … B + n − 1) for the BCa acceleration (E&T §14.3, eq. 14.15).
 *
 * Each refit starts from the estimate θ̂ (Levenberg–Marquardt, or the
 * interior reflective trust region with bounds, under the fit's own iteration
 * limit and tolerance); a model linear in its parameters is solved directly by
 * QR. A refit fails when the solver does not converge, an estimate is not
 * finite, or (linear) the sample does not determine every parameter (rank
 * below p, e.g. a case sample with one distinct x); failures are counted with
 * their reasons, never silently dropped (engine/run/bootstrap-summary.ts).
 *
 * Replicate b's sample comes from its own random stream (bootstrap-rng.ts), a
 * function of (seed, b) only, and every refit starts from θ̂: a replicate's
 * result does not depend on the others, on the chunking or on the thread, so
 * results are bit-identical for any number of threads.
 */
import type { BootstrapResample, FitPlan } from '../../parser/plan';
import type { SolveOutcome, CancelToken } from '../solve';
import { replicateStream } from './bootstrap-rng';
import type { FitData } from './fit-data';
import { refitModel, refitProblem, type RefitModel } from './refit-problem';
import { defaultSolvers } from './solvers';
import { bootstrapText } from '../messages';

/** What a worker needs to compute replicates (structured-clonable). */
export interface BootstrapJob {
  fit: FitPlan;
  data: FitData;
  /** θ̂, the free parameters in declaration order. */
  theta: Float64Array;
  /** ŷ at θ̂ (data units), per row. */
  fitted: Float64Array;
  /** The weighted residuals drawn from (residual resampling; centred; see the module comment); empty for `cases`. */
  pool: Float64Array;
  resample: BootstrapResample;
  seed: number;
  replicates: number;
  /** Also refit the n leave-one-out samples (indices replicates … replicates + n − 1). */
  jackknife: boolean;
  /** The model is linear in its free parameters (solved by QR). */
  linear: boolean;
}

/** Refits of indices [from, to): estimates row by row (NaN for a failed refit) and each failure's reason (null: succeeded). */
export interface BootstrapChunk {
  from: number;
  to: number;
  theta: Float64Array;
  failures: (string | null)[];
}

/** Total refits of a job: the replicates and, with the jackknife, one per row. */
export function jobSize(job: Pick<BootstrapJob, 'replicates' | 'jackknife' | 'data'>): number {
  return job.replicates + (job.jackknife ? job.data.n : 0);
}

/**
 * The residual pool of `residuals` / `adjusted` resampling: eⱼ = √wⱼ(yⱼ − ŷⱼ), adjusted divided by √(1 − hⱼ),
 * rows of leverage one (1 − hⱼ ≤ `oneTolerance`) or non-finite leverage left out of the adjusted pool, then centred.
 */
export function residualPool(data: FitData, fitted: ArrayLike<number>, leverage: ArrayLike<number> | null, adjusted: boolean, oneTolerance: number): Float64Array {
  const out: number[] = [];
  for (let i = 0; i < data.n; i++) {
    const sw = data.weights ? Math.sqrt(data.weights[i]) : 1;
    let e = sw * (data.y[i] - fitted[i]);
    if (adjusted) {
      const h = leverage ? leverage[i] : NaN;
      if (!Number.isFinite(h) || 1 - h <= oneTolerance) continue;
      e /= Math.sqrt(1 - h);
    }
    out.push(e);
  }
  let mean = 0;
  for (const e of out) mean += e;
  mean /= Math.max(1, out.length);
  return Float64Array.from(out, (e) => e - mean);
}

/** Computes refits [from, to) of the job (see the module comment). */
export function runBootstrapRange(job: BootstrapJob, from: number, to: number, cancel?: CancelToken): BootstrapChunk {
  const p = job.theta.length;
  const m = refitModel(job.fit, job.data);
  const count = Math.max(0, to - from);
  const theta = new Float64Array(count * p).fill(NaN);
  const failures: (string | null)[] = [];
  for (let k = 0; k < count; k++) {
    if (cancel?.cancelled) {
      failures.push(bootstrapText.cancelled);
      continue;
    }
    const got = refitOne(job, m, from + k, cancel);
    if (typeof got === 'string') failures.push(got);
    else {
      theta.set(got, k * p);
      failures.push(null);
    }
  }
  return { from, to, theta, failures };
}

function refitOne(job: BootstrapJob, m: RefitModel, index: number, cancel?: CancelToken): Float64Array | string {
  const { data } = job;
  const n = data.n;
  let rows: Int32Array | undefined;
  let response: Float64Array | undefined;
  if (index >= job.replicates) {
    const out = index - job.replicates;
    rows = new Int32Array(n - 1);
    for (let i = 0, k = 0; i < n; i++) if (i !== out) rows[k++] = i;
  } else {
    const rng = replicateStream(job.seed, index);
    if (job.resample === 'cases') {
      rows = new Int32Array(n);
      for (let i = 0; i < n; i++) rows[i] = rng.index(n);
    } else {
      const pool = job.pool;
      if (pool.length === 0) return bootstrapText.noResiduals;
      response = new Float64Array(n);
      for (let i = 0; i < n; i++) {
        const sw = data.weights ? Math.sqrt(data.weights[i]) : 1;
        response[i] = job.fitted[i] + pool[rng.index(pool.length)] / sw;
      }
    }
  }
  const { problem } = refitProblem(m, data, rows, response);
  const p = job.theta.length;
  if (problem.n < p) return bootstrapText.tooFewRows;
  const options = {
    ...(cancel ? { cancel } : {}),
    ...(job.fit.options.maxIterations !== undefined ? { maxIterations: job.fit.options.maxIterations } : {}),
    ...(job.fit.options.tolerance !== undefined ? { reductionTolerance: job.fit.options.tolerance, stepTolerance: job.fit.options.tolerance, gradientTolerance: job.fit.options.tolerance } : {}),
  };
  let out: SolveOutcome;
  if (job.linear) {
    out = defaultSolvers.linear(problem, options);
    if (out.stop.converged && out.rank !== undefined && out.rank < p) return bootstrapText.rankDeficient;
    if (out.stop.converged && out.theta.some((v, j) => v < m.lower[j] || v > m.upper[j])) {
      const clamped = out.theta.map((v, j) => Math.min(m.upper[j], Math.max(m.lower[j], v)));
      out = defaultSolvers.levenbergMarquardt(problem, clamped, options);
    }
  } else {
    out = defaultSolvers.levenbergMarquardt(problem, new Float64Array(job.theta), options);
  }
  if (!out.stop.converged) return bootstrapText.notConverged(out.stop.code);
  if (!out.theta.every(Number.isFinite)) return bootstrapText.notFinite;
  return out.theta;
}

export { refitModel };
