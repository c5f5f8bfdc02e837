/** One fit and what reads its results: data preparation, the fit itself, queries, derived quantities, expectations, JSON. */
export { runFit, type RunFitOptions } from './fit';
export { prepareFitData, sortGroupLabels, type FitData, type FitDataResult, type ColumnCompiler } from './fit-data';
export { runQueries, type QueryContext } from './queries';
export { checkExpectations, statisticValue, boundHolds, expectationApplies } from './expectations';
export { runDerived } from './derived';
export { resultToJson, resultToJsonValue } from './json';
export { loadSources, type LoadedSources } from './datasets';
export { defaultSolvers, type Solvers } from './solvers';
export { curveFromResult, buildCurve, freeModel } from './curve';
export { TOOL_NAME, TOOL_VERSION } from './version';
