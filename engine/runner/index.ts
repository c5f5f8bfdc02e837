/**
 * The plan runner: executes a checked plan into a RunResult (data sets, every
 * fit — single or per group — then queries, derived quantities and
 * expectations), in this thread or as a worker job.
 */
export { finishRun, runPlan, runPlanSync, type FittedRun, type RunIteration, type RunOptions, type RunProgress } from './run-plan';
export { gatherShards, type GatherOutcome, type ShardFile } from './gather';
