/**
 * The multi-start (global) phase of a fit. Local least-squares solvers find
 * the minimum of the basin they start in; models with several basins (sums
 * of exponentials or peaks, periodic terms, rational functions) need more
 * than one start. Method (a multistart scheme with low-discrepancy starts,
 * cf. A. H. G. Rinnooy Kan & G. T. Timmer, "Stochastic global optimization
 * methods, part I", Math. Programming 39 (1987) 27–56, with Sobol' points
 * for the sample):
 *  1. The fit from the start (given or data-driven) runs as it would
 *     without the search: its end point is the reference.
 *  2. The linear parameters are eliminated (separable.ts); the design is a
 *     Sobol' sample (sobol.ts) of `points` points over the box of the
 *     nonlinear parameters (box.ts), plus the start itself.
 *  3. From each design point, a partial solve: PARTIAL_ITERATIONS
 *     iterations (PARTIAL_EVALUATIONS evaluations at most) of the fit's
 *     nonlinear solver (Levenberg–Marquardt, or the interior reflective
 *     trust region with bounds: engine/solve/nonlinear.ts) on the reduced
 *     problem (reduced.ts),
 *     on at most MAX_PARTIAL_ROWS rows (every k-th row, guess.ts thinning):
 *     partial solves only rank basins.
 *  4. The `refine` best partial results in distinct basins (every nonlinear
 *     parameter within BASIN_RTOL relative of a better one counts as the same
 *     basin) are refined: the reduced problem to convergence, then the full
 *     problem on every row from the point it reached (the reduced problem on
 *     at most MAX_START_ROWS rows). With more rows than that, the points reached on the sample are ranked
 *     by their sum of squares over every row (one evaluation each) and only
 *     the best is refined on every row, and only when it is lower than the
 *     fit from the start: a full solve of a large data set costs as much as
 *     the whole design.
 *  5. Minima are merged by SSR (minima.ts); the fit reported is the lowest
 *     converged one. `lowerElsewhere` says the search found a lower minimum
 *     than the one reached from the start.
 * Deterministic: the same data and options give the same points and result.
 *
 * Threads: the search runs in the fit's own thread. Only step 3 (the partial
 * solves) could be split over worker threads, and it does not pay here:
 * measured with benchmark 13 on 2 cores (2026-12-03), an engine worker takes
 * 51 ms to start and answer (53–91 ms in an earlier run), while step 3 takes
 * 217 ms of a 298 ms search (two peaks on a baseline, n = 250), 12 of 15 ms
 * (4-parameter logistic, n = 36) and 212 of 409 ms (the same, n = 1e5); at
 * best (1 − 1/2) of step 3 minus the start-up is saved, 19 % of the slowest
 * search (28 % in the earlier run) and nothing on small fits or on the
 * check's 16-point searches (check.ts, a few ms), and it would need an
 * asynchronous fit path. Per-group fits already spread their groups, and so
 * their retries' searches, over threads (engine/parallel).
 */
import type { LeastSquaresProblem } from '../problem';
import type { SolveOptions, SolveOutcome } from '../types';
import { solveNonlinear } from '../nonlinear';
import { startText, stopText } from '../messages';
import type { StartInput } from './types';
import { linearSet } from './separable';
import { MAX_START_ROWS, thinned } from './guess';
import { parameterRoles } from './roles';
import { boxValue, searchBox, type BoxSide } from './box';
import { sobolPoints, SOBOL_MAX_DIMENSION } from './sobol';
import { reducedProblem, type ReducedProblem } from './reduced';
import { addMinimum, isLower, responseScale, type Minimum } from './minima';

/** LM iterations of a partial solve. */
export const PARTIAL_ITERATIONS = 12;
/** Residual evaluations of a partial solve at most (rejected trial steps count; a start where most steps fail is not worth more). */
export const PARTIAL_EVALUATIONS = 4 * PARTIAL_ITERATIONS;
/** Rows used by the partial solves (every k-th row beyond). Measured (bench case 12, 1e5-point logistic): the same minimum as with 5000 rows, the whole search in about half the time. */
export const MAX_PARTIAL_ROWS = 1000;
/** Two partial results are in the same basin when every nonlinear parameter agrees within this relative difference. */
export const BASIN_RTOL = 1e-2;
/** Partial results refined fully by default. */
export const DEFAULT_REFINE = 4;
/** Design points by default: POINTS_PER_DIMENSION per nonlinear parameter, within [MIN_POINTS, MAX_POINTS]. */
export const POINTS_PER_DIMENSION = 32;
export const MIN_POINTS = 32;
export const MAX_POINTS = 256;

export function defaultPoints(nonlinear: number): number {
  return Math.min(MAX_POINTS, Math.max(MIN_POINTS, POINTS_PER_DIMENSION * nonlinear));
}

export interface ExploreInput {
  start: StartInput;
  /** The start (given or data-driven), within the bounds. */
  theta0: Float64Array;
  /** The full problem (every row). */
  problem: LeastSquaresProblem;
  /** Design points; undefined: `defaultPoints`. */
  points?: number;
  refine?: number;
  /** The fit from the start when it has run already (the check, check.ts); step 1 then reuses it. */
  fromStart?: SolveOutcome;
  /** Solver for the fit from the start and the full refinements (default Levenberg–Marquardt). */
  solve?: (problem: LeastSquaresProblem, theta0: Float64Array, options: SolveOptions) => SolveOutcome;
  options?: SolveOptions;
}

export interface ExploreOutcome {
  /** The reported fit: the lowest converged minimum (the fit from the start when nothing is lower). */
  best: SolveOutcome;
  /** The fit from the start. */
  fromStart: SolveOutcome;
  /** Distinct minima, lowest first (SSR = 2·cost). */
  minima: Minimum[];
  box: BoxSide[];
  /** Design points tried (the start included), partial solves run, full refinements. */
  points: number;
  partial: number;
  refined: number;
  /** The search found a lower minimum than the one reached from the start. */
  lowerElsewhere: boolean;
  /** Why the design was left out, when it was (e.g. no nonlinear parameter). */
  skipped?: string;
  /** Solver work of the whole phase. */
  iterations: number;
  evaluations: number;
  /** Set by the run when the check of a fit from given starts (check.ts) ran the search: why. */
  mark?: string;
}

export const ssrOf = (o: SolveOutcome) => (Number.isFinite(o.cost) ? 2 * o.cost : Infinity);

export function explore(input: ExploreInput): ExploreOutcome {
  const solve = input.solve ?? solveNonlinear;
  const options = input.options ?? {};
  const cancel = options.cancel;
  const fullInput = input.start;
  const { parameters } = fullInput;
  const scale = responseScale(fullInput.y, fullInput.sqrtW);
  let iterations = 0;
  let evaluations = 0;
  const count = (o: SolveOutcome) => {
    iterations += o.iterations;
    evaluations += o.evaluations;
    return o;
  };

  const fromStart = input.fromStart ?? count(solve(input.problem, input.theta0, options));
  const minima: Minimum[] = [];
  addMinimum(minima, { ssr: ssrOf(fromStart), theta: fromStart.theta, converged: fromStart.stop.converged, fromStart: true }, scale);
  const finish = (best: SolveOutcome, extra: Partial<ExploreOutcome>): ExploreOutcome => ({
    best,
    fromStart,
    minima,
    box: [],
    points: 0,
    partial: 0,
    refined: 0,
    lowerElsewhere: best !== fromStart && isLower(ssrOf(best), ssrOf(fromStart), scale),
    iterations,
    evaluations,
    ...extra,
  });

  const all = parameters.map((_, j) => j);
  const linear = linearSet(fullInput, all);
  const nonlinear = all.filter((j) => !linear.includes(j));
  if (nonlinear.length === 0) return finish(fromStart, { skipped: startText.skippedLinear });
  if (nonlinear.length > SOBOL_MAX_DIMENSION) return finish(fromStart, { skipped: startText.skippedDimension(SOBOL_MAX_DIMENSION) });

  const d = searchDesign(input, linear, nonlinear, input.points ?? defaultPoints(nonlinear.length));
  const alpha0 = Float64Array.from(nonlinear, (j) => input.theta0[j]);
  const candidates = [alpha0, Float64Array.from(nonlinear, (j) => fromStart.theta[j]), ...d.design];

  // 3. partial solves
  const partial: { ssr: number; alpha: Float64Array }[] = [];
  const partialOptions: SolveOptions = { maxIterations: PARTIAL_ITERATIONS, maxEvaluations: PARTIAL_EVALUATIONS, polish: false, cancel };
  for (const a of candidates) {
    if (cancel?.cancelled) break;
    const o = count(solveNonlinear(d.partialReduced, a, partialOptions));
    const s = ssrOf(o);
    if (Number.isFinite(s) && o.theta.every(Number.isFinite)) partial.push({ ssr: s, alpha: Float64Array.from(o.theta) });
  }
  partial.sort((a, b) => a.ssr - b.ssr);

  // 4. the best few in distinct basins, refined
  const chosen = distinctBasins(partial, input.refine ?? DEFAULT_REFINE);
  const { best, refined } = refineCandidates(input, d, chosen, fromStart, minima, count);
  return finish(best, { box: d.box, points: candidates.length, partial: partial.length, refined });
}

/** The design of a search or check: box, Sobol' points, and the reduced problems on the sampled rows (module comment, step 2). */
export interface SearchDesign {
  box: BoxSide[];
  design: Float64Array[];
  /** Rows of the refinement's reduced problem (at most MAX_START_ROWS) and the problem on them. */
  sample: StartInput;
  reduced: ReducedProblem;
  /** At most MAX_PARTIAL_ROWS rows (partial solves, the check's screening) and the reduced problem on them. */
  partialSample: StartInput;
  partialReduced: ReducedProblem;
  linear: readonly number[];
  nonlinear: readonly number[];
}

export function searchDesign(input: ExploreInput, linear: readonly number[], nonlinear: readonly number[], points: number): SearchDesign {
  const fullInput = input.start;
  const sample = thinned(fullInput, MAX_START_ROWS);
  const roles = fullInput.structure ? parameterRoles(fullInput.structure.expr, fullInput.structure.columns, sample.cols, sample.n) : new Map();
  const box = nonlinear.map((j) => searchBox(fullInput.parameters[j], input.theta0[j], roles.get(fullInput.parameters[j].name)));
  const design = sobolPoints(nonlinear.length, points).map((u) => Float64Array.from(u, (v, k) => boxValue(box[k], shifted(v, k))));
  const reduced = reducedProblem(sample, input.theta0, linear, nonlinear);
  const partialSample = thinned(fullInput, MAX_PARTIAL_ROWS);
  const partialReduced = partialSample === sample ? reduced : reducedProblem(partialSample, input.theta0, linear, nonlinear);
  return { box, design, sample, reduced, partialSample, partialReduced, linear, nonlinear };
}

/** Up to `count` points of `ranked` (lowest SSR first) in distinct basins (BASIN_RTOL). */
export function distinctBasins(ranked: readonly { alpha: Float64Array }[], count: number): Float64Array[] {
  const chosen: Float64Array[] = [];
  for (const c of ranked) {
    if (chosen.length >= count) break;
    if (chosen.some((a) => sameBasin(a, c.alpha))) continue;
    chosen.push(c.alpha);
  }
  return chosen;
}

/**
 * Steps 4 and 5 for the chosen points: the reduced problem solved to convergence, then the full problem from the
 * point reached (with more rows than the sample: only the best by full SSR, and only when lower than the fit from
 * the start); each end point is merged into `minima`. Returns the lowest converged end point (the fit from the start
 * when none is lower) and the number of full refinements.
 */
export function refineCandidates(
  input: ExploreInput,
  d: SearchDesign,
  chosen: readonly Float64Array[],
  fromStart: SolveOutcome,
  minima: Minimum[],
  count: (o: SolveOutcome) => SolveOutcome,
): { best: SolveOutcome; refined: number } {
  const solve = input.solve ?? solveNonlinear;
  const options = input.options ?? {};
  const cancel = options.cancel;
  const { parameters } = input.start;
  const scale = responseScale(input.start.y, input.start.sqrtW);
  let best = fromStart;
  let refined = 0;
  const sampled = d.sample.n < input.start.n;
  const starts: { r: SolveOutcome; theta: Float64Array; ssr: number }[] = [];
  for (const a of chosen) {
    if (cancel?.cancelled) break;
    const r = count(solveNonlinear(d.reduced, a, { cancel }));
    const theta = d.reduced.fullTheta(r.theta.every(Number.isFinite) ? r.theta : a);
    for (let j = 0; j < theta.length; j++) theta[j] = Math.min(parameters[j].upper, Math.max(parameters[j].lower, theta[j]));
    starts.push({ r, theta, ssr: sampled ? fullSsr(input.problem, theta) : 0 });
  }
  if (sampled) {
    starts.sort((a, b) => a.ssr - b.ssr);
    starts.splice(starts.length && isLower(starts[0].ssr, ssrOf(fromStart), scale) ? 1 : 0);
  }
  for (const { r, theta } of starts) {
    if (cancel?.cancelled) break;
    const o = count(solve(input.problem, theta, options));
    refined++;
    if (r.stop.converged && !o.stop.converged && o.stop.code === 'small_step' && o.iterations === 0 && ssrOf(o) <= ssrOf(r) * (1 + 1e-12) + 1e-300) {
      // A minimum of the reduced problem is a minimum of the full one (Golub & Pereyra 1973, Thm. 2.1); the full
      // solver finding no descent step from it confirms it (at residuals near the rounding level no step can).
      o.stop = { code: 'small_step', converged: true, message: stopText.separableConfirmed(r.stop.message) };
    }
    addMinimum(minima, { ssr: ssrOf(o), theta: o.theta, converged: o.stop.converged, fromStart: false }, scale);
    // the lowest converged end point is reported (among ends at one minimum, the most accurate one)
    if (o.stop.converged && (!best.stop.converged || ssrOf(o) < ssrOf(best))) best = o;
  }
  return { best, refined };
}

/**
 * A fixed shift of each coordinate modulo 1 (a Cranley–Patterson rotation: R. Cranley & T. N. L. Patterson, SIAM
 * J. Numer. Anal. 13 (1976) 904–914), by the fractional parts of k·(√5 − 1)/2. It keeps the design's spread and
 * breaks the symmetry of the first Sobol' coordinates under exchange (their first points come in mirrored pairs
 * (u, v), (v, u)), which would spend half the design twice on models with interchangeable terms.
 */
function shifted(u: number, k: number): number {
  const s = u + (((k + 1) * (Math.sqrt(5) - 1)) / 2) % 1;
  return s >= 1 ? s - 1 : s;
}

/** Sum of squared residuals of `problem` at θ (Infinity when not finite). */
function fullSsr(problem: LeastSquaresProblem, theta: Float64Array): number {
  const r = new Float64Array(problem.n);
  problem.residuals(theta, r);
  let s = 0;
  for (let i = 0; i < r.length; i++) s += r[i] * r[i];
  return Number.isFinite(s) ? s : Infinity;
}

function sameBasin(a: Float64Array, b: Float64Array): boolean {
  for (let k = 0; k < a.length; k++) {
    const d = Math.abs(a[k] - b[k]);
    if (d > BASIN_RTOL * Math.max(Math.abs(a[k]), Math.abs(b[k]))) return false;
  }
  return true;
}
