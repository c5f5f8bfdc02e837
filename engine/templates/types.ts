/**
 * Model templates for scaffolding specs (`leastwise new`, the editor's
 * "new spec" command): pure data plus pure functions, no I/O.
 */
import type { XY } from './heuristics';

export interface TemplateParameter {
  name: string;
  /** Bounds written as `in [lower, upper]`; omitted when both are infinite. */
  lower?: number;
  upper?: number;
  unit?: string;
  /** One line shown beside the parameter in the scaffolded spec. */
  meaning: string;
}

export interface StartValues {
  /** Starting value per parameter name. */
  values: Record<string, number>;
  /** How each value was found, one line per heuristic used (for the spec comment). */
  notes: string[];
}

/** What the model needs from the data; checked before scaffolding. */
/** positive_x: every x > 0; nonnegative_x: every x ≥ 0; two_positive_x: at least two distinct x > 0; positive_y: every y > 0. */
export type DataRequirement = 'positive_x' | 'nonnegative_x' | 'two_positive_x' | 'positive_y';

export interface Template {
  /** Stable id used on the command line (`--model`), e.g. `exp_decay`, `polynomial`. */
  id: string;
  /** Plain name, e.g. "exponential decay to a final level". */
  title: string;
  /** The model written with symbols, for help texts. */
  formula: string;
  /** Suggested fit name. */
  fitName: string;
  parameters: TemplateParameter[];
  requires: DataRequirement[];
  /** Extra `const` lines the model needs (name, value, comment). */
  constants?: { name: string; value: number; comment: string }[];
  /**
   * The model expression in .lsq syntax. `x` is the predictor reference as it
   * must appear in the spec (already quoted when needed); `p` maps each
   * template parameter name to the name used in the spec.
   */
  model(x: string, p: Record<string, string>): string;
  /**
   * Optional change of the predictor before starts are computed, e.g. °C to
   * kelvin: returns the transformed pairs and the predictor reference to use.
   */
  prepare?(d: XY, x: string): { d: XY; x: string; note?: string };
  /** Starting values from finite (x, y) pairs sorted by x. */
  start(d: XY): StartValues;
  /** Optional note for the spec header (assumptions of the model). */
  note?: string;
}
