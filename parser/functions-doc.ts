/**
 * One-line documentation of every built-in function and constant, shared by
 * LANGUAGE.md and the editor (hover, completion). Keyed by the names in
 * plan.ts `FUNCTIONS`, so a function added there without a doc fails to compile.
 */
import type { FunctionName } from './plan';

export interface FunctionDoc {
  /** Call shape as written in a spec. */
  signature: string;
  /** One line: what it computes, domain notes. */
  doc: string;
}

export const FUNCTION_DOCS: Readonly<Record<FunctionName, FunctionDoc>> = {
  exp: { signature: 'exp(x)', doc: 'e raised to the power x.' },
  ln: { signature: 'ln(x)', doc: 'Natural logarithm; x must be > 0.' },
  log10: { signature: 'log10(x)', doc: 'Base-10 logarithm; x must be > 0.' },
  sqrt: { signature: 'sqrt(x)', doc: 'Square root; x must be >= 0.' },
  abs: { signature: 'abs(x)', doc: 'Absolute value.' },
  sin: { signature: 'sin(x)', doc: 'Sine of x in radians.' },
  cos: { signature: 'cos(x)', doc: 'Cosine of x in radians.' },
  tan: { signature: 'tan(x)', doc: 'Tangent of x in radians.' },
  asin: { signature: 'asin(x)', doc: 'Inverse sine in radians, for x in [-1, 1].' },
  acos: { signature: 'acos(x)', doc: 'Inverse cosine in radians, for x in [-1, 1].' },
  atan: { signature: 'atan(x)', doc: 'Inverse tangent in radians, in (-pi/2, pi/2).' },
  atan2: { signature: 'atan2(y, x)', doc: 'Angle of the point (x, y) in radians, in (-pi, pi].' },
  sinh: { signature: 'sinh(x)', doc: 'Hyperbolic sine.' },
  cosh: { signature: 'cosh(x)', doc: 'Hyperbolic cosine.' },
  tanh: { signature: 'tanh(x)', doc: 'Hyperbolic tangent, in (-1, 1).' },
  erf: { signature: 'erf(x)', doc: 'Error function, 2/sqrt(pi) times the integral of exp(-t^2) from 0 to x.' },
  erfc: { signature: 'erfc(x)', doc: 'Complementary error function, 1 - erf(x), accurate for large x.' },
  min: { signature: 'min(a, b)', doc: 'The smaller of a and b.' },
  max: { signature: 'max(a, b)', doc: 'The larger of a and b.' },
  pow: { signature: 'pow(a, b)', doc: 'a raised to the power b (same as a ^ b).' },
  hypot: { signature: 'hypot(a, b)', doc: 'sqrt(a^2 + b^2) without overflow for large a or b.' },
  when: { signature: 'when(condition, a, b)', doc: 'a where the condition holds, else b (piecewise models, e.g. a breakpoint).' },
};

export const CONSTANT_DOCS: Readonly<Record<'pi' | 'e' | 'inf', string>> = {
  pi: 'The circle constant 3.14159…',
  e: 'Euler’s number 2.71828…, the base of ln.',
  inf: 'Infinity, only in parameter bounds: in [0, inf].',
};
