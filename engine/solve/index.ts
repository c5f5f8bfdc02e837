/** The solvers' public surface (for the plan runner). */
export type { LeastSquaresProblem, CancelToken } from './problem';
export type { SolveOptions, SolveOutcome } from './types';
export { DEFAULT_TOLERANCE } from './types';
export { levenbergMarquardt } from './lm';
export { solveLinear, type LinearOptions } from './linear';
export { gradientDescent, type DescentOptions } from './descent';
export { robustFit, robustCost, rho, rhoPrime, type RobustOptions } from './loss';
export { modelProblem, type ModelProblemInput } from './model-problem';
