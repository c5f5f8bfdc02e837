/** Model templates and spec scaffolding (shared by the CLI's `new` command and the editor). */
export type { Template, TemplateParameter, StartValues, DataRequirement } from './types';
export { TEMPLATES, MAX_POLY_DEGREE, DEFAULT_POLY_DEGREE, GAS_CONSTANT, findTemplate, polynomial, templateIds } from './library';
export { logistic4Start, expOffsetStart, expStart, michaelisMentenStart, gaussianStart, powerStart, reciprocalExpStart, type FamilyStart } from './families';
export { scaffoldSpec, columnRef, identifierFrom, type ScaffoldInput, type ScaffoldResult } from './scaffold';
export { cleanPairs, meansByX, lineFit, crossing, median, type XY } from './heuristics';
