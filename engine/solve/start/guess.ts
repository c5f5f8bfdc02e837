/**
 * Automatic starting values for free parameters declared without `= value`.
 *
 * Method (deterministic, cheap), in this order:
 * 1. Parameters with a given start are held at it. Among the others, a
 *    linear set L is grown greedily (separable.ts); the rest form N.
 * 2. Template shapes (recognise.ts): when the model has the structure of a
 *    template family (4-parameter logistic, exponential decay, Gaussian peak,
 *    Michaelis–Menten, power law, Arrhenius, exponential growth) over a
 *    single predictor, that family's data-driven heuristic (engine/templates)
 *    gives the starts of the parameters it recognises.
 * 3. Rational models (rational.ts): numerator and denominator linear in
 *    their own parameters, the denominator with a parameter-free term:
 *    the linearised least-squares problem (Levy 1959) gives every start.
 * 4. Otherwise the general fallback: L by separable least squares for each
 *    candidate of N on a coarse grid (grid.ts), refined by the parameters'
 *    structural roles (roles.ts: locations, scales, rates, periods).
 * The linear parameters are always re-solved for the chosen N, so a start
 * is the best point of its kind for the data.
 * Large data: at most MAX_START_ROWS = 5000 rows are used (every k-th row,
 * k = ⌈n/5000⌉), which is plenty for a starting point.
 */
import type { StartGuess, StartInput } from './types';
import { linearSet, SeparableSolver } from './separable';
import { gridSearch } from './grid';
import { recogniseStart } from './recognise';
import { rationalStart } from './rational';
import { parameterRoles } from './roles';
import { startText } from '../messages';

/** Rows used for guessing: at most this many, every ⌈n/MAX_START_ROWS⌉-th row (deterministic thinning). */
export const MAX_START_ROWS = 5000;

/** The input on at most `rows` rows (every k-th row, k = ⌈n/rows⌉); the input itself when small enough. */
export function thinned(input: StartInput, rows = MAX_START_ROWS): StartInput {
  if (input.n <= rows) return input;
  const stride = Math.ceil(input.n / rows);
  const m = Math.ceil(input.n / stride);
  const pick = (a: Float64Array) => {
    const out = new Float64Array(m);
    for (let k = 0; k < m; k++) out[k] = a[k * stride];
    return out;
  };
  return { ...input, n: m, cols: input.cols.map(pick), y: pick(input.y), sqrtW: input.sqrtW ? pick(input.sqrtW) : null };
}

export function guessStart(full: StartInput): StartGuess {
  const input = thinned(full);
  const { parameters, n } = input;
  const theta = new Float64Array(parameters.length);
  const unknown: number[] = [];
  parameters.forEach((par, j) => {
    if (par.initial !== undefined) theta[j] = par.initial;
    else unknown.push(j);
  });
  if (unknown.length === 0) return { theta, guessed: [], how: '' };
  const names = (idx: readonly number[]) => idx.map((j) => parameters[j].name).join(', ');
  const guessed = unknown.map((j) => parameters[j].name);

  const template = recogniseStart(input, unknown);
  if (template) {
    for (const j of unknown) theta[j] = template.theta[j];
    return { theta: clampAll(theta, input), guessed, how: template.how };
  }
  const rational = rationalStart(input, unknown);
  if (rational) {
    for (const j of unknown) theta[j] = rational.theta[j];
    return { theta: clampAll(theta, input), guessed, how: rational.how };
  }

  const linear = linearSet(input, unknown);
  const nonlinear = unknown.filter((j) => !linear.includes(j));
  const sep = new SeparableSolver(input, linear);
  let evaluated = 0;
  if (nonlinear.length === 0) sep.solve(theta);
  else {
    const roles = input.structure ? parameterRoles(input.structure.expr, input.structure.columns, input.cols, n) : new Map();
    evaluated = gridSearch(theta, nonlinear, parameters, input.cols, n, sep, roles);
  }
  const parts: string[] = [];
  if (linear.length) parts.push(startText.linear(names(linear)));
  if (nonlinear.length) parts.push(startText.grid(names(nonlinear), evaluated));
  return { theta, guessed, how: parts.join(', ') };
}

function clampAll(theta: Float64Array, input: StartInput): Float64Array {
  input.parameters.forEach((p, j) => {
    const v = Math.min(p.upper, Math.max(p.lower, theta[j]));
    theta[j] = Number.isFinite(v) ? v : Number.isFinite(p.lower) ? p.lower : Number.isFinite(p.upper) ? p.upper : 0;
  });
  return theta;
}
