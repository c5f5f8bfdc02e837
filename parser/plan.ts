/**
 * The fitting plan: what a checked `.lsq` spec means, as plain JSON-ready data.
 *
 * The plan is the contract between the parser (which produces it) and the
 * engine (which executes it). It holds no functions, classes or cycles, so it
 * can be written with `JSON.stringify`, validated by `plan.schema.json` and
 * produced or read by other languages. Bump PLAN_VERSION on any breaking change.
 *
 * Shape decisions made for later features:
 * - a fit has `blocks` (one per dataset); a global fit over several datasets
 *   adds blocks and marks parameters `scope: "perBlock"`;
 * - a fit may carry `groupBy` (one fit per value of a column);
 * - constants, parameters and columns may carry a `unit` string for a later
 *   dimensional-consistency check.
 */

import type { MemberOf, QueryMemberName } from './registry/statistics';
import type { FunctionName } from './registry/functions';
import type { Method } from './registry/methods';
import type { LossKind } from './registry/losses';
import type { StatisticName } from './registry/statistics';
import type { BootstrapResample, ProfileMode } from './registry/options';

export const PLAN_VERSION = 1 as const;

/** 1-based line and column, as shown to users (`file:line:col`). */
export interface Position {
  line: number;
  column: number;
  /** 0-based character offset into the spec text. */
  offset: number;
}

/** Half-open source range `[start, end)` in the spec text. */
export interface Range {
  start: Position;
  end: Position;
}

export type BinaryOp = '+' | '-' | '*' | '/' | '^';
export type CompareOp = '<' | '<=' | '>' | '>=' | '==' | '!=';
export type LogicOp = 'and' | 'or';
/** Operators that chain left to right at one precedence level (`chain` expressions). */
export type ChainOp = '+' | '-' | '*' | '/' | LogicOp;

/** Whitelisted functions (registry/functions.ts); the engine knows exactly these. */
export { FUNCTIONS, isFunctionName, type FunctionName } from './registry/functions';

/**
 * Expression tree. Names are already resolved: a `column` reads a data
 * column, a `param` a fitted parameter; constants (`const` statements, `pi`,
 * `e`) are folded into `number` nodes by the checker.
 *
 * `result` and `derived` nodes occur only in derived quantities
 * (`DerivedPlan.expr`), never in fits or filters: `result` reads a number
 * from a fit's results after fitting (`cal.slope` is the estimate of
 * parameter `slope` of fit `cal`, `cal.rmse` a statistic), `derived` the
 * value of a derived quantity declared above.
 */
export type Expr =
  | { kind: 'number'; value: number; range?: Range }
  | { kind: 'column'; name: string; range?: Range }
  /**
   * A text value, only as one operand of `==`/`!=` whose other operand is a
   * column, in a data source's `where` condition (`compound == "CPD-A"`): true
   * where the column's cell reads exactly this text. The engine turns each such
   * comparison into a 0/1 column before compiling the filter
   * (engine/data/text-match.ts). Additive: plans keep version 1.
   */
  | { kind: 'text'; value: string; range?: Range }
  | { kind: 'param'; name: string; range?: Range }
  | { kind: 'result'; fit: string; of: 'estimate'; name: string; range?: Range; group?: string }
  | { kind: 'result'; fit: string; of: 'statistic'; name: StatisticName; range?: Range; group?: string }
  /** `FIT.PARAM.se` in derive: the parameter's standard error, taken as a fixed number like a statistic (additive). */
  | { kind: 'result'; fit: string; of: 'stderr'; name: string; range?: Range; group?: string }
  /* `group` (additive): FIT."GROUP".NAME in derive - the number of that one group of a per-group fit, not of the row's group. */
  | { kind: 'derived'; name: string; range?: Range }
  | { kind: 'negate'; arg: Expr; range?: Range }
  | { kind: 'binary'; op: BinaryOp; left: Expr; right: Expr; range?: Range }
  | { kind: 'call'; fn: FunctionName; args: Expr[]; range?: Range }
  | { kind: 'compare'; op: CompareOp; left: Expr; right: Expr; range?: Range }
  | { kind: 'logic'; op: LogicOp; left: Expr; right: Expr; range?: Range }
  | { kind: 'not'; arg: Expr; range?: Range }
  /**
   * Three or more operands joined left to right by operators of one
   * precedence level (`+ -`, `* /`, `and` or `or`), as written:
   * `args[0] ops[0] args[1] ops[1] args[2] …` means
   * `((args[0] ops[0] args[1]) ops[1] args[2]) …`, exactly the nested
   * `binary` (or `logic`) nodes it stands for, in the same order. Flat so
   * that a long sum keeps the plan shallow: JSON.stringify and structured
   * cloning recurse. `ops.length === args.length - 1`. Additive (as the
   * `result` and `derived` nodes before it): plans keep version 1.
   */
  | { kind: 'chain'; ops: ChainOp[]; args: Expr[]; range?: Range };

export interface DataSource {
  name: string;
  /** Path as written in the spec, relative to the spec file's folder. */
  path: string;
  /** Keep only rows where this condition holds (over columns of this source). */
  filter?: Expr;
  /** Field delimiter; detected from the header line when absent. */
  delimiter?: ',' | ';' | '\t';
  /** Decimal mark of numeric cells. Default `.`. */
  decimal?: '.' | ',';
  /**
   * `units COLUMN [UNIT], ...`: the unit of each listed column, without brackets (`conc` → `ng/mL`), for labels
   * (axis titles, query tables, response-scale statistics). Additive, optional: absent when none is declared.
   */
  units?: Record<string, string>;
  range: Range;
}

export interface ConstantPlan {
  name: string;
  value: number;
  unit?: string;
  range: Range;
}

export interface ParameterPlan {
  name: string;
  /** Starting value; absent means the engine guesses one. */
  initial?: number;
  /**
   * Lower bound; absent = unbounded below. Always finite: JSON has no
   * Infinity, so the checker omits infinite bounds (`in [-inf, 5]` gives no
   * `lower`, `in [0, inf]` gives `lower: 0` and no `upper`).
   */
  lower?: number;
  /** Upper bound; absent = unbounded above. Always finite (see `lower`). */
  upper?: number;
  /** Held at `initial` during the fit. */
  fixed: boolean;
  unit?: string;
  /**
   * `shared` across all blocks of the fit; `perBlock`: one value per block, in a fit over several tables
   * (`fit NAME on A, B, …`, one block per table) for a parameter not marked `shared`. With one block always `shared`.
   */
  scope: 'shared' | 'perBlock';
  /**
   * In a fit with `groupBy`: `shared` (the spec's `shared`) gives the parameter one
   * value for every group, fitted jointly with the per-group parameters of all
   * groups as one least-squares problem (engine/run/joint.ts). Absent: a value per
   * group. Additive: plans keep version 1.
   */
  acrossGroups?: 'shared';
  range: Range;
}

export { METHODS, type Method } from './registry/methods';
export { LOSSES, type LossKind } from './registry/losses';
export { MAX_EXPLORE, PROFILE_MODES, type ProfileMode } from './registry/options';
export { BOOTSTRAP_RESAMPLES, type BootstrapResample } from './registry/options';
export { STATISTICS, type StatisticName } from './registry/statistics';

export interface FitOptions {
  /** Solver choice. Default `auto`: linear QR when the model is linear in its parameters, else Levenberg–Marquardt. */
  method: Method;
  /** Loss applied to the (weighted) residuals. Default `squared`. */
  loss: LossKind;
  /**
   * Loss scale c (residual size where a robust loss starts to down-weight), in
   * units of the (weighted) residual, as the spec gives it. Absent: from the
   * data, the loss's tuning constant times the robust spread of the residuals
   * (engine/solve/loss.ts), reported in the result's `robust.scale`.
   */
  lossScale?: number;
  /** Confidence level of intervals and bands, in (0, 1). Default 0.95. */
  level: number;
  /** Iteration limit of iterative solvers. Default 1000 (LM), 100000 (gradient descent). */
  maxIterations?: number;
  /** Relative tolerance for the iterative stopping tests. Default 1e-10. */
  tolerance?: number;
  /** Gradient descent learning rate (after feature scaling). Default: chosen by the solver. */
  learningRate?: number;
  /**
   * Multi-start search (`explore N`): N low-discrepancy starting points over
   * the nonlinear parameters, the best few refined (engine/solve/start/explore.ts).
   * 0 switches the search off. Default (absent): a search with 32 points per
   * nonlinear parameter (32–256) when a nonlinear parameter has no start value
   * and the fit is not per group; none otherwise.
   */
  explore?: number;
  /**
   * Profile-likelihood intervals of the parameters (`profile auto | always | never`; engine/run/profile-fit.ts).
   * Default (absent) `auto`: for a single nonlinear fit with the squared loss and n·p within the work bound;
   * `always`: also per group, beyond the bound and for linear models; `never`: not computed.
   */
  profile?: ProfileMode;
  /**
   * Bootstrap intervals (`bootstrap N [residuals | adjusted | cases] [seed S]`; engine/run/bootstrap.ts).
   * Default (absent): none. `resample` default `residuals`, `seed` default DEFAULT_BOOTSTRAP_SEED.
   */
  bootstrap?: BootstrapOptions;
}

/** What `bootstrap` asks for (parser/registry/options.ts). */
export interface BootstrapOptions {
  replicates: number;
  resample: BootstrapResample;
  seed: number;
}

/** One dataset's share of a fit: `response = model` over the rows of `data`. */
export interface FitBlock {
  data: string;
  response: Expr;
  model: Expr;
  /** Per-point absolute standard deviation σᵢ (weights 1/σᵢ², χ² statistics). */
  sigma?: Expr;
  /** Relative weight per point (scale of the residual variance still estimated). */
  weight?: Expr;
  /** Every column name this block reads (response, model, sigma, weight). */
  columns: string[];
  /** The single column the model varies with, when there is exactly one (for bands, prediction, inversion). */
  predictor?: string;
  range: Range;
}

export interface FitPlan {
  name: string;
  blocks: FitBlock[];
  parameters: ParameterPlan[];
  options: FitOptions;
  /** Fit once per distinct value of this column. */
  groupBy?: string;
  range: Range;
}

/**
 * The spread of the new observation a query is about, as the spec states it
 * (`sigma S, ...` or `weight W, ...` after the values): one value for every
 * query value, or one per value in order. Absent: read from the fit's own
 * sigma or weight expression at the query point, which the checker allows
 * only when that expression reads no column but the predictor.
 */
export interface NewObservation {
  kind: 'sigma' | 'weight';
  values: number[];
}

export type Query =
  | { kind: 'predict'; fit: string; variable: string; values: number[]; observation?: NewObservation; range: Range }
  /** `readings`: the response values are means of this many replicate readings (default 1). */
  | { kind: 'invert'; fit: string; response: string; values: number[]; readings?: number; observation?: NewObservation; range: Range }
  /** `backcalc FIT`: every fitted point's predictor read back from its response (engine/run/queries.ts). */
  | { kind: 'backcalc'; fit: string; range: Range }
  /** `within`: the spec declares the first fit nested in the second (`compare a within b`; additive, optional). */
  | { kind: 'compare'; fits: string[]; within?: boolean; range: Range };

export type ExpectTarget =
  /** `group` (additive): `expect FIT."GROUP".NAME ...` checks that one group of a per-group fit only. */
  | { kind: 'parameter'; fit: string; name: string; of: MemberOf; group?: string }
  | { kind: 'statistic'; fit: string; name: StatisticName; group?: string }
  /** A derived quantity (`expect lod below 0.1`) or its standard error (`expect lod.se below 0.01`). */
  | { kind: 'derived'; name: string; of: MemberOf }
  /**
   * A number of a query at one point (`expect cal.prediction.lower at conc = 5 above 0.2`): `member` of
   * parser/registry/statistics.ts QUERY_MEMBER_SPECS, `query` the statement it is a number of, `column`
   * and `value` the point, `readings` and `observation` as in that query.
   */
  | { kind: 'query'; fit: string; query: 'predict' | 'invert'; member: QueryMemberName; column: string; value: number; readings?: number; observation?: NewObservation };

export type Bound =
  | { kind: 'within'; low: number; high: number }
  | { kind: 'above'; value: number }
  | { kind: 'below'; value: number };

export interface Expectation {
  target: ExpectTarget;
  bound: Bound;
  /** The expectation as written, for reports. */
  text: string;
  range: Range;
}

/**
 * `derive NAME = EXPRESSION [UNIT]`: a number computed from fit results
 * after fitting, with a standard error by the delta method (engine/run/derived.ts).
 */
export interface DerivedPlan {
  name: string;
  /** Numbers, functions, `result` and `derived` nodes only (no `column`, no `param`). */
  expr: Expr;
  /** The expression as written, whitespace collapsed (for reports). */
  text: string;
  unit?: string;
  /** Fits the value reads, directly or through earlier derived quantities, in order of first use. */
  fits: string[];
  range: Range;
}

export interface Plan {
  version: typeof PLAN_VERSION;
  data: DataSource[];
  constants: ConstantPlan[];
  fits: FitPlan[];
  /**
   * Derived quantities in declaration order (each reads only fits and derived
   * quantities above it). Additive: absent in plans written before derived
   * quantities existed, which readers treat as none. The checker always writes it.
   */
  derived?: DerivedPlan[];
  queries: Query[];
  expectations: Expectation[];
}

export type Severity = 'error' | 'warning' | 'info';

/** A located problem; `code` is stable (tests and quick fixes key on it). */
export interface Diagnostic {
  severity: Severity;
  code: string;
  message: string;
  range: Range;
  /** Replacement names for quick fixes ("did you mean"). */
  suggestions?: string[];
}
