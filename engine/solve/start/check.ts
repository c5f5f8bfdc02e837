/**
 * The check of a fit from given starting values: when should the
 * multi-start search (explore.ts) run although every start was given?
 * A local solver ends in the basin its start lies in; a typed-in start made
 * for the curve the user expected (a potency in the middle of the doses)
 * lies in the basin of a higher local minimum when the data are unlike it (a
 * potency at or below the lowest dose). Searching every fit would cost tens
 * of fits each; the check costs a few comparisons, and the search runs only
 * when the minimum reached has one of two marks of such a fit:
 *  - a free parameter ended on a bound (warnings.ts `boundHit`, |θ − b| ≤
 *    1e-8·max(1, |b|)): a minimum of the bounded problem only, the model
 *    keeps descending beyond the bound, and basins inside the bounds that
 *    the solver passed by are not excluded;
 *  - a nonlinear parameter with a structural role (roles.ts: a location, a
 *    scale or a rate of a predictor) ended outside the box the search would
 *    cover (box.ts: the range of the data widened by a decade): the curve's
 *    feature lies where no data point resolves it (a transition below the
 *    lowest dose, a decay time far beyond the last reading), so the data do
 *    not pin the curve's shape and minima of the kind above are typical.
 * Measured on the robustness suite (test/robustness, 12,000 curves from
 * typed-in starts): all 6 local minima reached from the given starts carry a
 * mark (4 on the potency's lower bound, 2 with the potency a decade or more
 * below the lowest dose), as do 1.9 % of the curves in all; on benchmark 12's
 * plates (potencies inside the doses) none. The check is a necessary test
 * only: a local minimum without either mark goes unnoticed; `explore N`
 * runs the search on any fit.
 */
import { boundHit } from '../../stats/warnings';
import { searchBox } from './box';
import { MAX_START_ROWS, thinned } from './guess';
import { parameterRoles } from './roles';
import { linearSet } from './separable';
import type { StartInput } from './types';

/** Design points of the search the check runs (explore.ts; `explore N` asks for more). */
export const CHECK_POINTS = 16;
/** Partial results refined fully by that search (explore.ts DEFAULT_REFINE is 4). */
export const CHECK_REFINE = 2;

/** Why the search should run after the fit from given starts ended at `theta`, or null (module comment). */
export function checkMark(start: StartInput, theta: Float64Array): string | null {
  const { parameters } = start;
  for (let j = 0; j < parameters.length; j++) {
    const p = parameters[j];
    const side = boundHit(theta[j], p.lower, p.upper);
    if (side) return `${p.name} ended on its ${side} bound`;
  }
  if (!start.structure) return null;
  const all = parameters.map((_, j) => j);
  const linear = linearSet(start, all);
  const sample = thinned(start, MAX_START_ROWS);
  const roles = parameterRoles(start.structure.expr, start.structure.columns, sample.cols, sample.n);
  for (const j of all) {
    const p = parameters[j];
    const role = roles.get(p.name);
    if (!role || (role.kind !== 'location' && role.inverse) || linear.includes(j)) continue;
    const box = searchBox(p, theta[j], role);
    if (theta[j] < box.lower || theta[j] > box.upper) return `${p.name} ended outside the range the data resolve (${box.lower.toPrecision(3)} to ${box.upper.toPrecision(3)})`;
  }
  return null;
}
