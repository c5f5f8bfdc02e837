/**
 * The check of a fit that gets no multi-start search (every start given, or a
 * group of a per-group fit): when should the search (explore.ts) run all the
 * same? A local solver ends in the basin its start lies in; a typed-in start
 * made for the curve the user expected (a potency in the middle of the doses)
 * lies in the basin of a higher local minimum when the data are unlike it (a
 * potency at or below the lowest dose). Searching every fit would cost tens of
 * fits each; the check costs a few comparisons, and a small search
 * (CHECK_POINTS design points, CHECK_REFINE refined) runs only when the
 * minimum reached carries one of two marks of such a fit:
 *  - a free parameter ended on a bound (warnings.ts `boundHit`, |θ − b| ≤
 *    1e-8·max(1, |b|)): a minimum of the bounded problem only - the model
 *    keeps descending beyond the bound - and basins inside the bounds that the
 *    solver passed by are not excluded;
 *  - a nonlinear parameter with a structural role (roles.ts: a location, a
 *    scale or a rate of the predictor, inside a function or a power with a
 *    parameter, at a power matching the predictor's, the predictor not
 *    inverted) ended outside the box the search would cover (box.ts: the
 *    range of the data widened by a decade): the curve's feature lies where no
 *    data point resolves it (a transition below the lowest dose, a decay far
 *    faster than the sampling), so the data do not pin the curve's shape.
 * Measured (2026-12-03): on the robustness suite (test/robustness, 12,000
 * curves from typed-in starts) 254 fits carry a mark (212 on a bound, 42
 * outside), among them all 6 that reached a higher minimum than the reference
 * (4 with the potency on its bound 0, 2 with it a decade or more below the
 * lowest dose); the search finds the lower minimum in all 6. Through a spec
 * from NIST StRD's certified starts, 6 of 54 runs carry a mark (Bennett5,
 * MGH10, Roszman1: a pole outside the data), with nothing lower found and the
 * digits unchanged; on benchmark 12's plates (potencies inside the doses) no
 * group does. The check is a necessary test only: a local minimum without
 * either mark goes unnoticed (a sinusoid's frequency in a side minimum, as in
 * test/run/explore.test.ts);
 * `explore N` runs the search on any fit.
 */
import { boundHit } from '../../stats/warnings';
import { searchBox } from './box';
import { MAX_START_ROWS, thinned } from './guess';
import { parameterRoles } from './roles';
import { linearSet } from './separable';
import type { StartInput } from './types';
import { DIGITS, formatNumber } from '../../format';

/**
 * Design points of the search the check runs (explore.ts; `explore N` asks for more), and the partial results
 * refined fully (explore.ts DEFAULT_REFINE is 4). Measured on the robustness suite's 254 marked fits: 8 points with 1
 * or 2 refined miss 2 or 1 of the 6 lower minima, 16 with 2 find all of them, at 3.9 ms per marked fit (a fit from
 * given starts alone: 0.3–0.7 ms).
 */
export const CHECK_POINTS = 16;
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
    if (!role || !role.transformed || (role.kind !== 'location' && (role.inverse || !role.unit)) || linear.includes(j)) continue;
    const box = searchBox(p, theta[j], role);
    if (theta[j] < box.lower || theta[j] > box.upper) return `${p.name} ended outside the range the data resolve (${formatNumber(box.lower, DIGITS.magnitude)} to ${formatNumber(box.upper, DIGITS.magnitude)})`;
  }
  return null;
}
