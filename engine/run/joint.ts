/**
 * Joint fits: a `per COLUMN` fit with parameters marked `shared` is one
 * least-squares problem over all its groups - the shared parameters take one
 * value for every group, the others one per group - solved by the block
 * Levenberg–Marquardt of engine/solve/block-lm.ts, whose cost is linear in
 * the number of groups.
 *
 * Starts: the groups are first fitted separately (the runner's per-group
 * machinery, with its shared start and retries); a shared parameter starts at
 * the median of its converged separate estimates, a group's own parameters at
 * its separate estimates (the median of the converged groups' when its own
 * fit did not converge). Groups with fewer usable rows than per-group free
 * parameters cannot determine their own parameters and are left out (named
 * in `leftOut`, their separate result kept).
 *
 * Statistics: s² = SSR/dof with dof = n − (pₛ + G·p_l) (1 with absolute
 * sigma); standard errors and Student-t intervals from the exact joint
 * covariance s²(JᵀJ)⁻¹ (engine/solve/block-covariance.ts). Each group's
 * FitResult carries its points, residual tests and goodness of fit computed
 * on its own rows, and its parameters' standard errors, intervals,
 * covariance, correlation and bands from the joint covariance; per-point
 * influence (leverage needs the joint hat matrix) and the warnings computed
 * from a group's own Jacobian (correlation, conditioning, rank, few degrees
 * of freedom) are left out of the groups: the joint fit's own checks stand
 * for them. Only the squared loss is supported (checked by the parser).
 */
import type { FitPlan } from '../../parser/plan';
import { compileModel } from '../compile';
import type { FitResult, FitWarning, JointEstimate, JointFitResult, StopReason } from '../result';
import { modelProblem } from '../solve/model-problem';
import type { LeastSquaresProblem } from '../solve/problem';
import type { SolveOutcome } from '../solve/types';
import { solveBlockLM, type BlockOutcome, type BlockProblem } from '../solve/block-lm';
import { blockCovariance, type BlockCovariance } from '../solve/block-covariance';
import { factorCovariance, bandsOver } from '../stats/bands';
import { tCritical } from '../stats/distributions';
import type { CancelToken } from '../solve/problem';
import { buildCurve, freeModel } from './curve';
import type { FitData } from './fit-data';
import { fitStatistics } from './fit-stats';
import { expandMatrix } from './fit-result';
import { jointText } from '../messages';
import { compareGroups } from './joint-compare';
import { jointProfiles } from './joint-intervals';
import { jointGroupStatistics, jointLackOfFit } from './joint-group-stats';
import { jointLeverages } from './joint-leverage';
import type { JointProfileContext } from './joint-profile';

export function isJointFit(fit: FitPlan): boolean {
  return fit.groupBy !== undefined && fit.parameters.some((p) => p.acrossGroups === 'shared' && !p.fixed);
}

/** The parts of a joint problem: which free parameters are shared, the groups in it, their compiled problems. */
export interface JointSetup {
  fit: FitPlan;
  free: string[];
  /** Indices into `free` of the shared parameters and of the per-group ones. */
  sharedIdx: number[];
  localIdx: number[];
  data: FitData[];
  problems: LeastSquaresProblem[];
  lower: Float64Array;
  upper: Float64Array;
}

export function jointSetup(fit: FitPlan, data: FitData[], sharedNames: ReadonlySet<string>): JointSetup {
  const { expr, free } = freeModel(fit);
  const freePlans = fit.parameters.filter((q) => !q.fixed);
  const lower = Float64Array.from(freePlans, (q) => q.lower ?? -Infinity);
  const upper = Float64Array.from(freePlans, (q) => q.upper ?? Infinity);
  const sharedIdx = free.map((_, j) => j).filter((j) => sharedNames.has(free[j]));
  const localIdx = free.map((_, j) => j).filter((j) => !sharedNames.has(free[j]));
  const model = data.length ? compileModel(expr, free, data[0].modelColumns) : null;
  const problems = data.map((d) => modelProblem({ model: model!, columns: d.columns, response: d.y, n: d.n, ...(d.weights ? { sqrtWeights: d.weights.map(Math.sqrt) } : {}), lower, upper }));
  return { fit, free, sharedIdx, localIdx, data, problems, lower, upper };
}

/** The block problem of a setup (engine/solve/block-lm.ts): each group's full parameter vector assembled from the shared and its own values. */
export function blockProblem(s: JointSetup): BlockProblem {
  const p = s.free.length;
  const ps = s.sharedIdx.length;
  const pl = s.localIdx.length;
  const theta = new Float64Array(p);
  const jacs = s.problems.map((pr) => new Float64Array(pr.n * p));
  return {
    groups: s.data.length,
    shared: ps,
    local: pl,
    rows: (g) => s.data[g].n,
    evaluate(g, shared, own, r, jac) {
      s.sharedIdx.forEach((j, k) => (theta[j] = shared[k]));
      s.localIdx.forEach((j, k) => (theta[j] = own[k]));
      const pr = s.problems[g];
      if (!jac) {
        pr.residuals(theta, r);
        return;
      }
      const J = jacs[g];
      pr.residualsAndJacobian!(theta, r, J);
      const n = pr.n;
      s.sharedIdx.forEach((j, k) => jac.a.set(J.subarray(j * n, (j + 1) * n), k * n));
      s.localIdx.forEach((j, k) => jac.b.set(J.subarray(j * n, (j + 1) * n), k * n));
    },
    sharedLower: Float64Array.from(s.sharedIdx, (j) => s.lower[j]),
    sharedUpper: Float64Array.from(s.sharedIdx, (j) => s.upper[j]),
    localLower: Float64Array.from(s.localIdx, (j) => s.lower[j]),
    localUpper: Float64Array.from(s.localIdx, (j) => s.upper[j]),
  };
}

export interface JointSolved {
  setup: JointSetup;
  outcome: BlockOutcome;
  cov: BlockCovariance;
  n: number;
  dof: number;
  ssr: number;
}

/** Solves a setup from the given starts (shared values, then each group's own, concatenated). */
export function solveJoint(setup: JointSetup, shared0: Float64Array, local0: Float64Array, options: { cancel?: CancelToken; maxIterations?: number; tolerance?: number }): JointSolved {
  const problem = blockProblem(setup);
  const tol = options.tolerance;
  const outcome = solveBlockLM(problem, shared0, local0, {
    ...(options.cancel ? { cancel: options.cancel } : {}),
    ...(options.maxIterations !== undefined ? { maxIterations: options.maxIterations } : {}),
    ...(tol !== undefined ? { reductionTolerance: tol, stepTolerance: tol, gradientTolerance: tol } : {}),
  });
  const cov = blockCovariance(outcome.triangles, problem.shared, problem.local, outcome.columnNorms);
  const n = setup.data.reduce((a, d) => a + d.n, 0);
  const p = problem.shared + problem.groups * problem.local;
  return { setup, outcome, cov, n, dof: n - p, ssr: 2 * outcome.cost };
}

function median(values: number[]): number {
  const v = values.filter(Number.isFinite).sort((a, b) => a - b);
  if (!v.length) return NaN;
  const m = v.length >> 1;
  return v.length % 2 ? v[m] : 0.5 * (v[m - 1] + v[m]);
}

export interface JointRun {
  /** One result per group of the fit, in group order (left-out groups: their separate result). */
  results: FitResult[];
  joint: JointFitResult;
  /** The solve, s² and the groups kept (indices into the data given), for the bootstrap and the derived quantities' intervals (engine/run/joint-intervals.ts). */
  solved?: { solved: JointSolved; s2: number; ok: boolean; keep: number[]; profile: JointProfileContext | null };
}

/**
 * The joint fit of `fit` over `data` (its groups, in group order), started
 * from the groups' separate results `separate` (same order).
 */
export function runJointFit(fit: FitPlan, data: FitData[], separate: FitResult[], options: { cancel?: CancelToken; clock?: () => number } = {}): JointRun {
  const clock = options.clock ?? (() => performance.now());
  const t0 = clock();
  const sharedNames = new Set(fit.parameters.filter((q) => q.acrossGroups === 'shared' && !q.fixed).map((q) => q.name));
  const probe = jointSetup(fit, [], sharedNames);
  const pl = probe.localIdx.length;
  const leftOut: JointFitResult['leftOut'] = [];
  const keep: number[] = [];
  data.forEach((d, g) => {
    if (d.n < Math.max(1, pl)) leftOut.push({ group: d.group ?? '', reason: jointText.tooFewRows(d.n, pl) });
    else keep.push(g);
  });
  const setup = jointSetup(fit, keep.map((g) => data[g]), sharedNames);
  const est = (r: FitResult, name: string) => r.parameters.find((q) => q.name === name)?.estimate ?? NaN;
  const converged = keep.map((g) => separate[g]).filter((r) => r && r.stop.converged);
  const free = setup.free;
  const shared0 = Float64Array.from(setup.sharedIdx, (j) => {
    const m = median(converged.map((r) => est(r, free[j])));
    const given = fit.parameters.find((q) => q.name === free[j])?.initial;
    return Number.isFinite(m) ? m : given ?? median(keep.map((g) => est(separate[g], free[j])));
  });
  const localMedians = setup.localIdx.map((j) => median(converged.map((r) => est(r, free[j]))));
  const local0 = new Float64Array(keep.length * pl);
  keep.forEach((g, k) => {
    const r = separate[g];
    setup.localIdx.forEach((j, m) => {
      const own = r && r.stop.converged ? est(r, free[j]) : NaN;
      local0[k * pl + m] = Number.isFinite(own) ? own : localMedians[m];
    });
  });
  const opts = { ...(options.cancel ? { cancel: options.cancel } : {}), ...(fit.options.maxIterations !== undefined ? { maxIterations: fit.options.maxIterations } : {}), ...(fit.options.tolerance !== undefined ? { tolerance: fit.options.tolerance } : {}) };
  const noStart = !shared0.every(Number.isFinite) || !local0.every(Number.isFinite) || keep.length === 0;
  const solved = noStart ? null : solveJoint(setup, shared0, local0, opts);

  const sigmaAbsolute = data[0]?.sigmaAbsolute ?? false;
  const stop: StopReason = solved ? solved.outcome.stop : { code: 'failed', message: keep.length === 0 ? jointText.noGroups : jointText.noStart, converged: false };
  const dof = solved ? solved.dof : NaN;
  const s2 = solved ? (sigmaAbsolute ? 1 : solved.ssr / dof) : NaN;
  const ok = solved !== null && stop.converged && dof > 0;
  const t = ok ? tCritical(fit.options.level, dof) : NaN;
  const ps = setup.sharedIdx.length;
  const estimates: JointEstimate[] = setup.sharedIdx.map((j, k) => {
    const v = solved ? solved.outcome.shared[k] : NaN;
    const se = ok ? Math.sqrt(s2 * solved!.cov.shared[k * ps + k]) : NaN;
    const unit = fit.parameters.find((q) => q.name === free[j])?.unit;
    return {
      name: free[j], estimate: v,
      stderr: Number.isFinite(se) ? se : null,
      lower: Number.isFinite(se) ? v - t * se : null,
      upper: Number.isFinite(se) ? v + t * se : null,
      ...(unit !== undefined ? { unit } : {}),
    };
  });

  const results = separate.slice();
  if (solved) keep.forEach((g, k) => (results[g] = groupResult(solved, k, s2, ok, stop, clock() - t0)));
  // each group's statistics made consistent with the joint fit: pooled s, its share of the parameters (engine/run/joint-group-stats.ts)
  const leverages = solved && ok ? jointLeverages(solved) : null;
  const lackOfFit = solved && ok ? jointLackOfFit(solved, setup.problems.map((_, k) => groupResiduals(solved, k))) : null;
  if (solved && leverages) keep.forEach((g, k) => (results[g] = jointGroupStatistics(solved, k, results[g], leverages[k], s2, ok, lackOfFit)));
  // profile-likelihood intervals over the joint problem (engine/run/joint-intervals.ts)
  const profiled = solved ? jointProfiles(fit, solved, keep.map((g) => results[g]), estimates, s2, ok, options.cancel) : null;
  if (profiled) keep.forEach((g, k) => (results[g] = profiled.results[k]));
  const comparisons = solved && ok ? compareGroups(solved, separate, keep, s2, opts) : { sharedVsSeparate: null, perParameter: [], pairs: [] };
  const joint: JointFitResult = {
    fit: fit.name,
    groupBy: fit.groupBy ?? '',
    shared: setup.sharedIdx.map((j) => free[j]),
    perGroup: setup.localIdx.map((j) => free[j]),
    groups: keep.map((g) => data[g].group ?? ''),
    leftOut,
    stop,
    iterations: solved?.outcome.iterations ?? 0,
    evaluations: solved?.outcome.evaluations ?? 0,
    n: solved?.n ?? 0,
    p: ps + keep.length * pl,
    dof,
    ssr: solved?.ssr ?? NaN,
    rmse: ok ? Math.sqrt(solved!.ssr / dof) : NaN,
    level: fit.options.level,
    sigmaAbsolute,
    estimates: profiled ? profiled.estimates : estimates,
    ...comparisons,
    cross: { scale: ok ? s2 : NaN, x: solved ? solved.cov.groups.map((c) => Array.from(c.x)) : [] },
    ...(lackOfFit ? { lackOfFit } : {}),
    elapsedMs: clock() - t0,
  };
  return { results, joint, ...(solved ? { solved: { solved, s2, ok, keep, profile: profiled?.context ?? null } } : {}) };
}

/** The residuals of group k's problem (weighted) at the joint solution. */
function groupResiduals(solved: JointSolved, k: number): Float64Array {
  const { setup, outcome } = solved;
  const pl = setup.localIdx.length;
  const theta = new Float64Array(setup.free.length);
  setup.sharedIdx.forEach((j, m) => (theta[j] = outcome.shared[m]));
  setup.localIdx.forEach((j, m) => (theta[j] = outcome.local[k * pl + m]));
  const r = new Float64Array(setup.data[k].n);
  setup.problems[k].residuals(theta, r);
  return r;
}

/** Warnings computed from a group's own Jacobian, which the joint covariance replaces (module comment). */
const GROUP_ONLY: ReadonlySet<string> = new Set(['high_correlation', 'ill_conditioned', 'rank_deficient', 'few_dof', 'exact_point', 'high_leverage', 'influential_point', 'outlier', 'guessed_start', 'lower_minimum', 'retried_start']);

/** Group k's FitResult from the joint solution (module comment). */
function groupResult(solved: JointSolved, k: number, s2: number, ok: boolean, stop: StopReason, elapsedMs: number): FitResult {
  const { setup, outcome, cov } = solved;
  const { fit, free, sharedIdx, localIdx } = setup;
  const data = setup.data[k];
  const problem = setup.problems[k];
  const p = free.length;
  const ps = sharedIdx.length;
  const pl = localIdx.length;
  const theta = new Float64Array(p);
  sharedIdx.forEach((j, m) => (theta[j] = outcome.shared[m]));
  localIdx.forEach((j, m) => (theta[j] = outcome.local[k * pl + m]));
  const r = new Float64Array(data.n);
  const jac = new Float64Array(data.n * p);
  problem.residualsAndJacobian!(theta, r, jac);
  let ss = 0;
  for (const v of r) ss += v * v;
  const groupStop: StopReason = { ...stop, message: jointText.groupStop(stop.message) };
  const solveOutcome: SolveOutcome = { theta, residuals: r, jacobian: jac, cost: 0.5 * ss, stop: groupStop, iterations: outcome.iterations, evaluations: outcome.evaluations, jacobianEvaluations: outcome.iterations };
  const stats = fitStatistics({ fit, data, problem, outcome: solveOutcome, linear: false, lower: setup.lower, upper: setup.upper, start: theta, guessed: { names: [], how: '' } });
  // the joint covariance of this group's parameters, in free order
  const q = ps + pl;
  const pos = free.map((_, j) => (sharedIdx.includes(j) ? sharedIdx.indexOf(j) : ps + localIdx.indexOf(j)));
  const block = cov.groups[k];
  const covFree = new Float64Array(p * p);
  for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) covFree[i * p + j] = ok && block.determined ? s2 * block.cov[pos[i] * q + pos[j]] : NaN;
  const factored = factorCovariance(covFree, p);
  const t = ok ? tCritical(fit.options.level, solved.dof) : NaN;
  const freeIndex = new Map(free.map((name, j) => [name, j]));
  const parameters = stats.fields.parameters.map((row) => {
    const j = freeIndex.get(row.name);
    if (j === undefined || row.fixed) return row;
    const se = factored.se[j];
    const good = Number.isFinite(se);
    return { ...row, stderr: good ? se : null, lower: good ? row.estimate - t * se : null, upper: good ? row.estimate + t * se : null, relativeStderr: good && row.estimate !== 0 ? Math.abs(se / row.estimate) : null };
  });
  let bands = stats.fields.bands;
  if (bands && data.x && data.predictor && ok) {
    let min = Infinity;
    let max = -Infinity;
    for (const v of data.x) {
      min = Math.min(min, v);
      max = Math.max(max, v);
    }
    const curve = buildCurve({ fit, predictor: data.predictor, estimates: theta, cov: factored, dof: solved.dof, level: fit.options.level, rmse: Math.sqrt(s2), sigmaAbsolute: data.sigmaAbsolute });
    bands = bandsOver(min, max, curve.modelAt, curve.cov, curve.t, curve.newSd);
  } else if (!ok) bands = null;
  const warnings: FitWarning[] = stats.warnings.filter((w) => !GROUP_ONLY.has(w.code));
  const nan = Number.NaN;
  const withoutInfluence = { ...stats.fields.points, leverage: stats.fields.points.leverage.map(() => nan), cooksDistance: stats.fields.points.cooksDistance.map(() => nan), ...(stats.fields.points.deletedStudentized ? { deletedStudentized: stats.fields.points.deletedStudentized.map(() => nan) } : {}), studentized: stats.fields.points.studentized.map(() => nan) };
  const { influence: _influence, ...fields } = stats.fields;
  void _influence;
  return {
    name: fit.name,
    ...(data.group !== undefined ? { group: data.group } : {}),
    method: 'levenberg_marquardt',
    options: fit.options,
    loss: fit.options.loss,
    level: fit.options.level,
    stop: groupStop,
    iterations: outcome.iterations,
    evaluations: outcome.evaluations,
    ...fields,
    points: withoutInfluence,
    parameters,
    covariance: expandMatrix(fit, covFree, 0),
    correlation: expandMatrix(fit, factored.corr, NaN),
    bands,
    warnings,
    elapsedMs,
  };
}
