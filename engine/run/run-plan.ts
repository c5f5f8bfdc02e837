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
 */
import { createHash } from 'node:crypto';
import type { FitPlan, Plan } from '../../parser/plan';
import { compileColumnExpr } from '../compile';
import type { FileReader } from '../data';
import { errorText } from '../messages';
import { RESULT_VERSION, type FitResult, type RunError, type RunResult } from '../result';
import type { CancelToken } from '../solve/problem';
import { loadSources } from './datasets';
import { runDerived } from './derived';
import { checkExpectations, expectationApplies } from './expectations';
import { runFit } from './fit';
import { prepareFitData } from './fit-data';
import { runQueries } from './queries';
import type { Solvers } from './solvers';
import { TOOL_NAME, TOOL_VERSION } from './version';

export interface RunProgress {
  fit: string;
  group?: string;
  /** 0-based index of the finished fit run and the total known so far. */
  done: number;
  total: number;
}

export interface RunOptions {
  /** Folder that data paths are relative to (the spec file's folder). */
  baseDir: string;
  /** The spec text (hashed into the provenance). */
  specText: string;
  specPath?: string;
  /** File reader (default fs.readFileSync); files are only read. */
  readFile?: FileReader;
  /** Run only these fits (default all); queries and expectations of other fits are skipped. */
  fits?: string[];
  cancel?: CancelToken;
  onProgress?: (progress: RunProgress) => void;
  /** Clock for `startedAt` (default `new Date()`). */
  now?: () => Date;
  /** Solver implementations (default engine/solve). */
  solvers?: Solvers;
}

function* steps(plan: Plan, opts: RunOptions): Generator<void, RunResult> {
  const startedAt = (opts.now ?? (() => new Date()))().toISOString();
  const errors: RunError[] = [];
  const wanted = opts.fits ? new Set(opts.fits) : null;
  if (wanted) for (const name of wanted) if (!plan.fits.some((f) => f.name === name)) errors.push({ code: 'unknown_fit', message: errorText.unknownFit(name) });
  const fits = plan.fits.filter((f) => !wanted || wanted.has(f.name));
  const neededSources = new Set(fits.flatMap((f) => f.blocks.map((b) => b.data)));
  const loaded = loadSources(plan.data.filter((d) => neededSources.has(d.name)), opts.baseDir, opts.readFile);
  errors.push(...loaded.errors);

  const results = new Map<string, FitResult[]>();
  const fitPlans = new Map<string, FitPlan>(fits.map((f) => [f.name, f]));
  let done = 0;
  let total = fits.length;
  for (const fit of fits) {
    results.set(fit.name, []);
    if (opts.cancel?.cancelled) {
      errors.push({ code: 'cancelled', message: `run cancelled before fit ${fit.name}`, range: fit.range, fit: fit.name });
      continue;
    }
    if (fit.blocks.length !== 1) {
      errors.push({ code: 'not_supported', message: `fit ${fit.name} has ${fit.blocks.length} data blocks; this version fits one`, range: fit.range, fit: fit.name });
      continue;
    }
    const block = fit.blocks[0];
    const src = loaded.tables.get(block.data);
    if (!src) {
      if (!loaded.failed.has(block.data)) errors.push({ code: 'unknown_data', message: errorText.unknownData(fit.name, block.data), range: block.range, fit: fit.name });
      continue;
    }
    let prepared;
    try {
      prepared = prepareFitData(fit, src.source, src.table, compileColumnExpr);
    } catch (e) {
      prepared = { ok: false as const, errors: [{ code: 'internal', message: errorText.internal(fit.name, e instanceof Error ? e.message : String(e)), range: fit.range, fit: fit.name }] };
    }
    if (!prepared.ok) {
      errors.push(...prepared.errors);
      continue;
    }
    total += prepared.data.length - 1;
    for (const data of prepared.data) {
      if (opts.cancel?.cancelled) {
        errors.push({ code: 'cancelled', message: `run cancelled before fit ${fit.name}${data.group !== undefined ? ` [${data.group}]` : ''}`, range: fit.range, fit: fit.name });
        break;
      }
      results.get(fit.name)!.push(runFit(fit, data, { cancel: opts.cancel, solvers: opts.solvers }));
      opts.onProgress?.({ fit: fit.name, ...(data.group !== undefined ? { group: data.group } : {}), done: ++done, total });
      yield;
    }
  }

  const ran = (name: string) => fitPlans.has(name);
  const queries = plan.queries.filter((q) => (q.kind === 'compare' ? q.fits.every(ran) : ran(q.fit)));
  const q = runQueries(queries, { fitPlans, results });
  errors.push(...q.errors);
  const derived = runDerived(plan.derived ?? [], results, ran);
  const expectations = checkExpectations(plan.expectations.filter((e) => expectationApplies(e, ran, derived)), results, derived);

  return {
    version: RESULT_VERSION,
    provenance: {
      tool: TOOL_NAME,
      toolVersion: TOOL_VERSION,
      ...(opts.specPath !== undefined ? { specPath: opts.specPath } : {}),
      specSha256: createHash('sha256').update(opts.specText).digest('hex'),
      data: loaded.provenance,
      startedAt,
    },
    fits: [...results.values()].flat(),
    queries: q.results,
    derived,
    expectations,
    errors,
  };
}

/** Runs the plan to completion without yielding. */
export function runPlanSync(plan: Plan, opts: RunOptions): RunResult {
  const it = steps(plan, opts);
  for (;;) {
    const next = it.next();
    if (next.done) return next.value;
  }
}

/** Runs the plan, yielding to the event loop between fits (see module comment). */
export async function runPlan(plan: Plan, opts: RunOptions): Promise<RunResult> {
  const it = steps(plan, opts);
  for (;;) {
    const next = it.next();
    if (next.done) return next.value;
    await new Promise<void>((resolve) => setImmediate(resolve));
  }
}
