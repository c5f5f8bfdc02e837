/**
 * One fit over one dataset (or one group): start values, solver, statistics.
 * Pure apart from the clock: `runFit(fitPlan, data, options)` returns a
 * complete FitResult and never throws for user input - a fit that cannot run
 * has stop code `failed` and says why. Safe to call per group from workers.
 *
 * Method choice (`method auto`): the linear QR solver when the model is
 * linear in its free parameters (compiler test), else Levenberg–Marquardt. A
 * linear solution that violates a bound is re-solved by Levenberg–Marquardt
 * from the clamped point (reported as levenberg_marquardt). A robust loss
 * first solves the squared-loss problem, then hands that estimate to the
 * robust solver.
 */
import type { FitPlan, LossKind } from '../../parser/plan';
import { compileModel, isLinearInParameters, type CompiledModel } from '../compile';
import type { FitResult, FitWarning, StopReason } from '../result';
import { modelProblem, type CancelToken, type SolveOutcome } from '../solve';
import { guessStart } from '../start';
import { errorText, warningText } from '../messages';
import type { FitData } from './fit-data';
import { failedFit } from './fit-result';
import { holdParams } from './expr';
import { freeModel } from './curve';
import { defaultSolvers, type Solvers } from './solvers';
import { fitStatistics } from './fit-stats';

export interface RunFitOptions {
  cancel?: CancelToken;
  /** Solver implementations (default: engine/solve). */
  solvers?: Solvers;
  /** Millisecond clock for `elapsedMs` (default performance.now). */
  clock?: () => number;
  /** Called after each accepted iteration of an iterative solver with the objective (½‖r‖², robust: ½Σc²ρ). */
  onIteration?: (iteration: number, cost: number) => void;
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

function fitCore(fit: FitPlan, data: FitData, solvers: Solvers, watch: Pick<RunFitOptions, 'cancel' | 'onIteration'>, groupWarnings: FitWarning[], elapsed: () => number): FitResult {
  const { expr, free } = freeModel(fit);
  const freePlans = fit.parameters.filter((p) => !p.fixed);
  const n = data.n;
  const model: CompiledModel = compileModel(expr, free, data.modelColumns);
  const lower = Float64Array.from(freePlans, (q) => q.lower ?? -Infinity);
  const upper = Float64Array.from(freePlans, (q) => q.upper ?? Infinity);
  const sqrtW = data.weights ? data.weights.map(Math.sqrt) : null;

  const guess = guessStart({
    model,
    cols: data.columns,
    n,
    y: data.y,
    sqrtW,
    parameters: freePlans.map((q, j) => ({ name: q.name, initial: q.initial, lower: lower[j], upper: upper[j] })),
    isLinearIn: (names) => isLinearInParameters(holdParams(expr, new Set(free.filter((f) => !names.includes(f)))), names),
  });
  const theta0 = guess.theta.map((v, j) => Math.min(upper[j], Math.max(lower[j], v)));

  const problem = modelProblem({ model, columns: data.columns, response: data.y, n, sqrtWeights: sqrtW ?? undefined, lower, upper });
  const solved = solve(fit, model.linear, problem, theta0, lower, upper, solvers, watch);
  if ('error' in solved) return failedFit(fit, data, failedStop(solved.error), groupWarnings, elapsed());
  const stats = fitStatistics({
    fit,
    data,
    problem,
    outcome: solved.outcome,
    linear: model.linear,
    lower,
    upper,
    start: theta0,
    // A direct linear solve does not use starting values, so a guess is not worth a warning there.
    guessed: { names: solved.method === 'linear' ? [] : guess.guessed, how: guess.how },
  });
  return {
    name: fit.name,
    ...(data.group !== undefined ? { group: data.group } : {}),
    method: solved.method,
    options: fit.options,
    loss: fit.options.loss,
    level: fit.options.level,
    stop: solved.outcome.stop,
    iterations: solved.iterations,
    evaluations: solved.evaluations,
    ...stats.fields,
    warnings: [...stats.warnings, ...groupWarnings],
    elapsedMs: elapsed(),
  };
}

type Solved = { outcome: SolveOutcome; method: Exclude<FitPlan['options']['method'], 'auto'>; iterations: number; evaluations: number } | { error: string };

function solve(
  fit: FitPlan,
  linear: boolean,
  problem: ReturnType<typeof modelProblem>,
  theta0: Float64Array,
  lower: Float64Array,
  upper: Float64Array,
  solvers: Solvers,
  watch: Pick<RunFitOptions, 'cancel' | 'onIteration'>,
): Solved {
  const o = fit.options;
  const cancel = watch.cancel;
  const iterative = {
    cancel,
    ...(watch.onIteration ? { onIteration: watch.onIteration } : {}),
    ...(o.maxIterations !== undefined ? { maxIterations: o.maxIterations } : {}),
    ...(o.tolerance !== undefined ? { ftol: o.tolerance, xtol: o.tolerance, gtol: o.tolerance } : {}),
    ...(o.learningRate !== undefined ? { learningRate: o.learningRate } : {}),
  };
  const method = o.method === 'auto' ? (linear ? 'linear' : 'levenberg_marquardt') : o.method;
  if (method === 'linear' && !linear) return { error: errorText.methodNotLinear(fit.name) };

  let outcome: SolveOutcome;
  let used: Exclude<FitPlan['options']['method'], 'auto'> = method;
  let iterations = 0;
  let evaluations = 0;
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
    if (!solvers.gradientDescent) return { error: 'the gradient descent solver is not available in this build' };
    outcome = add(solvers.gradientDescent(problem, theta0, iterative));
  } else {
    outcome = add(solvers.levenbergMarquardt(problem, theta0, iterative));
  }
  const loss: LossKind = o.loss;
  if (loss !== 'squared' && outcome.stop.code !== 'cancelled') {
    if (!solvers.robust) return { error: `the robust solver (loss ${loss}) is not available in this build` };
    const from = outcome.theta.every(Number.isFinite) ? outcome.theta : theta0;
    outcome = add(solvers.robust(problem, from, loss, o.lossScale, iterative));
    if (used === 'linear') used = 'levenberg_marquardt';
  }
  return { outcome, method: used, iterations, evaluations };
}
