/**
 * The built-in functions of the `.lsq` language: the one list of their names,
 * with everything the parser side knows about each (arity, call shape, one-line
 * documentation, category, spellings of other notations that point to it).
 *
 * Everything else is derived from here or checked against it: the plan's
 * `FunctionName` type and arity table, hover and completion texts, the
 * function table of LANGUAGE.md (generated), the plan schema's `fn` enum and
 * the TextMate grammar's function list (test/registry/ parity tests). The
 * engine supplies each function's behaviour (double and double-double
 * evaluation, derivative rule) keyed by the same names in
 * engine/compile/functions.ts, a `Record<FunctionName, …>`: a function added
 * here without its behaviour there does not compile.
 */

export type FunctionCategory = 'exponential' | 'power' | 'trigonometric' | 'hyperbolic' | 'special' | 'piecewise';

export interface FunctionSpec {
  /** Number of arguments. */
  readonly arity: number;
  /** Call shape as written in a spec. */
  readonly signature: string;
  /** One line: what it computes, domain notes. */
  readonly doc: string;
  readonly category: FunctionCategory;
  /** Names of other notations that mean this function (`log`, `arcsin`): offered as "did you mean" when written. */
  readonly hints?: readonly string[];
}

export const FUNCTION_SPECS = {
  exp: { arity: 1, signature: 'exp(x)', doc: 'e raised to the power x.', category: 'exponential' },
  ln: { arity: 1, signature: 'ln(x)', doc: 'Natural logarithm; x must be > 0.', category: 'exponential', hints: ['log'] },
  log10: { arity: 1, signature: 'log10(x)', doc: 'Base-10 logarithm; x must be > 0.', category: 'exponential', hints: ['log'] },
  sqrt: { arity: 1, signature: 'sqrt(x)', doc: 'Square root; x must be >= 0.', category: 'power' },
  abs: { arity: 1, signature: 'abs(x)', doc: 'Absolute value.', category: 'power' },
  sin: { arity: 1, signature: 'sin(x)', doc: 'Sine of x in radians.', category: 'trigonometric' },
  cos: { arity: 1, signature: 'cos(x)', doc: 'Cosine of x in radians.', category: 'trigonometric' },
  tan: { arity: 1, signature: 'tan(x)', doc: 'Tangent of x in radians.', category: 'trigonometric' },
  asin: { arity: 1, signature: 'asin(x)', doc: 'Inverse sine in radians, for x in [-1, 1].', category: 'trigonometric', hints: ['arcsin'] },
  acos: { arity: 1, signature: 'acos(x)', doc: 'Inverse cosine in radians, for x in [-1, 1].', category: 'trigonometric', hints: ['arccos'] },
  atan: { arity: 1, signature: 'atan(x)', doc: 'Inverse tangent in radians, in (-pi/2, pi/2).', category: 'trigonometric', hints: ['arctan'] },
  atan2: { arity: 2, signature: 'atan2(y, x)', doc: 'Angle of the point (x, y) in radians, in (-pi, pi].', category: 'trigonometric' },
  sinh: { arity: 1, signature: 'sinh(x)', doc: 'Hyperbolic sine.', category: 'hyperbolic' },
  cosh: { arity: 1, signature: 'cosh(x)', doc: 'Hyperbolic cosine.', category: 'hyperbolic' },
  tanh: { arity: 1, signature: 'tanh(x)', doc: 'Hyperbolic tangent, in (-1, 1).', category: 'hyperbolic' },
  erf: { arity: 1, signature: 'erf(x)', doc: 'Error function, 2/sqrt(pi) times the integral of exp(-t^2) from 0 to x.', category: 'special' },
  erfc: { arity: 1, signature: 'erfc(x)', doc: 'Complementary error function, 1 - erf(x), accurate for large x.', category: 'special' },
  min: { arity: 2, signature: 'min(a, b)', doc: 'The smaller of a and b.', category: 'piecewise' },
  max: { arity: 2, signature: 'max(a, b)', doc: 'The larger of a and b.', category: 'piecewise' },
  pow: { arity: 2, signature: 'pow(a, b)', doc: 'a raised to the power b (same as a ^ b).', category: 'power', hints: ['power'] },
  hypot: { arity: 2, signature: 'hypot(a, b)', doc: 'sqrt(a^2 + b^2) without overflow for large a or b.', category: 'power' },
  when: { arity: 3, signature: 'when(condition, a, b)', doc: 'a where the condition holds, else b (piecewise models, e.g. a breakpoint).', category: 'piecewise', hints: ['if'] },
} as const satisfies Record<string, FunctionSpec>;

export type FunctionName = keyof typeof FUNCTION_SPECS;

/** Every function name, in registry order. */
export const FUNCTION_NAMES: readonly FunctionName[] = Object.keys(FUNCTION_SPECS) as FunctionName[];

/** Arity of each function (the plan's whitelist). */
export const FUNCTIONS: { readonly [K in FunctionName]: (typeof FUNCTION_SPECS)[K]['arity'] } = Object.freeze(
  Object.fromEntries(FUNCTION_NAMES.map((f) => [f, FUNCTION_SPECS[f].arity])),
) as { readonly [K in FunctionName]: (typeof FUNCTION_SPECS)[K]['arity'] };

export function isFunctionName(name: string): name is FunctionName {
  return Object.prototype.hasOwnProperty.call(FUNCTION_SPECS, name);
}

/** The spec of a function by a name that may be anything (undefined for a non-function). */
export function functionSpec(name: string): FunctionSpec | undefined {
  return isFunctionName(name) ? FUNCTION_SPECS[name] : undefined;
}

/** Names of other notations → the functions they may mean (from `hints`). */
export const FUNCTION_HINTS: ReadonlyMap<string, readonly FunctionName[]> = (() => {
  const m = new Map<string, FunctionName[]>();
  for (const f of FUNCTION_NAMES) {
    for (const h of (FUNCTION_SPECS[f] as FunctionSpec).hints ?? []) m.set(h, [...(m.get(h) ?? []), f]);
  }
  return m;
})();

/** Headings of the categories, in the order LANGUAGE.md lists them. */
export const FUNCTION_CATEGORY_TITLES: Readonly<Record<FunctionCategory, string>> = {
  exponential: 'exponential and logarithm',
  power: 'powers, roots, magnitude',
  trigonometric: 'trigonometric (radians)',
  hyperbolic: 'hyperbolic',
  special: 'special',
  piecewise: 'piecewise',
};
