/**
 * Typed syntax tree of a `.lsq` spec, as written (names not yet resolved).
 *
 * Every node carries the `Range` of the text it came from. After a syntax
 * error the parser recovers; pieces it could not read become `error` nodes
 * (expressions, values) or are left `undefined` (optional parts), so the
 * checker can still look at the rest without reporting the same problem twice.
 */
import type { BinaryOp, ChainOp, CompareOp, LogicOp, Range } from './plan';

/** A name as written: identifier, or `"quoted column name"` when `quoted`. */
export interface NameAst {
  name: string;
  quoted: boolean;
  range: Range;
}

export interface StringAst {
  /** Text between the quotes. */
  value: string;
  range: Range;
}

export interface UnitAst {
  /** Unit text without the brackets, e.g. `mg/L`. */
  text: string;
  range: Range;
}

/** A single number as written in a statement: literal, constant name or `inf`, with optional sign. */
export type ValueAst =
  | { kind: 'number'; value: number; range: Range }
  | { kind: 'inf'; negative: boolean; range: Range }
  | { kind: 'name'; name: string; negative: boolean; range: Range }
  | { kind: 'error'; range: Range };

export type ExprAst =
  | { kind: 'number'; value: number; range: Range }
  | { kind: 'name'; name: string; quoted: boolean; range: Range }
  | { kind: 'call'; fn: string; fnRange: Range; args: ExprAst[]; range: Range }
  /** `head.member[.member…]`, e.g. `cal.slope`: a fit's result (allowed only in `derive`). */
  | { kind: 'dotted'; head: NameAst; members: NameAst[]; range: Range }
  | { kind: 'unary'; op: '-' | '+'; arg: ExprAst; range: Range }
  | { kind: 'binary'; op: BinaryOp; left: ExprAst; right: ExprAst; range: Range }
  | { kind: 'compare'; op: CompareOp; left: ExprAst; right: ExprAst; range: Range }
  | { kind: 'logic'; op: LogicOp; left: ExprAst; right: ExprAst; range: Range }
  | { kind: 'not'; arg: ExprAst; range: Range }
  /** Three or more operands joined left to right by operators of one precedence level (see plan.ts `chain`). */
  | { kind: 'chain'; ops: ChainOp[]; args: ExprAst[]; range: Range }
  | { kind: 'error'; range: Range };

export type DataOptionAst =
  | { kind: 'where'; condition: ExprAst; range: Range }
  | { kind: 'delimiter'; value: StringAst | undefined; range: Range }
  | { kind: 'decimal'; value: StringAst | undefined; range: Range }
  /** `units COLUMN [UNIT], ...`: the unit of each listed column (a missing part is undefined after a syntax error). */
  | { kind: 'units'; entries: ColumnUnitAst[]; range: Range };

export interface ColumnUnitAst {
  column: NameAst | undefined;
  unit: UnitAst | undefined;
  range: Range;
}

export interface DataAst {
  kind: 'data';
  name: NameAst | undefined;
  path: StringAst | undefined;
  options: DataOptionAst[];
  range: Range;
}

export interface ConstAst {
  kind: 'const';
  name: NameAst | undefined;
  value: ValueAst;
  unit?: UnitAst;
  range: Range;
}

export interface BoundsAst {
  low: ValueAst;
  high: ValueAst;
  range: Range;
}

export interface ParamAst {
  kind: 'param';
  name: NameAst | undefined;
  initial?: ValueAst;
  bounds?: BoundsAst;
  /** Range of the `fixed` keyword when present. */
  fixed?: Range;
  /** Range of the `shared` keyword when present (one value for all groups of a `per` fit). */
  shared?: Range;
  unit?: UnitAst;
  /** Parts given more than once (`= 1 = 2`, two units...), reported by the checker. */
  repeated: Range[];
  range: Range;
}

export type NumericOptionKind = 'level' | 'iterations' | 'tolerance' | 'rate' | 'explore';

export interface NumericOptionAst {
  kind: NumericOptionKind;
  value: ValueAst;
  range: Range;
}

export type FitItemAst =
  | { kind: 'model'; response: ExprAst; model: ExprAst; range: Range }
  | ParamAst
  | { kind: 'sigma' | 'weight'; expr: ExprAst; range: Range }
  | { kind: 'method'; value: NameAst | undefined; range: Range }
  | { kind: 'profile'; value: NameAst | undefined; range: Range }
  | { kind: 'loss'; value: NameAst | undefined; scale?: ValueAst; range: Range }
  | NumericOptionAst
  | { kind: 'per'; column: NameAst | undefined; range: Range }
  | { kind: 'bootstrap'; replicates: ValueAst; resample: NameAst | undefined; seed?: ValueAst; range: Range };

export interface FitAst {
  kind: 'fit';
  name: NameAst | undefined;
  data: NameAst | undefined;
  /** `fit NAME on A, B, C`: the tables after the first (`data` is the first); absent for one table. */
  moreData?: NameAst[];
  items: FitItemAst[];
  range: Range;
}

/** `derive NAME = EXPRESSION [UNIT]`: a number computed from fit results. */
export interface DeriveAst {
  kind: 'derive';
  name: NameAst | undefined;
  expr: ExprAst;
  unit?: UnitAst;
  /** The expression as written, whitespace collapsed (for reports). */
  text: string;
  range: Range;
}

export interface PredictAst {
  kind: 'predict' | 'invert';
  fit: NameAst | undefined;
  /** Predictor column (`predict`) or response column (`invert`). */
  column: NameAst | undefined;
  values: ValueAst[];
  /** Options after the values (`readings M`, `sigma S, ...`, `weight W, ...`), in order written. */
  options: QueryOptionAst[];
  range: Range;
}

/** `readings M`, `sigma S1, S2, ...` or `weight W1, W2, ...` after a query's values (or after `at` in `expect`). */
export interface QueryOptionAst {
  kind: 'readings' | 'sigma' | 'weight';
  values: ValueAst[];
  range: Range;
}

/** `backcalc FIT`: the fit's standards read back through its curve. */
export interface BackcalcAst {
  kind: 'backcalc';
  fit: NameAst | undefined;
  range: Range;
}

export interface CompareAst {
  kind: 'compare';
  fits: NameAst[];
  /** `compare a within b`: the spec declares a nested in b. */
  within?: Range;
  range: Range;
}

export type ExpectBoundAst =
  | { kind: 'within'; low: ValueAst; high: ValueAst; range: Range }
  | { kind: 'above' | 'below'; value: ValueAst; range: Range };

export interface ExpectAst {
  kind: 'expect';
  /** The first name: a fit (`fit.PATH`) or a derived quantity (`lod`, `lod.se`). */
  fit: NameAst | undefined;
  /** Names after the first: one (parameter or statistic, or `se` of a derived quantity), two (`param.se`), or none (a derived quantity). */
  path: NameAst[];
  /** `at COLUMN = VALUE [options]`: the query point of a prediction or inversion target. */
  at?: { column: NameAst | undefined; value: ValueAst; options: QueryOptionAst[]; range: Range };
  bound: ExpectBoundAst | undefined;
  /** The statement as written after `expect`, whitespace collapsed (for reports). */
  text: string;
  range: Range;
}

export type StatementAst = DataAst | ConstAst | FitAst | DeriveAst | PredictAst | BackcalcAst | CompareAst | ExpectAst;

export interface SpecAst {
  kind: 'spec';
  statements: StatementAst[];
  range: Range;
}
