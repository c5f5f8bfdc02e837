import { adjustGroupWarnings } from '../../engine/groups/flags';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { writeFileSync, rmSync } from 'node:fs';
import path from 'node:path';
import { Worker } from 'node:worker_threads';
import { fitGroupData, fitGroupsParallel, type RunMode } from '../../engine/groups/fit-groups';
import { createCancelFlag, isWorkerResponse, setCancelled, type WorkerRequest, type WorkerResponse } from '../../engine/groups/protocol';
import { prepareFitData, type FitData } from '../../engine/run';
import { runPlanSync } from '../../engine/runner';
import { loadSources } from '../../engine/run/datasets';
import { compileColumnExpr } from '../../engine/compile';
import type { FitResult } from '../../engine/result';
import { buildBundles, removeBuilt, tempDir, type Built } from '../fixtures/built';
import { writeGroupFixture, type GroupFixture } from './groups-fixture';

/** FitResults without the clock-dependent field. */
/**
 * Without the clock and the model text the runner adds (FitResult.model), and with the groups' residual warnings
 * decided across the groups as the runner does after fitting them (engine/groups/flags.ts adjustGroupWarnings;
 * idempotent, so a runner's result is unchanged by it).
 */
const strip = (fits: FitResult[]) => adjustGroupWarnings(fits).map(({ elapsedMs: _e, model: _m, ...rest }) => rest);

/** The IEEE-754 bit patterns of every estimate and standard error, for bit-identity checks. */
function bits(fits: FitResult[]): string[] {
  const values = fits.flatMap((f) => f.parameters.flatMap((p) => [p.estimate, p.stderr ?? NaN]));
  return Array.from(new BigUint64Array(Float64Array.from(values).buffer), (b) => b.toString(16));
}

let built: Built | undefined;
let fx: GroupFixture;
let sequential: FitResult[];
const dirs: string[] = [];

beforeAll(async () => {
  built = await buildBundles();
  const dir = tempDir('leastwise-groups-');
  dirs.push(dir);
  // one group with a single row (fewer rows than the 3 parameters): must fail alone
  fx = writeGroupFixture(dir, { groups: 30, extra: ['Q-lonely,1,2.5'] });
  sequential = runPlanSync(fx.plan, { baseDir: fx.dir, specText: fx.spec }).fits;
});

afterAll(() => {
  removeBuilt(built);
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

/** In process; host thread + one worker; two workers. */
const ways = () => [{ workerFile: null }, { workerFile: built!.worker, hostThread: true }, { workerFile: built!.worker, hostThread: false }];

/** The fixture's groups as the runner splits them. */
function groupData(): FitData[] {
  const fit = fx.plan.fits[0];
  const src = loadSources(fx.plan.data, fx.dir).tables.get('batches')!;
  const prepared = prepareFitData(fit, src.source, src.table, compileColumnExpr);
  if (!prepared.ok) throw new Error('fixture data did not prepare');
  return prepared.data;
}

describe('engine/groups/fit-groups', () => {
  it('builds a real worker bundle to test against', () => {
    expect(built?.worker).toMatch(/worker\.js$/);
  });

  it('fits in process (no worker file) with results identical to the sequential runner', async () => {
    const modes: RunMode[] = [];
    const par = await fitGroupsParallel(fx.plan, 'decay', { baseDir: fx.dir, workerFile: null, onMode: (m) => modes.push(m) });
    expect(modes.map((m) => m.kind)).toEqual(['in_process']);
    expect(par).toHaveLength(31);
    expect(strip(par)).toEqual(strip(sequential));
    expect(bits(par)).toEqual(bits(sequential));
  });

  it('fits on worker threads with bit-identical estimates in the sequential order', async () => {
    for (const hostThread of [true, false]) {
      const modes: RunMode[] = [];
      const par = await fitGroupsParallel(fx.plan, 'decay', { baseDir: fx.dir, workerFile: built!.worker, threads: 2, minGroupsForWorkers: 2, chunkSize: 4, hostThread, onMode: (m) => modes.push(m) });
      expect(modes).toEqual([{ kind: 'workers', threads: hostThread ? 1 : 2, chunkSize: 4, hostThread }]);
      expect(par.map((f) => f.group)).toEqual(sequential.map((f) => f.group));
      expect(bits(par)).toEqual(bits(sequential));
      expect(strip(par)).toEqual(strip(sequential));
    }
  });

  it('orders groups by group value (code-point order for text labels), not by file order', async () => {
    const par = await fitGroupsParallel(fx.plan, 'decay', { baseDir: fx.dir, workerFile: built!.worker, threads: 2, minGroupsForWorkers: 2, chunkSize: 3 });
    const expected = [...new Set([...fx.labels, 'Q-lonely'])].sort();
    expect(par.map((f) => f.group)).toEqual(expected);
    expect(fx.labels).not.toEqual([...fx.labels].sort());
  });

  it('a group with one row fails alone; every other group converges', async () => {
    for (const how of ways()) {
      const par = await fitGroupsParallel(fx.plan, 'decay', { baseDir: fx.dir, ...how, threads: 2, minGroupsForWorkers: 2, chunkSize: 5 });
      const lonely = par.find((f) => f.group === 'Q-lonely')!;
      expect(lonely.stop.code).toBe('failed');
      expect(lonely.stop.message.length).toBeGreaterThan(0);
      const others = par.filter((f) => f.group !== 'Q-lonely');
      expect(others).toHaveLength(30);
      expect(others.every((f) => f.stop.converged)).toBe(true);
    }
  });

  it('a group whose data breaks the fit fails alone, in both modes', async () => {
    const fit = fx.plan.fits[0];
    const groups = groupData();
    // corrupt one group: its column is shorter than its row count, which the compiled model rejects by throwing
    const bad = 7;
    groups[bad] = { ...groups[bad], columns: [groups[bad].columns[0].subarray(0, 2)] };
    for (const how of ways()) {
      const out = await fitGroupData(fit, groups, { ...how, threads: 2, minGroupsForWorkers: 2, chunkSize: 4 });
      expect(out).toHaveLength(groups.length);
      expect(out[bad].stop.code).toBe('failed');
      expect(out[bad].stop.message).toMatch(/shorter/);
      expect(out[bad].group).toBe(groups[bad].group);
      expect(bits(out.filter((_, i) => i !== bad))).toEqual(bits(sequential.filter((_, i) => i !== bad)));
    }
  });

  it('reports progress that never decreases and ends at the group count', async () => {
    for (const how of ways()) {
      const seen: [number, number][] = [];
      await fitGroupsParallel(fx.plan, 'decay', { baseDir: fx.dir, ...how, threads: 2, minGroupsForWorkers: 2, chunkSize: 2, onProgress: (d, t) => seen.push([d, t]) });
      expect(seen.length).toBeGreaterThan(0);
      for (let i = 1; i < seen.length; i++) expect(seen[i][0]).toBeGreaterThanOrEqual(seen[i - 1][0]);
      expect(seen.every(([, t]) => t === 31)).toBe(true);
      expect(seen[seen.length - 1][0]).toBe(31);
    }
  });

  it('cancels: groups not fitted get stop "cancelled", fitted ones are unchanged, one result per group', async () => {
    for (const how of ways()) {
      const token = { cancelled: false };
      const out = await fitGroupsParallel(fx.plan, 'decay', {
        baseDir: fx.dir,
        ...how,
        threads: 2, minGroupsForWorkers: 2,
        chunkSize: 1,
        cancel: token,
        onProgress: (done) => {
          if (done >= 2) token.cancelled = true;
        },
      });
      expect(out.map((f) => f.group)).toEqual(sequential.map((f) => f.group));
      const cancelled = out.filter((f) => f.stop.code === 'cancelled');
      expect(cancelled.length).toBeGreaterThan(0);
      expect(cancelled.every((f) => !f.stop.converged)).toBe(true);
      out.forEach((f, i) => {
        if (f.stop.code !== 'cancelled') expect(bits([f])).toEqual(bits([sequential[i]]));
      });
    }
  });

  it('a token cancelled before the start fits no group', async () => {
    for (const how of ways()) {
      const out = await fitGroupsParallel(fx.plan, 'decay', { baseDir: fx.dir, ...how, threads: 2, minGroupsForWorkers: 2, cancel: { cancelled: true } });
      expect(out).toHaveLength(31);
      expect(out.every((f) => f.stop.code === 'cancelled')).toBe(true);
    }
  });

  it('falls back to fitting in process when the worker file cannot start', async () => {
    const dir = tempDir('leastwise-broken-');
    dirs.push(dir);
    const broken = path.join(dir, 'worker.js');
    writeFileSync(broken, "throw new Error('this worker is broken on purpose');\n");
    const modes: RunMode[] = [];
    const out = await fitGroupsParallel(fx.plan, 'decay', { baseDir: fx.dir, workerFile: broken, threads: 2, minGroupsForWorkers: 2, chunkSize: 4, onMode: (m) => modes.push(m) });
    expect(modes.map((m) => m.kind)).toEqual(['workers', 'in_process']);
    expect(modes[1].kind === 'in_process' && modes[1].reason).toMatch(/broken on purpose/);
    expect(strip(out)).toEqual(strip(sequential));
  });

  it('keeps a small job in this thread unless told otherwise', async () => {
    const modes: RunMode[] = [];
    await fitGroupsParallel(fx.plan, 'decay', { baseDir: fx.dir, workerFile: built!.worker, threads: 2, onMode: (m) => modes.push(m) });
    expect(modes).toEqual([{ kind: 'in_process', reason: 'small job (31 groups, 361 rows)' }]);
  });

  it('a missing data file gives one failed result naming the file', async () => {
    const out = await fitGroupsParallel(fx.plan, 'decay', { baseDir: path.join(fx.dir, 'nowhere'), workerFile: null });
    expect(out).toHaveLength(1);
    expect(out[0].stop.code).toBe('failed');
    expect(out[0].stop.message).toContain('batches.csv');
  });

  it('rejects a fit name that is not in the plan', async () => {
    await expect(fitGroupsParallel(fx.plan, 'nope', { baseDir: fx.dir })).rejects.toThrow(/no fit named nope/);
  });
});

describe('engine/worker', () => {
  function ask(request: WorkerRequest): Promise<WorkerResponse[]> {
    return new Promise((resolve, reject) => {
      const worker = new Worker(built!.worker);
      const got: WorkerResponse[] = [];
      worker.on('message', (m: unknown) => {
        if (!isWorkerResponse(m)) return;
        got.push(m);
        if (m.kind !== 'progress' && m.kind !== 'iteration') {
          void worker.terminate();
          resolve(got);
        }
      });
      worker.on('error', reject);
      worker.postMessage(request);
    });
  }

  it('serves runPlan: the same fits as the sequential runner', async () => {
    const got = await ask({ kind: 'runPlan', id: 5, plan: fx.plan, options: { baseDir: fx.dir, specText: fx.spec }, cancelFlag: createCancelFlag() });
    const last = got[got.length - 1];
    expect(last.kind).toBe('runPlanDone');
    expect(got.every((m) => m.id === 5)).toBe(true);
    // the fits this job solved itself report iterations (throttled: the first of a job at once)
    expect(got.some((m) => m.kind === 'iteration')).toBe(true);
    if (last.kind !== 'runPlanDone') return;
    expect(strip(last.result.fits)).toEqual(strip(sequential));
  });

  it('serves fitGroups: one result per group sent, in order', async () => {
    const groups = groupData().slice(3, 9);
    const got = await ask({ kind: 'fitGroups', id: 9, fit: fx.plan.fits[0], groups, cancelFlag: null });
    const last = got[got.length - 1];
    expect(last.kind).toBe('groupsDone');
    if (last.kind !== 'groupsDone') return;
    expect(last.results.map((r) => r.group)).toEqual(groups.map((g) => g.group));
    expect(bits(last.results)).toEqual(bits(sequential.slice(3, 9)));
  });

  it('reads the shared cancel flag set by the host thread', async () => {
    const flag = createCancelFlag();
    setCancelled(flag);
    const got = await ask({ kind: 'fitGroups', id: 4, fit: fx.plan.fits[0], groups: groupData().slice(0, 3), cancelFlag: flag });
    const last = got[got.length - 1];
    expect(last.kind).toBe('groupsDone');
    if (last.kind !== 'groupsDone') return;
    expect(last.results.map((r) => r.stop.code)).toEqual(['cancelled', 'cancelled', 'cancelled']);
  });

  it('answers a malformed message with an error, not a crash', async () => {
    const got = await ask({ kind: 'fitGroups', id: 3 } as unknown as WorkerRequest);
    expect(got[got.length - 1]).toMatchObject({ kind: 'error', id: 3 });
  });
});
