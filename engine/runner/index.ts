/**
 * The plan runner: executes a checked plan into a RunResult (data sets, every
 * fit — single or per group — then queries, derived quantities and
 * expectations), in this thread or as a worker job.
 */
export { runPlan, runPlanSync, type RunIteration, type RunOptions, type RunProgress } from './run-plan';
