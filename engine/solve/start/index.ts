/**
 * Starting values and the multi-start search, next to the solvers they feed:
 * data-driven starts (guess.ts: template shapes, rational models, the general
 * separable grid), and the global phase (explore.ts).
 */
export type { StartInput, StartGuess, StartModel, StartParameter, StartStructure } from './types';
export { guessStart, thinned, MAX_START_ROWS } from './guess';
export { candidates } from './grid';
export { linearSet, SeparableSolver } from './separable';
export { recogniseShape } from './recognise';
export { explore, defaultPoints, type ExploreInput, type ExploreOutcome } from './explore';
export { sobolPoints, SOBOL_MAX_DIMENSION } from './sobol';
export { searchBox, boxValue, BOX_FACTOR, type BoxSide } from './box';
export { sameMinimum, isLower, SAME_SSR_RTOL, LOWER_RTOL, SSR_FLOOR, type Minimum } from './minima';
export { checkMark, CHECK_POINTS, CHECK_REFINE } from './check';
