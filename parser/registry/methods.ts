/**
 * Solver choices (`method …` in a fit): the one list of their names, with a
 * doc line and the label the views print. The plan's `Method` type, the
 * checker, completion, the fit-options table of LANGUAGE.md and the keyword
 * doc of `method` derive from it; the schemas' method enums and the TextMate
 * grammar's value list are checked against it (test/registry/). The engine's
 * dispatch (engine/run/fit.ts, engine/run/solvers.ts) is keyed by the same
 * names.
 */

export interface MethodSpec {
  readonly doc: string;
  /** How the views name the solver that ran (not for `auto`, which is resolved before a fit). */
  readonly label: string;
}

export const METHOD_SPECS = {
  auto: { doc: 'linear least squares when the model is linear in its parameters, else Levenberg–Marquardt', label: 'automatic' },
  linear: { doc: 'linear least squares by QR (only for a model linear in its free parameters)', label: 'linear least squares' },
  levenberg_marquardt: { doc: 'Levenberg–Marquardt trust region (interior reflective with bounds)', label: 'Levenberg–Marquardt' },
  gradient_descent: { doc: 'gradient descent with feature scaling', label: 'gradient descent' },
} as const satisfies Record<string, MethodSpec>;

export type Method = keyof typeof METHOD_SPECS;
export const METHODS: readonly Method[] = Object.freeze(Object.keys(METHOD_SPECS) as Method[]);

export function isMethod(name: string): name is Method {
  return Object.prototype.hasOwnProperty.call(METHOD_SPECS, name);
}
