/**
 * What the starting-value code needs from a fit: a compiled model, the data
 * it reads, the free parameters with their bounds, and (optionally) the
 * model's expression for structural recognition. Plain data and two
 * callbacks, so it can be built from a fit plan (engine/run/fit.ts) or in a
 * test.
 */
import type { Expr } from '../../../parser/plan';

/** What the guesser needs from a compiled model (free parameters only). */
export interface StartModel {
  value(theta: Float64Array, cols: readonly Float64Array[], n: number, out: Float64Array): void;
  valueAndJacobian(theta: Float64Array, cols: readonly Float64Array[], n: number, out: Float64Array, jac: Float64Array): void;
}

export interface StartParameter {
  name: string;
  initial?: number;
  lower: number;
  upper: number;
}

/** The model's expression over free parameters (fixed ones already substituted) and its column names, for structural recognition. */
export interface StartStructure {
  expr: Expr;
  /** Names of `cols`, in order. */
  columns: readonly string[];
}

export interface StartInput {
  model: StartModel;
  /** Model columns (as compiled) over the n fitted rows. */
  cols: readonly Float64Array[];
  n: number;
  y: Float64Array;
  /** √wᵢ, or null when unweighted. */
  sqrtW: Float64Array | null;
  parameters: readonly StartParameter[];
  /** Symbolic test: is the model linear in these parameters with all others held constant? */
  isLinearIn: (names: readonly string[]) => boolean;
  /** Optional: the model's structure (template shapes, rational models, parameter roles). */
  structure?: StartStructure;
}

export interface StartGuess {
  theta: Float64Array;
  /** Names of the parameters whose start was guessed. */
  guessed: string[];
  /** Short description for the 'guessed_start' message. */
  how: string;
}
