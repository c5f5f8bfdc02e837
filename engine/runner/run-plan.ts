/**
 * Executes a checked plan: loads each data source once, runs every fit (once
 * per group for `per COLUMN`), then the queries, derived quantities and expectations, and returns
 * one RunResult. Problems in user input (missing file or column, bad cell,
 * unusable rows) are RunError values with locations; nothing is thrown for them.
 *
 * `runPlan` is asynchronous: it yields to the event loop between fits so a
 * caller can set `cancel.cancelled` (checked between fits and by the solvers
 * once per iteration) and receive `onProgress` events. `runPlanSync` does the
 * same work without yielding. Both produce the same result for the same input
 * (apart from timings and `startedAt`).
 *
 * Per-group fits: `runPlan` may fit the groups of a `per COLUMN` fit on
 * worker threads (engine/groups `fitGroupData`) when there are enough of
 * them to be worth it - the policy and its thresholds are in
 * group-threads.ts; `threads: 1` keeps every group in this thread. Either
 * way the results come in group order (the order of `prepareFitData`), a
 * failing group never stops the others, and estimates are bit-identical;
 * `runPlanSync` always fits in this thread.
 */
import { fitModelText, fitUnits } from '../run/model-text';
import { adjustGroupWarnings } from '../groups/flags';
import { createHash } from 'node:crypto';
import type { FitPlan, Plan } from '../../parser/plan';
import { compileColumnExpr } from '../compile';
import type { FileReader } from '../data';
import { errorText, jointText, runText } from '../messages';
import { isJointFit, runJointFit } from '../run/joint';
import { isJointOverTables, prepareTables } from '../run/joint-tables';
import { fitHasGroups } from '../../parser/plan-expr';
import { RESULT_VERSION, type FitResult, type JointFitResult, type Provenance, type RunError, type RunResult, type ShardFit } from '../result';
import type { CancelToken } from '../solve/problem';
import { loadSources } from '../run/datasets';
import { runDerived } from '../run/derived';
import { checkExpectations, expectationApplies, type QueryNumber } from '../run/expectations';
import { runFit } from '../run/fit';
import { prepareFitData, type FitData } from '../run/fit-data';
import { groupThreads } from '../groups/threads';
import { defaultWorkerFile, fitGroupData, type RunMode } from '../groups/fit-groups';
import { CANCELLED_STOP, fitOneGroup } from '../groups/group-job';
import { sharedStart } from '../groups/starts';
import { queryNumber, runQueries } from '../run/queries';
import type { Solvers } from '../run/solvers';
import { TOOL_NAME, TOOL_VERSION } from '../run/version';
import { shardRanges, type Shard } from '../groups/shards';
import type { SharedStart } from '../groups/starts';
import { planBootstrap, runBootstrapHere, withBootstrap, type PlannedBootstrap } from '../run/bootstrap-fit';
import type { BootstrapChunk } from '../run/bootstrap';
import { bootstrapThreads, runBootstrapInWorkers } from '../groups/bootstrap-threads';
import { derivedIntervals, type RefitContext } from '../run/derived-intervals';
import { createCancelFlag, setCancelled } from '../groups/protocol';
import { withJointBootstrap } from '../run/joint-bootstrap';
import { jointDerivedIntervals, type JointRefit } from '../run/joint-derived';

export interface RunProgress {
  fit: string;
  group?: string;
  /** Fit runs finished so far (1 after the first; groups count one each) and the total known so far. */
  done: number;
  total: number;
}

/** An accepted solver iteration of a fit run in this thread (not of groups fitted on worker threads). */
export interface RunIteration {
  fit: string;
  group?: string;
  /** 1-based, per solver phase (a robust fit restarts the count for its reweighting phase). */
  iteration: number;
  /** The solver's objective after the iteration: ½‖r‖² (robust losses: ½Σc²ρ(rᵢ²/c²)). */
  cost: number;
}

export interface RunOptions {
  /** Folder that data paths are relative to (the spec file's folder). */
  baseDir: string;
  /** The spec text (hashed into the provenance). */
  specText: string;
  specPath?: string;
  /** File reader (default engine/io `readInputSync`: regular files only); files are only read. */
  readFile?: FileReader;
  /** Run only these fits (default all); queries and expectations of other fits are skipped. */
  fits?: string[];
  cancel?: CancelToken;
  onProgress?: (progress: RunProgress) => void;
  /** Each accepted iteration of a fit solved in this thread (long single fits: the editor shows it). */
  onIteration?: (iteration: RunIteration) => void;
  /** Clock for `startedAt` (default `new Date()`). */
  now?: () => Date;
  /** Solver implementations (default engine/solve). Runs with injected solvers fit every group in this thread. */
  solvers?: Solvers;
  /**
   * Threads for the groups of a `per COLUMN` fit (`runPlan` only). Default:
   * automatic (all cores, only for jobs worth it; see group-threads.ts);
   * 1 fits every group in this thread; N ≥ 2 uses N threads whenever a fit
   * has two or more groups.
   */
  threads?: number;
  /**
   * The engine worker bundle for group fits. Default: `worker.js` beside the
   * running bundle (dist/worker.js); null never starts worker threads.
   */
  workerFile?: string | null;
  /** Told how the groups of each per-group fit are fitted (`runPlan` only): on worker threads, or in this thread and why. */
  onGroupMode?: (fit: string, mode: RunMode) => void;
  /** Record each fit's per-iteration solver trace in its result (`FitResult.trace`); the groups of per-group fits are then fitted in this thread. Default false. */
  trace?: boolean;
  /**
   * Run one shard of the work (engine/groups/shards.ts): of each per-group
   * fit only the groups of this shard (their shared start still computed
   * from every group, so each group's result is the one an unsharded run
   * gives), and fits without groups only in shard 1. The result says which
   * in `provenance.shard`; `leastwise gather` joins the shards.
   */
  shard?: Shard;
}

/** Asks the driver of `steps` to fit a fit's groups; it answers with their results, or undefined to let `steps` fit them in order. */
interface GroupBatch {
  fit: FitPlan;
  groups: FitData[];
  /** Fit runs finished before this batch, and the total known so far (for progress). */
  done: number;
  total: number;
  /** The start every group of the fit shares, computed from all of its groups (also those of other shards). */
  shared: SharedStart;
}

/** Asks the driver of `steps` for the bootstrap refits of a single fit (engine/run/bootstrap-fit.ts); undefined lets `steps` compute them in this thread. */
interface BootstrapBatch {
  bootstrap: PlannedBootstrap;
}

function* steps(plan: Plan, opts: RunOptions): Generator<GroupBatch | BootstrapBatch | undefined, RunResult, FitResult[] | BootstrapChunk[] | undefined> {
  const startedAt = (opts.now ?? (() => new Date()))().toISOString();
  const errors: RunError[] = [];
  const wanted = opts.fits ? new Set(opts.fits) : null;
  if (wanted) for (const name of wanted) if (!plan.fits.some((f) => f.name === name)) errors.push({ code: 'unknown_fit', message: errorText.unknownFit(name) });
  const shard = opts.shard;
  // a shard after the first leaves the fits without groups to shard 1
  const fits = plan.fits.filter((f) => (!wanted || wanted.has(f.name)) && !(shard && shard.index > 1 && f.groupBy === undefined));
  const shardFits: ShardFit[] = [];
  const neededSources = new Set(fits.flatMap((f) => f.blocks.map((b) => b.data)));
  const loaded = loadSources(plan.data.filter((d) => neededSources.has(d.name)), opts.baseDir, opts.readFile);
  for (const e of loaded.errors) errors.push(e);

  const results = new Map<string, FitResult[]>();
  const jointFits: JointFitResult[] = [];
  const fitPlans = new Map<string, FitPlan>(fits.map((f) => [f.name, f]));
  const refits = new Map<string, RefitContext>();
  const jointRefits = new Map<string, JointRefit>();
  let done = 0;
  let total = fits.length;
  for (const fit of fits) {
    results.set(fit.name, []);
    if (opts.cancel?.cancelled) {
      errors.push({ code: 'cancelled', message: runText.cancelledBefore(fit.name), range: fit.range, fit: fit.name });
      continue;
    }
    // a fit over several tables: each table one curve, fitted as the groups of a per-group fit (engine/run/joint-tables.ts)
    const tables = fit.blocks.length > 1;
    let fitRun = fit;
    let prepared: { ok: true; data: FitData[] } | { ok: false; errors: RunError[] };
    if (tables && fit.groupBy !== undefined) {
      // (the checker's tables_with_per; kept as a guard for plans written by other tools)
      errors.push({ code: 'not_supported', message: errorText.tablesWithPer(fit.name), range: fit.range, fit: fit.name });
      continue;
    }
    if (tables) {
      const t = prepareTables(fit, loaded, compileColumnExpr);
      if (!t.ok) {
        for (const e of t.errors) errors.push(e);
        continue;
      }
      prepared = t;
      fitRun = t.plan;
    } else {
      const block = fit.blocks[0];
      const src = loaded.tables.get(block.data);
      if (!src) {
        if (!loaded.failed.has(block.data)) errors.push({ code: 'unknown_data', message: errorText.unknownData(fit.name, block.data), range: block.range, fit: fit.name });
        continue;
      }
      try {
        prepared = prepareFitData(fit, src.source, src.table, compileColumnExpr);
      } catch (e) {
        prepared = { ok: false as const, errors: [{ code: 'internal', message: errorText.internal(fit.name, e instanceof Error ? e.message : String(e)), range: fit.range, fit: fit.name }] };
      }
    }
    if (!prepared.ok) {
      for (const e of prepared.errors) errors.push(e);
      continue;
    }
    // groups of a per-group fit share one start and retry from their own data (engine/groups/group-job.ts);
    // the start is computed from every group, also in a shard
    const shared = fit.groupBy !== undefined || tables ? sharedStart(fitRun, prepared.data) : undefined;
    let groups = prepared.data;
    const joint = isJointFit(fit) || (tables && isJointOverTables(fitRun));
    if (joint && shard) {
      errors.push({ code: 'not_supported', message: jointText.sharded(fit.name), range: fit.range, fit: fit.name });
      continue;
    }
    if (shard && fit.groupBy !== undefined) {
      const [from, to] = shardRanges(groups.map((g) => g.n), shard.count)[shard.index - 1];
      shardFits.push({ fit: fit.name, groups: groups.length, from, to });
      groups = groups.slice(from, to);
    }
    total += groups.length - 1;
    if (shared && groups.length > 1) {
      const fitted = (yield { fit: fitRun, groups, done, total, shared }) as FitResult[] | undefined;
      if (fitted) {
        done += groups.length;
        // Groups the cancellation caught before they started are left out, as in the loop below.
        const started = fitted.filter((r) => !isUnstarted(r));
        for (const r of started) results.get(fit.name)!.push(groupBootstrap(fitRun, data0(groups), r));
        const missed = fitted.find(isUnstarted);
        if (missed) errors.push({ code: 'cancelled', message: runText.cancelledBefore(runText.fitLabel(fit.name, missed.group ?? '')), range: fit.range, fit: fit.name });
        else if (joint) jointFits.push(finishJoint(fitRun, groups, results, opts, tables, jointRefits));
        continue;
      }
    }
    for (const data of groups) {
      if (opts.cancel?.cancelled) {
        errors.push({ code: 'cancelled', message: runText.cancelledBefore(runText.fitLabel(fit.name, data.group)), range: fit.range, fit: fit.name });
        break;
      }
      const onIteration = opts.onIteration;
      const watch = onIteration
        ? { onIteration: (iteration: number, cost: number) => onIteration({ fit: fit.name, ...(data.group !== undefined ? { group: data.group } : {}), iteration, cost }) }
        : {};
      const trace = opts.trace ? { trace: true } : {};
      const one = shared
        ? fitOneGroup(fitRun, data, { cancel: opts.cancel, shared, ...(opts.solvers ? { solvers: opts.solvers } : {}), ...watch, ...trace })
        : runFit(fit, data, { cancel: opts.cancel, solvers: opts.solvers, ...watch, ...trace });
      let final = shared ? groupBootstrap(fitRun, data, one) : one;
      if (!shared) {
        // a single fit: its bootstrap (engine/run/bootstrap-fit.ts) and the rows for the intervals of its derived quantities
        const planned = planBootstrap(fit, data, one);
        let draws = null;
        if (planned && 'skipped' in planned) final = { ...one, bootstrap: planned.skipped };
        else if (planned) {
          const answer = (yield { bootstrap: planned }) as BootstrapChunk[] | undefined;
          const done = withBootstrap(one, planned, answer ?? runBootstrapHere(planned.job, opts.cancel));
          final = done.result;
          draws = done.result.bootstrap?.status === 'computed' ? done.draws : null;
        }
        refits.set(fit.name, { fit, data, result: final, draws });
      }
      results.get(fit.name)!.push(final);
      opts.onProgress?.({ fit: fit.name, ...(data.group !== undefined ? { group: data.group } : {}), done: ++done, total });
      yield;
    }
    if (joint && results.get(fit.name)!.length === groups.length && !opts.cancel?.cancelled) jointFits.push(finishJoint(fitRun, groups, results, opts, tables, jointRefits));
  }

  const provenance: Provenance = {
    tool: TOOL_NAME,
    toolVersion: TOOL_VERSION,
    ...(opts.specPath !== undefined ? { specPath: opts.specPath } : {}),
    specSha256: createHash('sha256').update(opts.specText).digest('hex'),
    data: loaded.provenance,
    startedAt,
    ...(shard ? { shard: { index: shard.index, count: shard.count, ...(opts.fits ? { only: [...opts.fits] } : {}), fits: shardFits, fitErrors: errors.length } } : {}),
  };
  const run = finishRun(plan, { fitPlans, results, errors, provenance, refits, ...(jointFits.length ? { joint: jointFits } : {}), ...(jointRefits.size ? { jointRefits } : {}) });
  return jointFits.length ? { ...run, joint: jointFits } : run;
}

/** The joint fit of a fit with shared parameters, from its groups' separate results, which it replaces in `results` (engine/run/joint.ts). */
function finishJoint(fit: FitPlan, groups: FitData[], results: Map<string, FitResult[]>, opts: RunOptions, tables: boolean, jointRefits: Map<string, JointRefit>): JointFitResult {
  const first = runJointFit(fit, groups, results.get(fit.name)!, opts.cancel ? { cancel: opts.cancel } : {});
  // its bootstrap, in this thread (engine/run/joint-bootstrap.ts)
  const { run, bootstrap } = withJointBootstrap(fit, first, opts.cancel);
  results.set(fit.name, run.results);
  const joint = tables ? { ...run.joint, over: 'tables' as const } : run.joint;
  if (run.solved) jointRefits.set(fit.name, { joint, solved: run.solved, bootstrap, asksBootstrap: fit.options.bootstrap !== undefined });
  return joint;
}

/** What the fitting of a run produced, before its queries, derived quantities and expectations. */
export interface FittedRun {
  /** The fits that ran, by name (a fit not here counts as not run: its queries and expectations are skipped). */
  fitPlans: ReadonlyMap<string, FitPlan>;
  /** Each fit's results in plan order (one per group for per-group fits, in group order). */
  results: Map<string, FitResult[]>;
  /** Errors of loading and fitting, in order; the later stages append theirs. */
  errors: RunError[];
  provenance: Provenance;
  /** The single fits with their rows, for the profile and bootstrap intervals of derived quantities (absent: none, e.g. a gathered run). */
  refits?: ReadonlyMap<string, RefitContext>;
  /** The joint fits' solves, for the covariance between groups of a derived quantity that reads several groups (absent: none). */
  joint?: readonly JointFitResult[];
  /** The joint fits' solves and bootstraps, for the profile and bootstrap intervals of their derived quantities (absent: none, e.g. a gathered run). */
  jointRefits?: ReadonlyMap<string, JointRefit>;
}

/**
 * The stages after fitting: queries, derived quantities and expectations of
 * the fits that ran, and the result. Shared by the plan runner and by
 * `leastwise gather`, which joins the fits of a run's shards and finishes
 * them here, so a gathered result is computed as one run's is.
 */
export function finishRun(plan: Plan, run: FittedRun): RunResult {
  const { fitPlans, results, errors } = run;
  for (const [name, list] of results) {
    const fp = fitPlans.get(name);
    if (!fp) continue;
    // per-group fits: their groups' residual warnings decided across the groups (Holm; engine/groups/flags.ts)
    const decided = fitHasGroups(fp) ? adjustGroupWarnings(list) : list;
    // the model equation and the weighting, stated in every view (engine/front/views/summary.ts modelLine)
    const model = fitModelText(fp);
    // the declared units of the response and predictor, for labels (engine/front/views)
    const units = fitUnits(fp, plan.data);
    // (set last, after any earlier one is removed, so a gathered result has the keys in a single run's order)
    results.set(name, decided.map(({ model: _, units: _u, ...r }) => ({ ...r, model, ...(units ? { units } : {}) })));
  }
  const ran = (name: string) => fitPlans.has(name);
  const queries = plan.queries.filter((q) => (q.kind === 'compare' ? q.fits.every(ran) : ran(q.fit)));
  const q = runQueries(queries, { fitPlans: fitPlans as Map<string, FitPlan>, results, ...(run.joint ? { joint: run.joint } : {}) });
  for (const e of q.errors) errors.push(e);
  const plain = runDerived(plan.derived ?? [], results, ran, run.joint ?? [], errors);
  const single = run.refits ? derivedIntervals(plan.derived ?? [], results, plain, run.refits) : plain;
  const derived = run.jointRefits ? jointDerivedIntervals(plan.derived ?? [], results, single, run.jointRefits) : single;
  const queryAt: QueryNumber = (t, r, e) => queryNumber(fitPlans.get(t.fit)!, r, t, e.range);
  const expectations = checkExpectations(plan.expectations.filter((e) => expectationApplies(e, ran, derived)), results, derived, queryAt, errors);
  return {
    version: RESULT_VERSION,
    provenance: run.provenance,
    fits: [...results.values()].flat(),
    queries: q.results,
    derived,
    expectations,
    errors,
  };
}

/** A group of a per-group fit that asks for a bootstrap: the summary saying it is not run for groups (engine/run/bootstrap-fit.ts). */
function groupBootstrap(fit: FitPlan, data: FitData, r: FitResult): FitResult {
  const planned = fit.options.bootstrap ? planBootstrap(fit, { ...data, group: r.group ?? data.group ?? '' }, r) : null;
  return planned && 'skipped' in planned ? { ...r, bootstrap: planned.skipped } : r;
}

const data0 = (groups: readonly FitData[]): FitData => groups[0];

/** A group result standing for a group the cancellation caught before it started (engine/groups `unfittedGroup`). */
function isUnstarted(r: FitResult): boolean {
  return r.stop.code === CANCELLED_STOP.code && r.stop.message === CANCELLED_STOP.message;
}

/** Runs the plan to completion without yielding (every group in this thread). */
export function runPlanSync(plan: Plan, opts: RunOptions): RunResult {
  const it = steps(plan, opts);
  for (;;) {
    const next = it.next(undefined);
    if (next.done) return next.value;
  }
}

/** Fits a batch of groups on worker threads when group-threads.ts says so; undefined leaves them to the sequential loop. */
async function fitBatch(batch: GroupBatch, opts: RunOptions): Promise<FitResult[] | undefined> {
  const rows = batch.groups.reduce((sum, g) => sum + g.n, 0);
  const threads = groupThreads(batch.groups.length, rows, { threads: opts.threads, customSolvers: opts.solvers !== undefined });
  const workerFile = opts.workerFile === undefined ? defaultWorkerFile() : opts.workerFile;
  const why = threads < 2
    ? (opts.solvers ? runText.inProcess.injectedSolvers : opts.threads !== undefined ? runText.inProcess.oneThread : runText.inProcess.smallJob(batch.groups.length, rows, true))
    : workerFile === null ? runText.inProcess.noWorkerBundle : null;
  if (why !== null) {
    opts.onGroupMode?.(batch.fit.name, { kind: 'in_process', reason: why });
    return undefined;
  }
  return fitGroupData(batch.fit, batch.groups, {
    threads,
    shared: batch.shared,
    workerFile,
    // the decision is taken above; fitGroupData still fits in this thread when workers cannot start
    minGroupsForWorkers: 2,
    ...(opts.cancel ? { cancel: opts.cancel } : {}),
    onProgress: (d) => opts.onProgress?.({ fit: batch.fit.name, done: batch.done + d, total: batch.total }),
    onMode: (mode) => opts.onGroupMode?.(batch.fit.name, mode),
  });
}

/** Bootstrap refits on worker threads when engine/groups/bootstrap-threads.ts says so; undefined leaves them to this thread. */
async function bootstrapBatch(batch: BootstrapBatch, opts: RunOptions): Promise<BootstrapChunk[] | undefined> {
  const job = batch.bootstrap.job;
  const threads = opts.solvers ? 1 : bootstrapThreads(job, opts.threads);
  const workerFile = opts.workerFile === undefined ? defaultWorkerFile() : opts.workerFile;
  if (threads < 2 || workerFile === null) return undefined;
  const flag = createCancelFlag();
  const cancel = opts.cancel;
  const watch = cancel ? setInterval(() => { if (cancel.cancelled) setCancelled(flag); }, 50) : null;
  try {
    return await runBootstrapInWorkers(job, threads, workerFile, flag);
  } finally {
    if (watch) clearInterval(watch);
  }
}

/** Runs the plan, yielding to the event loop between fits (see module comment). */
export async function runPlan(plan: Plan, opts: RunOptions): Promise<RunResult> {
  const it = steps(plan, opts);
  let answer: FitResult[] | BootstrapChunk[] | undefined;
  for (;;) {
    const next = it.next(answer);
    answer = undefined;
    if (next.done) return next.value;
    if (next.value && 'bootstrap' in next.value) answer = await bootstrapBatch(next.value, opts);
    else if (next.value) answer = await fitBatch(next.value, opts);
    else await new Promise<void>((resolve) => setImmediate(resolve));
  }
}
