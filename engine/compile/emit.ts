/**
 * Safe source fragments shared by the code generators. Generated source is
 * assembled only from: fixed keywords and operators written here, names made
 * of a fixed prefix and a non-negative integer (`t3`, `x0`, `v17`), member
 * names from the fixed function table below, and numeric literals produced by
 * `literal`, which accepts only finite numbers and re-checks the text it
 * emits. No user-supplied string ever reaches generated source.
 */
import { BINARY_RULES, UNARY_RULES, type BinaryFn, type UnaryFn } from './functions';

const LITERAL = /^-?(?:\d+(?:\.\d*)?|\.\d+)(?:e[+-]?\d+)?$/;

/** JavaScript source for the finite number `v` (exact: String() round-trips doubles). */
/**
 * The source of a generated row kernel: `head` statements run once, `body`
 * statements once per row i < n. `params` is the parameter list of the
 * returned function (fixed identifiers only, never user text).
 */
export function rowKernel(params: string, head: readonly string[], body: readonly string[]): string {
  return [
    '"use strict";',
    `return function (${params}) {`,
    ...head.map((s) => '  ' + s),
    '  for (let i = 0; i < n; i++) {',
    ...body.map((s) => '    ' + s),
    '  }',
    '};',
  ].join('\n');
}

export function literal(v: number): string {
  if (typeof v !== 'number' || !Number.isFinite(v)) throw new RangeError('only finite numbers can be emitted');
  if (Object.is(v, -0)) return '(-0)';
  const s = String(v);
  if (!LITERAL.test(s)) throw new RangeError('unexpected number text');
  return v < 0 ? `(${s})` : s;
}

/** A generated identifier: fixed prefix + slot/node number. */
export function ident(prefix: 't' | 'x' | 'v' | 'h' | 'l' | 'o' | 'c', k: number): string {
  if (!Number.isSafeInteger(k) || k < 0) throw new RangeError('bad identifier index');
  return `${prefix}${k}`;
}

/** A member name of the helper object: a fixed identifier from the compiler's own function table. */
const MEMBER = /^[a-z][a-z0-9]*$/;
function members<K extends string>(names: readonly K[]): Readonly<Record<K, string>> {
  for (const n of names) if (!MEMBER.test(n)) throw new Error(`function table name ${JSON.stringify(n)} is not a plain identifier`);
  const out = {} as Record<K, string>;
  for (const n of names) out[n] = n;
  return Object.freeze(out);
}

/**
 * Member of the injected helper object `M` (see `codegen.ts` MATH_HELPERS) for
 * each function: its name in the compiler's fixed table (functions.ts), never
 * text from a spec (lowering accepts only names of that table).
 */
export const UNARY_MEMBER: Readonly<Record<UnaryFn, string>> = members(Object.keys(UNARY_RULES) as UnaryFn[]);
export const BINARY_MEMBER: Readonly<Record<BinaryFn, string>> = members(Object.keys(BINARY_RULES) as BinaryFn[]);

/** Compare operators as JavaScript (strict equality for == and !=). */
export const COMPARE_JS: Readonly<Record<string, string>> = Object.freeze({
  '<': '<', '<=': '<=', '>': '>', '>=': '>=', '==': '===', '!=': '!==',
});
