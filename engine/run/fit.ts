/**
 * One fit over one dataset (or one group): start values, solver, statistics.
 * Pure apart from the clock: `runFit(fitPlan, data, options)` returns a
 * complete FitResult and never throws for user input - a fit that cannot run
 * has stop code `failed` and says why. Safe to call per group from workers.
 *
 * Method choice (`method auto`): the linear QR solver when the model is
 * linear in its free parameters (compiler test), else Levenberg–Marquardt
 * (with bounds: the interior reflective trust region, engine/solve/nonlinear.ts;
 * the result says so in `boundsMethod`). A
 * linear solution that violates a bound is re-solved by Levenberg–Marquardt
 * from the clamped point (reported as levenberg_marquardt). A robust loss
 * first solves the squared-loss problem, then hands that estimate to the
 * robust solver.
 *
 * Starting values (engine/solve/start): parameters without `= value` get a
 * data-driven start. The multi-start search (explore.ts) runs for
 * Levenberg–Marquardt fits when the spec asks for it (`explore N`, N > 0),
 * or by default when a nonlinear free parameter has no start value and the
 * fit is not one group of a per-group fit (`explore 0` switches it off). Its
 * lowest converged minimum is the fit reported; when that is lower than the
 * one reached from the starting values, the stop message says so and a
 * `lower_minimum` warning names both sums of squares. A robust loss then
 * starts from the search's result.
 *
 * The check (engine/solve/start/check.ts): a Levenberg–Marquardt fit that
 * gets no search - its nonlinear parameters all have starts, or it is a group
 * of a per-group fit - and no `explore` runs a small search (CHECK_POINTS design points,
 * CHECK_REFINE refined) after converging when the minimum it reached has a
 * mark of a fit stuck in the wrong basin (a parameter on a bound, or a
 * location, scale or rate outside the range the data resolve). A lower
 * minimum found is reported as above, with the mark; the same minimum found
 * again leaves the fit as it was (the search is still recorded, reason
 * `check`).
 */
import { LOSS_SPECS } from '../../parser/registry/losses';
import type { Expr, FitPlan, LossKind } from '../../parser/plan';
import { isLinearInParameters, sharedModel, type CompiledModel } from '../compile';
import type { FitResult, FitTrace, FitWarning, SearchResult, StopReason } from '../result';
import { boundsMethodFor, modelProblem, nonFiniteDetail, type CancelToken, type SolveOutcome, type SolverTrace } from '../solve';
import { CHECK_POINTS, CHECK_REFINE, checkMark, explore, guessStart, isLower, linearSet, type ExploreOutcome, type StartInput } from '../solve/start';
import { errorText, runText, searchText, warningText } from '../messages';
import type { FitData } from './fit-data';
import { failedFit } from './fit-result';
import { holdParams } from '../../parser/plan-expr';
import { planFreeModel } from './curve';
import { defaultSolvers, type Solvers } from './solvers';
import { fitStatistics } from './fit-stats';
import { responseScale } from '../linalg/scale';
import { profileForFit } from './profile-fit';

export interface RunFitOptions {
  cancel?: CancelToken;
  /** Solver implementations (default: engine/solve). */
  solvers?: Solvers;
  /** Millisecond clock for `elapsedMs` (default performance.now). */
  clock?: () => number;
  /** Called after each accepted iteration of an iterative solver with the objective (½‖r‖², robust: ½Σc²ρ). */
  onIteration?: (iteration: number, cost: number) => void;
  /**
   * Starting values to use instead of the spec's (free parameters, in
   * declaration order); NaN entries are guessed from the data. `how` says
   * where the others came from (for the guessed-start warning, when the spec
   * gave no value). Per-group fits (engine/groups/starts.ts,
   * engine/groups/group-job.ts) use it.
   */
  startOverride?: { theta: Float64Array; how: string };
  /** Search even a group of a per-group fit (when a nonlinear parameter has no start or `explore` asks). Default false for groups. */
  searchGroup?: boolean;
  /** Record the solver's per-iteration trace in the result (`FitResult.trace`). Default false. */
  trace?: boolean;
}

const failedStop = (message: string): StopReason => ({ code: 'failed', message, converged: false });

export function runFit(fit: FitPlan, data: FitData, options: RunFitOptions = {}): FitResult {
  const clock = options.clock ?? (() => performance.now());
  const t0 = clock();
  const solvers = options.solvers ?? defaultSolvers;
  const fail = (message: string, warnings: FitWarning[] = []) => failedFit(fit, data, failedStop(message), warnings, clock() - t0);
  const groupWarnings: FitWarning[] = data.rowsWithoutGroup > 0
    ? [{ code: 'rows_dropped', message: warningText.rows_without_group(data.rowsWithoutGroup, data.file, fit.groupBy ?? '') }]
    : [];

  const missingStart = fit.parameters.filter((p) => p.fixed && p.initial === undefined).map((p) => p.name);
  if (missingStart.length) return fail(errorText.fixedWithoutValue(fit.name, missingStart));
  const p = fit.parameters.filter((q) => !q.fixed).length;
  const n = data.n;
  if (n === 0) return fail(errorText.noRows(fit.name, data.file), groupWarnings);
  if (n < p) return fail(errorText.notEnoughRows(fit.name, n, p), [{ code: 'few_dof', message: warningText.few_dof(n, p) }, ...groupWarnings]);

  try {
    return fitCore(fit, data, solvers, options, groupWarnings, () => clock() - t0);
  } catch (e) {
    // A compiler, solver or statistics routine rejecting its input (e.g. a loss scale
    // it cannot use) ends this fit only, as a failed result with the reason.
    return fail(errorText.internal(fit.name, e instanceof Error ? e.message : String(e)), groupWarnings);
  }
}

type Watch = Pick<RunFitOptions, 'cancel' | 'onIteration' | 'trace' | 'startOverride' | 'searchGroup'>;

/** What a fit's model is, independent of the data: computed once per plan object (plans are not modified after checking), so the groups of a per-group fit share it. */
interface PlanModel {
  expr: Expr;
  free: string[];
  /** Linearity tests already answered (key: the parameter names joined by NUL). */
  linearIn: Map<string, boolean>;
}
const planModels = new WeakMap<FitPlan, PlanModel>();

function planModel(fit: FitPlan): PlanModel {
  let m = planModels.get(fit);
  if (!m) {
    const { expr, free } = planFreeModel(fit);
    m = { expr, free: [...free], linearIn: new Map() };
    planModels.set(fit, m);
  }
  return m;
}

function isLinearIn(m: PlanModel, names: readonly string[]): boolean {
  const key = names.join('\u0000');
  let v = m.linearIn.get(key);
  if (v === undefined) {
    v = isLinearInParameters(holdParams(m.expr, new Set(m.free.filter((f) => !names.includes(f)))), names);
    m.linearIn.set(key, v);
  }
  return v;
}

function fitCore(fit: FitPlan, data: FitData, solvers: Solvers, watch: Watch, groupWarnings: FitWarning[], elapsed: () => number): FitResult {
  const pm = planModel(fit);
  const { expr, free } = pm;
  const freePlans = fit.parameters.filter((p) => !p.fixed);
  const n = data.n;
  // one compiled model for every group of a fit (engine/compile `sharedModel`)
  const model: CompiledModel = sharedModel(expr, free, data.modelColumns);
  const lower = Float64Array.from(freePlans, (q) => q.lower ?? -Infinity);
  const upper = Float64Array.from(freePlans, (q) => q.upper ?? Infinity);
  // Responses far from 1 (|√w·y| outside [2^-400, 2^400]) are fitted divided by a power of two c
  // (exact), so squares of residuals stay in range; the statistics scale back (engine/linalg/scale.ts).
  // Costs of the scaled problem are multiplied by c² wherever they are reported.
  const rawSqrtW = data.weights ? data.weights.map(Math.sqrt) : null;
  const c = responseScale(data.y, rawSqrtW, n);
  const sqrtW = c === 1 ? rawSqrtW : rawSqrtW ? rawSqrtW.map((v) => v / c) : new Float64Array(n).fill(1 / c);

  const override = watch.startOverride;
  const startInput: StartInput = {
    model,
    cols: data.columns,
    n,
    y: data.y,
    sqrtW,
    parameters: freePlans.map((q, j) => {
      const initial = override ? (Number.isFinite(override.theta[j]) ? override.theta[j] : undefined) : q.initial;
      return { name: q.name, ...(initial !== undefined ? { initial } : {}), lower: lower[j], upper: upper[j] };
    }),
    isLinearIn: (names) => isLinearIn(pm, names),
    structure: { expr, columns: data.modelColumns },
  };
  const guess = guessStart(startInput);
  const theta0 = guess.theta.map((v, j) => Math.min(upper[j], Math.max(lower[j], v)));
  // Starts taken from an override count as guessed when the spec has no value for them.
  const fromOverride = override ? freePlans.filter((q, j) => q.initial === undefined && Number.isFinite(override.theta[j])).map((q) => q.name) : [];
  const guessedNames = [...fromOverride, ...guess.guessed];
  const guessedHow = [fromOverride.length && override ? `${fromOverride.join(', ')}: ${override.how}` : '', guess.how].filter((s) => s).join('; ');

  const problem = modelProblem({ model, columns: data.columns, response: data.y, n, sqrtWeights: sqrtW ?? undefined, lower, upper });
  const search = searchPlan(fit, data, model.linear, startInput, watch);
  const onIteration = watch.onIteration;
  const scaledWatch = c === 1 || !onIteration ? watch : { ...watch, onIteration: (it: number, cost: number) => onIteration(it, cost * c * c) };
  const solved = solve(fit, model.linear, problem, theta0, lower, upper, solvers, scaledWatch, c, search && { ...search, start: startInput });
  if ('error' in solved) return failedFit(fit, data, failedStop(solved.error), groupWarnings, elapsed());
  const searchWarnings: FitWarning[] = [];
  let searchResult: SearchResult | undefined;
  if (solved.search && search) {
    const s = solved.search;
    const c2 = c * c;
    searchResult = searchSummary(s, search.reason, free, c2);
    const reportedSsr = 2 * s.best.cost * c2;
    if (s.lowerElsewhere) {
      const startSsr = 2 * s.fromStart.cost * c2;
      const note = s.mark ? searchText.checkLower(s.mark, startSsr) : searchText.lowerElsewhere(startSsr);
      solved.outcome.stop = { ...solved.outcome.stop, message: runText.withNote(solved.outcome.stop.message, note) };
      searchWarnings.push({ code: 'lower_minimum', message: warningText.lower_minimum(startSsr, reportedSsr, s.points, guessedNames.length === 0, s.mark), parameters: free });
    }
    if (!s.lowerElsewhere && s.best !== s.fromStart) {
      solved.outcome.stop = { ...solved.outcome.stop, message: runText.withNote(solved.outcome.stop.message, searchText.sameMinimum) };
    }
    const lowerUnconverged = s.minima.find((m) => !m.converged && isLower(m.ssr, 2 * s.best.cost, 0));
    if (lowerUnconverged && solved.outcome.stop.converged) {
      solved.outcome.stop = { ...solved.outcome.stop, message: runText.withNote(solved.outcome.stop.message, searchText.lowerUnconverged(lowerUnconverged.ssr * c2)) };
      searchWarnings.push({ code: 'lower_minimum', message: searchText.unconvergedLower(lowerUnconverged.ssr * c2, reportedSsr), parameters: free });
    }
  }
  const names = freePlans.map((q) => q.name);
  const stop = locateStop(solved.outcome, names, data.lines);
  const boundsMethod = solved.method === 'levenberg_marquardt' ? boundsMethodFor(problem) : null;
  const stats = fitStatistics({
    fit,
    data,
    problem,
    outcome: solved.outcome,
    linear: model.linear,
    lower,
    upper,
    start: theta0,
    responseScale: c,
    // A direct linear solve does not use starting values, so a guess is not worth a warning there.
    guessed: { names: solved.method === 'linear' ? [] : guessedNames, how: guessedHow },
  });
  // profile-likelihood intervals (engine/run/profile-fit.ts): reduced fits by the same solver and stopping rules
  const prof = profileForFit({
    fit,
    ...(data.group !== undefined ? { group: data.group } : {}),
    problem,
    outcome: solved.outcome,
    linear: model.linear,
    lower,
    upper,
    responseScale: c,
    sigmaAbsolute: data.sigmaAbsolute,
    response: data.y,
    weights: data.weights,
    parameters: stats.fields.parameters,
    dof: stats.fields.goodness.dof,
    solve: (pr, t, opts) => solvers.levenbergMarquardt(pr, t, opts),
    options: profileSolveOptions(fit, watch),
  });
  return {
    name: fit.name,
    ...(data.group !== undefined ? { group: data.group } : {}),
    method: solved.method,
    options: fit.options,
    loss: fit.options.loss,
    level: fit.options.level,
    stop,
    iterations: solved.iterations,
    evaluations: solved.evaluations,
    ...(boundsMethod ? { boundsMethod } : {}),
    ...(solved.outcome.trace ? { trace: namedTrace(solved.outcome.trace, names) } : {}),
    ...stats.fields,
    parameters: prof.parameters,
    warnings: [...searchWarnings, ...stats.warnings, ...prof.warnings, ...groupWarnings],
    ...(searchResult ? { search: searchResult } : {}),
    ...robustFields(fit, solved.outcome, c),
    ...(prof.summary ? { profile: prof.summary } : {}),
    elapsedMs: elapsed(),
  };
}

/** The robust loss's scale (back in the data's units: the problem's residuals are divided by `c`) and each point's weight. */
function robustFields(fit: FitPlan, outcome: SolveOutcome, c: number): Pick<FitResult, 'robust'> {
  const w = outcome.robustWeights;
  if (fit.options.loss === 'squared' || !w || outcome.robustScale === undefined || !outcome.stop.converged) return {};
  let downweighted = 0;
  for (let i = 0; i < w.length; i++) if (w[i] < 1) downweighted++;
  return {
    robust: {
      scale: fit.options.lossScale ?? outcome.robustScale * c,
      scaleFrom: fit.options.lossScale !== undefined ? 'given' : 'spread',
      tuning: LOSS_SPECS[fit.options.loss].tuning,
      weights: Array.from(w),
      downweighted,
    },
  };
}

/** The reduced fits of a profile stop by the fit's own rules (iteration limit, tolerance, cancellation); no trace, no progress reports. */
function profileSolveOptions(fit: FitPlan, watch: Watch) {
  const o = fit.options;
  return {
    ...(watch.cancel ? { cancel: watch.cancel } : {}),
    ...(o.maxIterations !== undefined ? { maxIterations: o.maxIterations } : {}),
    ...(o.tolerance !== undefined ? { reductionTolerance: o.tolerance, stepTolerance: o.tolerance, gradientTolerance: o.tolerance } : {}),
  };
}

type Solved = { outcome: SolveOutcome; method: Exclude<FitPlan['options']['method'], 'auto'>; iterations: number; evaluations: number; search?: ExploreOutcome } | { error: string };

interface SearchPlan {
  reason: SearchResult['reason'];
  /** Design points; undefined: the default for the number of nonlinear parameters. */
  points?: number;
}

/** Whether (and why) the multi-start search runs for this fit (see the module comment). */
function searchPlan(fit: FitPlan, data: FitData, linearModel: boolean, start: StartInput, watch: Watch): SearchPlan | null {
  const asked = fit.options.explore;
  if (asked === 0 || linearModel) return null;
  if (fit.options.method === 'linear' || fit.options.method === 'gradient_descent') return null;
  if (asked !== undefined) return { reason: 'asked', points: asked };
  const all = start.parameters.map((_, j) => j);
  const linear = linearSet(start, all);
  const missing = all.some((j) => !linear.includes(j) && start.parameters[j].initial === undefined);
  // a group searches only when asked (retries, engine/groups/group-job.ts): the search costs many fits; from its
  // shared or own start it gets the check, like a fit from given starts
  if (missing && (data.group === undefined || watch.searchGroup)) return { reason: 'no_start' };
  return { reason: 'check' };
}

/** The search as reported; `c2` = c², the factor from the scaled problem's sums of squares to the data's. */
function searchSummary(s: ExploreOutcome, reason: SearchResult['reason'], free: readonly string[], c2: number): SearchResult {
  const reportedSsr = 2 * s.best.cost * c2;
  // matched in the scaled problem's units: c² may underflow for data near 1e-300
  const reportedScaled = 2 * s.best.cost;
  let reportedMarked = false;
  return {
    reason,
    parameters: [...free],
    box: s.box.map((b) => ({ parameter: b.name, lower: b.lower, upper: b.upper, scale: b.scale })),
    points: s.points,
    partial: s.partial,
    refined: s.refined,
    minima: s.minima.map((m) => {
      const ssr = m.ssr * c2;
      const reported = !reportedMarked && m.converged && Math.abs(m.ssr - reportedScaled) <= 1e-8 * Math.max(m.ssr, reportedScaled);
      if (reported) reportedMarked = true;
      return { ssr, estimates: Array.from(m.theta), converged: m.converged, hits: m.hits, fromStart: m.fromStart, reported };
    }),
    startSsr: 2 * s.fromStart.cost * c2,
    lowerElsewhere: s.lowerElsewhere,
    ...(s.mark ? { mark: s.mark } : {}),
    ...(s.skipped ? { skipped: s.skipped } : {}),
    iterations: s.iterations,
    evaluations: s.evaluations,
  };
}

function solve(
  fit: FitPlan,
  linear: boolean,
  problem: ReturnType<typeof modelProblem>,
  theta0: Float64Array,
  lower: Float64Array,
  upper: Float64Array,
  solvers: Solvers,
  watch: Watch,
  scale: number,
  search?: (SearchPlan & { start: StartInput }) | null,
): Solved {
  const o = fit.options;
  const cancel = watch.cancel;
  const iterative = {
    cancel,
    ...(watch.onIteration ? { onIteration: watch.onIteration } : {}),
    ...(o.maxIterations !== undefined ? { maxIterations: o.maxIterations } : {}),
    ...(o.tolerance !== undefined ? { reductionTolerance: o.tolerance, stepTolerance: o.tolerance, gradientTolerance: o.tolerance } : {}),
    ...(watch.trace ? { trace: true } : {}),
    ...(o.learningRate !== undefined ? { learningRate: o.learningRate } : {}),
  };
  const method = o.method === 'auto' ? (linear ? 'linear' : 'levenberg_marquardt') : o.method;
  if (method === 'linear' && !linear) return { error: errorText.methodNotLinear(fit.name) };

  let outcome: SolveOutcome;
  let used: Exclude<FitPlan['options']['method'], 'auto'> = method;
  let iterations = 0;
  let evaluations = 0;
  let searched: ExploreOutcome | undefined;
  const add = (s: SolveOutcome) => {
    iterations += s.iterations;
    evaluations += s.evaluations;
    return s;
  };
  if (method === 'linear') {
    outcome = add(solvers.linear(problem, { cancel }));
    if (outcome.stop.converged && outcome.theta.some((v, j) => v < lower[j] || v > upper[j])) {
      const clamped = outcome.theta.map((v, j) => Math.min(upper[j], Math.max(lower[j], v)));
      outcome = add(solvers.levenbergMarquardt(problem, clamped, iterative));
      used = 'levenberg_marquardt';
    }
  } else if (method === 'gradient_descent') {
    if (!solvers.gradientDescent) return { error: runText.gradientDescentMissing };
    outcome = add(solvers.gradientDescent(problem, theta0, iterative));
  } else if (search?.reason === 'check') {
    const first = solvers.levenbergMarquardt(problem, theta0, iterative);
    const mark = first.stop.converged ? checkMark(search.start, first.theta) : null;
    if (mark) {
      searched = explore({ start: search.start, theta0, problem, fromStart: first, points: CHECK_POINTS, refine: CHECK_REFINE, solve: (pr, t, opts) => solvers.levenbergMarquardt(pr, t, { ...iterative, ...opts }), options: iterative });
      searched.iterations += first.iterations;
      searched.evaluations += first.evaluations;
      searched.mark = mark;
      // the same minimum found again keeps the fit from the given starts as it was
      if (!searched.lowerElsewhere) searched.best = first;
    }
    outcome = add(searched ? searched.best : first);
  } else if (search) {
    searched = explore({
      start: search.start,
      theta0,
      problem,
      ...(search.points !== undefined ? { points: search.points } : {}),
      solve: (pr, t, opts) => solvers.levenbergMarquardt(pr, t, { ...iterative, ...opts }),
      options: iterative,
    });
    // the fit's own counts are those of the reported solve; the search's work is in `search`
    outcome = add(searched.best);
  } else {
    outcome = add(solvers.levenbergMarquardt(problem, theta0, iterative));
  }
  const loss: LossKind = o.loss;
  if (loss !== 'squared' && outcome.stop.code !== 'cancelled') {
    if (!solvers.robust) return { error: runText.robustMissing(loss) };
    const from = outcome.theta.every(Number.isFinite) ? outcome.theta : theta0;
    // the loss scale is in units of the weighted residual; the problem's residuals are divided by c.
    // Without one in the spec it comes from the residuals' robust spread (engine/solve/loss.ts), which needs no unit.
    outcome = add(solvers.robust(problem, from, loss, o.lossScale !== undefined ? o.lossScale / scale : 'spread', iterative));
    if (used === 'linear') used = 'levenberg_marquardt';
  }
  return { outcome, method: used, iterations, evaluations, ...(searched ? { search: searched } : {}) };
}

/** The solver's stop, with a non-finite stop located: data-file lines, parameter names and values. */
function locateStop(outcome: SolveOutcome, names: readonly string[], lines: Int32Array): StopReason {
  const nf = outcome.nonFinite;
  if (outcome.stop.code !== 'non_finite' || !nf) return outcome.stop;
  const at: Record<string, number> = {};
  names.forEach((name, j) => { at[name] = nf.theta[j]; });
  return {
    ...outcome.stop,
    message: runText.located(outcome.stop.message, nonFiniteDetail(nf, names, lines)),
    nonFinite: { what: nf.what, lines: nf.rows.map((i) => lines[i]), rows: nf.count, parameters: nf.parameters.map((j) => names[j]), at },
  };
}

/** The solver's trace with parameter indices replaced by names. */
function namedTrace(t: SolverTrace, names: readonly string[]): FitTrace {
  const name = (js: number[] | undefined) => js?.map((j) => names[j]);
  return {
    solver: t.solver,
    omitted: t.omitted,
    records: t.records.map((r) => {
      const { bounds, active, ...rest } = r;
      return { ...rest, ...(bounds ? { bounds: name(bounds) } : {}), ...(active ? { active: name(active) } : {}) };
    }),
  };
}
