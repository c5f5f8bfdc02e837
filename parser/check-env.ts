/**
 * What the checker knows while it walks the statements top to bottom:
 * the declarations seen so far, all declarations in the file (to say
 * "declared further down" instead of "unknown"), and the reporter.
 */
import type { DataSource, Expr, FitPlan } from './plan';
import type { Reporter } from './report';
import type { Suggester } from './suggest';
import { CONSTANT_SPECS, EXPRESSION_CONSTANTS } from './registry/constants';

export interface CheckContext {
  /**
   * Column names of a data source, when the caller can read them (editor, CLI).
   * Returning `undefined` (or omitting the callback) means "unknown": then
   * unresolved identifiers in expressions are taken as columns. `options`
   * are the data statement's `delimiter` and `decimal`, for reading the header
   * as the fit will read the file.
   */
  headers?: (dataName: string, path: string, options: { delimiter?: ',' | ';' | '\t'; decimal?: '.' | ',' }) => string[] | undefined;
  /**
   * The engine's symbolic test "is `expr` linear in `params`" (engine/compile
   * `isLinearInParameters`), passed in by the CLI and the editor so that
   * `method linear` on a nonlinear model is reported before a run. The parser
   * does not depend on the engine; without it that check is left to the
   * engine's guard, which has the same message.
   */
  isLinearIn?: (expr: Expr, params: readonly string[]) => boolean;
  /**
   * The distinct values of column `column` of a data source (the group labels of a `per column` fit), when the
   * caller can read them (CLI: the whole file; editor: files up to its size cap). `undefined` means unknown:
   * then a quoted group label is not checked here (the run still reports `unknown_group`). Values before the
   * data's `where` filter: a label missing from them is certainly no group.
   */
  groupLabels?: (dataName: string, path: string, column: string, options: { delimiter?: ',' | ';' | '\t'; decimal?: '.' | ',' }) => readonly string[] | undefined;
}

export interface ConstInfo {
  value: number;
  line: number;
}

export interface DataInfo {
  plan: DataSource;
  /** Header names, when known. */
  headers: ReadonlySet<string> | undefined;
  line: number;
  used: boolean;
}

export interface FitInfo {
  plan: FitPlan;
  line: number;
  /** Declared parameter names. */
  params: string[];
  /** Columns read by the model side (right of `=`), in order of appearance. */
  modelColumns: string[];
  /** Columns read by the response side (left of `=`). */
  responseColumns: string[];
  /** Names of the model side / response side reported as unknown (`ExprUse.unresolved`): a query is not checked against them. */
  unresolved: { model: string[]; response: string[] };
  /** The fit had problems that make predictor checks meaningless (no model, syntax errors in it...). */
  incomplete: boolean;
}

export interface DerivedInfo {
  line: number;
  /** Fits its value reads, directly or through earlier derived quantities. */
  fits: string[];
}

export interface Env {
  r: Reporter;
  /** "Did you mean" lookups of this check (one budget, one memo). */
  suggester: Suggester;
  ctx: CheckContext;
  /** Declarations seen so far (in file order). */
  consts: Map<string, ConstInfo>;
  data: Map<string, DataInfo>;
  fits: Map<string, FitInfo>;
  derived: Map<string, DerivedInfo>;
  /** First declaration line of every name in the whole file, by kind. */
  declared: { const: Map<string, number>; data: Map<string, number>; fit: Map<string, number>; derive: Map<string, number> };
}

/** Built-in constants usable in expressions and values (folded like `const` values): those of registry/constants.ts that are not bounds-only. */
export const BUILTIN_CONSTANTS: Readonly<Record<string, number>> = Object.freeze(Object.fromEntries(
  EXPRESSION_CONSTANTS.map((c) => [c, CONSTANT_SPECS[c].value]),
));
/** The names of `BUILTIN_CONSTANTS` (one list, so suggestion lookups can memoise against it). */
export const BUILTIN_CONSTANT_NAMES: readonly string[] = Object.freeze(Object.keys(BUILTIN_CONSTANTS));
export function isBuiltinConstant(name: string): boolean {
  return Object.prototype.hasOwnProperty.call(BUILTIN_CONSTANTS, name);
}
