/**
 * Up-front checks of the solver options, so that a bad value ends a fit at
 * once with a message naming the option (as a `failed` stop), instead of a
 * solver running with it. The spec checker (parser/check-options.ts) already
 * refuses non-positive values; these rules add what the solvers need:
 *   maxIterations, maxEvaluations: whole numbers ≥ 1;
 *   reductionTolerance, stepTolerance, gradientTolerance: 0 ≤ tol < 1 (relative
 *     tolerances; 0 turns a test off);
 *   learningRate: finite and > 0.
 */
import type { SolveOptions } from './types';
import { fmt } from './types';

export interface CheckedOptions extends SolveOptions {
  learningRate?: number;
}

const LABELS: Record<string, string> = {
  maxIterations: 'iteration limit',
  maxEvaluations: 'evaluation limit',
  reductionTolerance: 'reduction tolerance',
  stepTolerance: 'step tolerance',
  gradientTolerance: 'gradient tolerance',
  learningRate: 'learning rate',
};

/** Null when the options are usable, else the message for a `failed` stop. */
export function validateSolveOptions(o: CheckedOptions): string | null {
  for (const key of ['maxIterations', 'maxEvaluations'] as const) {
    const v = o[key];
    if (v !== undefined && !(Number.isInteger(v) && v >= 1)) return `the ${LABELS[key]} must be a whole number of at least 1 (got ${fmt(v)})`;
  }
  for (const key of ['reductionTolerance', 'stepTolerance', 'gradientTolerance'] as const) {
    const v = o[key];
    if (v !== undefined && !(v >= 0 && v < 1)) return `the ${LABELS[key]} must be at least 0 and below 1: it is relative (got ${fmt(v)})`;
  }
  if (o.learningRate !== undefined && !(o.learningRate > 0 && Number.isFinite(o.learningRate))) {
    return `the ${LABELS.learningRate} must be a positive finite number (got ${fmt(o.learningRate)})`;
  }
  return null;
}
