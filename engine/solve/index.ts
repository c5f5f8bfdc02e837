/** The solvers' public surface (for the plan runner). */
export type { LeastSquaresProblem, CancelToken } from './problem';
export type { SolveOptions, SolveOutcome, NonFiniteReport, BoundsMethod } from './types';
export { DEFAULT_TOLERANCE } from './types';
export { levenbergMarquardt } from './lm';
export { reflectiveTrustRegion } from './reflective';
export { solveNonlinear, boundsMethodFor } from './nonlinear';
export { nonFiniteDetail } from './messages';
export type { SolverTrace, SolverRecord } from './trace';
export { solveLinear, type LinearOptions } from './linear';
export { gradientDescent, type DescentOptions } from './descent';
export { robustFit, robustCost, rho, rhoPrime, type RobustOptions } from './loss';
export { modelProblem, type ModelProblemInput } from './model-problem';
