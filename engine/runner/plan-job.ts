/**
 * The `runPlan` job of the engine worker: runs a whole plan with the runner
 * (engine/run `runPlan`), passing the shared cancel flag and reporting
 * progress as `done` of `total` fit runs (one per group for group-by fits)
 * and, for fits solved in the worker itself, their accepted iterations.
 */
import type { Plan } from '../../parser/plan';
import type { RunResult } from '../result';
import type { RunIteration } from './run-plan';
import type { CancelToken } from '../solve/problem';
import { runPlan } from './run-plan';
import type { RunPlanJobOptions } from '../groups/protocol';

export function runPlanJob(
  plan: Plan,
  options: RunPlanJobOptions,
  cancel: CancelToken,
  progress: (done: number, total: number) => void,
  iteration?: (info: RunIteration) => void,
): Promise<RunResult> {
  return runPlan(plan, {
    baseDir: options.baseDir,
    specText: options.specText ?? '',
    ...(options.specPath !== undefined ? { specPath: options.specPath } : {}),
    ...(options.fits !== undefined ? { fits: options.fits } : {}),
    cancel,
    onProgress: (p) => progress(p.done, p.total),
    ...(iteration ? { onIteration: iteration } : {}),
  });
}
