/**
 * What the compiler does with each built-in function of the language
 * (parser/registry/functions.ts holds the names, arities and docs): how it is
 * lowered into the expression graph, its double-precision value (constant
 * folding and generated code), how the double-double generator evaluates it,
 * and its derivative rule. `FUNCTION_RULES` is keyed by `FunctionName`, so a
 * function added to the registry without its rules here does not compile;
 * lower.ts, graph.ts, derive.ts, emit.ts, codegen.ts and codegen-dd.ts all
 * read this one table.
 *
 * Derivative rules return f′ as graph nodes built with the simplifying
 * constructors of graph.ts; derive.ts multiplies a unary f′(a) by the inner
 * derivative a′ with the strong-zero product `mulz` (a′ first), so a zero
 * inner derivative gives 0 even where f′ is infinite (the limit rules
 * documented in derive.ts). Binary rules receive a′ and b′ and build the
 * whole derivative, each product with `mulz` and the inner derivative first.
 */
import type { FunctionName } from '../../parser/registry/functions';
import type { Graph } from './graph';
import { erf, erfc } from './special';

const TWO_OVER_SQRT_PI = 1.1283791670955126;

/**
 * How the double-double generator (codegen-dd.ts) evaluates a unary function:
 * `dd_sqrt` in double-double (about 32 digits), `dd_abs` exactly (the sign of
 * the high part flips both parts), `double` in double on hi + lo (double
 * accuracy only). Binary functions are evaluated in double.
 */
export type DdMode = 'dd_sqrt' | 'dd_abs' | 'double';

export interface UnaryRule {
  readonly kind: 'unary';
  /** Double-precision value. */
  readonly value: (x: number) => number;
  /** f′(a) as graph nodes, where `self` is the node f(a). */
  readonly derivative: (g: Graph, self: number, a: number) => number;
  readonly dd: DdMode;
}

export interface BinaryRule {
  readonly kind: 'binary';
  readonly value: (x: number, y: number) => number;
  /** The derivative of f(a, b) from the arguments' derivatives da, db, where `self` is the node f(a, b). */
  readonly derivative: (g: Graph, self: number, a: number, b: number, da: number, db: number) => number;
}

/** `pow(a, b)` is the graph's power node, as `a ^ b` (its derivative: derive.ts `power`, its code: codegen*.ts). */
export interface PowerRule { readonly kind: 'power' }
/** `when(c, a, b)` is the graph's choice node (derivative `when(c, a′, b′)`). */
export interface WhenRule { readonly kind: 'when' }

export type FunctionRule = UnaryRule | BinaryRule | PowerRule | WhenRule;

const unary = (value: (x: number) => number, derivative: UnaryRule['derivative'], dd: DdMode = 'double'): UnaryRule =>
  ({ kind: 'unary', value, derivative, dd });
const binary = (value: (x: number, y: number) => number, derivative: BinaryRule['derivative']): BinaryRule =>
  ({ kind: 'binary', value, derivative });

/** 1/√(1 − a²), shared by asin and acos. */
const inverseSine = (g: Graph, a: number) => { const one = g.constant(1); return g.div(one, g.fn1('sqrt', g.sub(one, g.mul(a, a)))); };

export const FUNCTION_RULES = {
  exp: unary(Math.exp, (_g, self): number => self),
  ln: unary(Math.log, (g, _self, a): number => g.div(g.constant(1), a)),
  log10: unary(Math.log10, (g, _self, a): number => g.div(g.constant(1), g.mul(g.constant(Math.LN10), a))),
  sqrt: unary(Math.sqrt, (g, self): number => g.div(g.constant(0.5), self), 'dd_sqrt'),
  abs: unary(Math.abs, (g, _self, a): number => g.fn1('sign', a), 'dd_abs'),
  sin: unary(Math.sin, (g, _self, a): number => g.fn1('cos', a)),
  cos: unary(Math.cos, (g, _self, a): number => g.neg(g.fn1('sin', a))),
  tan: unary(Math.tan, (g, self): number => g.add(g.constant(1), g.mul(self, self))),
  asin: unary(Math.asin, (g, _self, a): number => inverseSine(g, a)),
  acos: unary(Math.acos, (g, _self, a): number => g.neg(inverseSine(g, a))),
  atan: unary(Math.atan, (g, _self, a): number => { const one = g.constant(1); return g.div(one, g.add(one, g.mul(a, a))); }),
  // atan2(y, x): (x·y′ − y·x′)/(x² + y²)
  atan2: binary(Math.atan2, (g, _self, a, b, da, db): number => {
    const den = g.add(g.mul(a, a), g.mul(b, b));
    return g.div(g.sub(g.mulz(da, b), g.mulz(db, a)), den);
  }),
  sinh: unary(Math.sinh, (g, _self, a): number => g.fn1('cosh', a)),
  cosh: unary(Math.cosh, (g, _self, a): number => g.fn1('sinh', a)),
  tanh: unary(Math.tanh, (g, self): number => g.sub(g.constant(1), g.mul(self, self))),
  erf: unary(erf, (g, _self, a): number => g.mul(g.constant(TWO_OVER_SQRT_PI), g.fn1('exp', g.neg(g.mul(a, a))))),
  erfc: unary(erfc, (g, _self, a): number => g.mul(g.constant(-TWO_OVER_SQRT_PI), g.fn1('exp', g.neg(g.mul(a, a))))),
  // the derivative of the selected argument (either one at a tie)
  min: binary(Math.min, (g, _self, a, b, da, db): number => g.when(g.compare('<=', a, b), da, db)),
  max: binary(Math.max, (g, _self, a, b, da, db): number => g.when(g.compare('>=', a, b), da, db)),
  pow: { kind: 'power' },
  // (a·a′ + b·b′)/hypot(a, b)
  hypot: binary(Math.hypot, (g, self, a, b, da, db): number => g.div(g.add(g.mulz(da, a), g.mulz(db, b)), self)),
  when: { kind: 'when' },
} as const satisfies Record<FunctionName, FunctionRule>;

/**
 * Functions the compiler builds itself but a spec cannot call: `sign`, the
 * derivative of `abs` (its own derivative is 0 almost everywhere).
 */
export const INTERNAL_RULES = {
  sign: unary(Math.sign, (g): number => g.constant(0)),
} as const;

type NamesOfKind<K extends FunctionRule['kind']> = {
  [F in FunctionName]: (typeof FUNCTION_RULES)[F] extends { kind: K } ? F : never;
}[FunctionName];

/** Functions of one argument in the graph (`fn1` nodes). */
export type UnaryFn = NamesOfKind<'unary'> | keyof typeof INTERNAL_RULES;
/** Functions of two arguments in the graph (`fn2` nodes). */
export type BinaryFn = NamesOfKind<'binary'>;

const entries = Object.entries(FUNCTION_RULES) as [FunctionName, FunctionRule][];

export const UNARY_RULES: Readonly<Record<UnaryFn, UnaryRule>> = Object.freeze({
  ...Object.fromEntries(entries.filter(([, r]) => r.kind === 'unary')),
  ...INTERNAL_RULES,
}) as Record<UnaryFn, UnaryRule>;

export const BINARY_RULES: Readonly<Record<BinaryFn, BinaryRule>> = Object.freeze(
  Object.fromEntries(entries.filter(([, r]) => r.kind === 'binary')),
) as Record<BinaryFn, BinaryRule>;
