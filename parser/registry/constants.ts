/**
 * The built-in constants: `pi` and `e` in any expression or value, `inf`
 * only in parameter bounds. The checker folds them into numbers (check-env.ts
 * `BUILTIN_CONSTANTS`); hover, completion and the TextMate grammar's constant
 * list read them from here (the grammar by a parity test).
 */

export interface ConstantSpec {
  readonly value: number;
  readonly doc: string;
  /** Allowed only in parameter bounds (`in [0, inf]`). */
  readonly boundsOnly?: boolean;
}

export const CONSTANT_SPECS = {
  pi: { value: Math.PI, doc: 'The circle constant 3.14159…' },
  e: { value: Math.E, doc: 'Euler’s number 2.71828…, the base of ln.' },
  inf: { value: Infinity, doc: 'Infinity, only in parameter bounds: in [0, inf].', boundsOnly: true },
} as const satisfies Record<string, ConstantSpec>;

export type ConstantName = keyof typeof CONSTANT_SPECS;
export const CONSTANT_NAMES: readonly ConstantName[] = Object.keys(CONSTANT_SPECS) as ConstantName[];

export function isConstantName(name: string): name is ConstantName {
  return Object.prototype.hasOwnProperty.call(CONSTANT_SPECS, name);
}

/** The constants usable in any expression or value (all but the bounds-only `inf`). */
export const EXPRESSION_CONSTANTS: readonly ConstantName[] = CONSTANT_NAMES.filter((c) => !('boundsOnly' in CONSTANT_SPECS[c]));
