/**
 * Public engine API: run a checked plan into a RunResult, plus the data and
 * statistics helpers that editors and views reuse.
 */
export { runPlan, runPlanSync } from './runner';
export type { RunOptions, RunProgress } from './runner';
export { runFit, prepareFitData, runQueries, checkExpectations, resultToJson, resultToJsonValue, curveFromResult, TOOL_NAME, TOOL_VERSION } from './run';
export type { RunFitOptions, FitData, Solvers } from './run';
export { parseCsvText, loadDataFile, readHeaderFile, readHeaderText, headerLookup, selectRows, detectDelimiter, sha256Hex } from './data';
export type { CsvOptions, CsvResult, DataTable, DataColumn, DataError, HeaderInfo, FileReader } from './data';
export { guessStart } from './solve/start';
export { warningText, errorText } from './messages';
export { THRESHOLDS } from './thresholds';
export * from './result';
