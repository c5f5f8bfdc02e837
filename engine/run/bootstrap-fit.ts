/**
 * The bootstrap of one fit result: whether it runs (`bootstrap N` in the fit's
 * options; a converged single fit with the squared loss and degrees of freedom
 * left), the job of refits (engine/run/bootstrap.ts), and the result with the
 * parameters' bootstrap intervals and the summary added
 * (engine/run/bootstrap-summary.ts). The refits run in this thread
 * (`runBootstrapHere`) or on worker threads (engine/groups/bootstrap-threads.ts);
 * both give bit-identical results.
 */
import type { FitPlan } from '../../parser/plan';
import type { BootstrapSummary, FitResult } from '../result';
import { bootstrapText } from '../messages';
import { leverageOneTolerance } from '../stats/influence';
import type { CancelToken } from '../solve';
import { jobSize, residualPool, runBootstrapRange, type BootstrapChunk, type BootstrapJob } from './bootstrap';
import { BCA_MAX_ROWS, joinChunks, summarizeBootstrap, type BootstrapDraws } from './bootstrap-summary';
import type { FitData } from './fit-data';

export interface PlannedBootstrap {
  job: BootstrapJob;
  /** Why no jackknife (no BCa), or null when the job runs it. */
  bcaNote: string | null;
}

/** The job for a fit result, a summary saying why it is skipped, or null when the fit asks for no bootstrap. */
export function planBootstrap(fit: FitPlan, data: FitData, result: FitResult): PlannedBootstrap | { skipped: BootstrapSummary } | null {
  const asked = fit.options.bootstrap;
  if (!asked) return null;
  const skip = (note: string) => ({
    skipped: { status: 'skipped', note, resample: asked.resample, replicates: asked.replicates, seed: asked.seed, level: result.level, failed: 0, failures: [], bca: false, bcaNote: '', jackknife: 0, jackknifeFailed: 0 } satisfies BootstrapSummary,
  });
  if (data.group !== undefined) return skip(bootstrapText.group);
  if (!result.stop.converged) return skip(bootstrapText.notConverged2);
  if (fit.options.loss !== 'squared') return skip(bootstrapText.robust);
  if (!(result.goodness.dof > 0)) return skip(bootstrapText.noDof);
  const theta = Float64Array.from(result.parameters.filter((q) => !q.fixed), (q) => q.estimate);
  const fitted = Float64Array.from(result.points.fitted);
  const pool = asked.resample === 'cases' ? new Float64Array(0) : residualPool(data, fitted, result.points.leverage, asked.resample === 'adjusted', leverageOneTolerance(data.n));
  const jackknife = data.n <= BCA_MAX_ROWS;
  return {
    job: { fit, data, theta, fitted, pool, resample: asked.resample, seed: asked.seed, replicates: asked.replicates, jackknife, linear: result.method === 'linear' },
    bcaNote: jackknife ? null : bootstrapText.bcaTooMany(data.n, BCA_MAX_ROWS),
  };
}

/** All refits of the job in this thread. */
export function runBootstrapHere(job: BootstrapJob, cancel?: CancelToken): BootstrapChunk[] {
  return [runBootstrapRange(job, 0, jobSize(job), cancel)];
}

/** The fit result with its bootstrap: the summary, each free parameter's intervals (unless withheld) and any warning. */
export function withBootstrap(result: FitResult, planned: PlannedBootstrap, chunks: readonly BootstrapChunk[]): { result: FitResult; draws: BootstrapDraws } {
  const draws = joinChunks(planned.job, chunks);
  const s = summarizeBootstrap(planned.job, draws, result.level, planned.bcaNote);
  let j = 0;
  const parameters = result.parameters.map((row) => {
    if (row.fixed) return row;
    const iv = s.intervals[j++];
    return iv ? { ...row, bootstrap: iv } : row;
  });
  return { result: { ...result, parameters, bootstrap: s.summary, warnings: [...result.warnings, ...s.warnings] }, draws };
}
