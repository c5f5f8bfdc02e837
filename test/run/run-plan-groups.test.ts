/**
 * The plan runner on per-group fits (`per COLUMN`): worker threads against
 * the sequential loop on a generated many-group CSV in a temp folder, with a
 * group that fails (one usable row after `NaN` cells) and groups without or
 * with few degrees of freedom, plus the thread policy (group-threads.ts).
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { rmSync } from 'node:fs';
import { runPlan, runPlanSync, type RunOptions } from '../../engine/runner/run-plan';
import { AUTO_GROUPS_ALONE, AUTO_MIN_GROUPS, AUTO_MIN_ROWS, groupThreads } from '../../engine/groups/threads';
import type { RunMode } from '../../engine/groups/fit-groups';
import type { FitResult, RunResult } from '../../engine/result';
import { defaultSolvers } from '../../engine/run/solvers';
import { buildBundles, removeBuilt, tempDir, type Built } from '../fixtures/built';
import { writeGroupFixture, type GroupFixture } from '../groups/groups-fixture';

/** IEEE-754 bit patterns of every estimate and standard error, in result order. */
function bits(fits: FitResult[]): string[] {
  const values = fits.flatMap((f) => f.parameters.flatMap((p) => [p.estimate, p.stderr ?? NaN]));
  return Array.from(new BigUint64Array(Float64Array.from(values).buffer), (b) => b.toString(16));
}

/** The result without clock-dependent fields. */
const timeless = (r: RunResult) => ({ ...r, provenance: { ...r.provenance, startedAt: '' }, fits: r.fits.map((f) => ({ ...f, elapsedMs: 0 })) });

let built: Built | undefined;
let fx: GroupFixture;
let sequential: RunResult;
const dirs: string[] = [];
const options = (extra: Partial<RunOptions> = {}): RunOptions => ({ baseDir: fx.dir, specText: fx.spec, now: () => new Date(0), ...extra });

beforeAll(async () => {
  built = await buildBundles();
  const dir = tempDir('leastwise-run-groups-');
  dirs.push(dir);
  fx = writeGroupFixture(dir, {
    groups: 40,
    extra: [
      // 'Z-nan': NaN cells leave one usable row for 3 parameters: fails alone
      'Z-nan,0,NaN', 'Z-nan,1,NaN', 'Z-nan,2,3.1', 'Z-nan,3,NaN',
      // 'Y-three': as many rows as parameters; 'X-five': 2 degrees of freedom
      'Y-three,0,4.5', 'Y-three,2,3.1', 'Y-three,4,2.4',
      'X-five,0,4.4', 'X-five,1,3.6', 'X-five,2,3.0', 'X-five,3,2.6', 'X-five,4,2.3',
    ],
  });
  sequential = await runPlan(fx.plan, options({ threads: 1 }));
});

afterAll(() => {
  removeBuilt(built);
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

describe('run/run-plan per-group fits', () => {
  it('fits every group in order with threads: 1, the failing group alone failed', () => {
    expect(sequential.fits).toHaveLength(43);
    expect(sequential.errors).toEqual([]);
    const groups = sequential.fits.map((f) => f.group!);
    expect(groups).toEqual([...groups].sort());
    const failed = sequential.fits.filter((f) => f.stop.code === 'failed');
    expect(failed.map((f) => f.group)).toEqual(['Z-nan']);
    expect(failed[0].stop.message).toMatch(/1 usable row/);
    expect(sequential.fits.filter((f) => f.group !== 'Z-nan').every((f) => f.stop.converged)).toBe(true);
  });

  it('gives bit-identical results on worker threads, in the same order', async () => {
    const modes: RunMode[] = [];
    const parallel = await runPlan(fx.plan, options({ threads: 2, workerFile: built!.worker, onGroupMode: (_fit, m) => modes.push(m) }));
    expect(modes.map((m) => m.kind)).toEqual(['workers']);
    expect(parallel.fits.map((f) => f.group)).toEqual(sequential.fits.map((f) => f.group));
    expect(bits(parallel.fits)).toEqual(bits(sequential.fits));
    expect(timeless(parallel)).toEqual(timeless(sequential));
  });

  it('runPlanSync and the automatic mode (43 small groups stay in this thread) give the same result', async () => {
    const modes: RunMode[] = [];
    const auto = await runPlan(fx.plan, options({ workerFile: built!.worker, onGroupMode: (_fit, m) => modes.push(m) }));
    expect(modes).toHaveLength(1);
    expect(modes[0].kind === 'in_process' && modes[0].reason).toMatch(/^small job \(43 groups, \d+ rows\)/);
    expect(timeless(auto)).toEqual(timeless(sequential));
    expect(timeless(runPlanSync(fx.plan, options()))).toEqual(timeless(sequential));
  });

  it('stays in this thread for threads: 1, workerFile: null and injected solvers', async () => {
    const reasons: string[] = [];
    const record = (_fit: string, m: RunMode) => reasons.push(m.kind === 'in_process' ? m.reason : 'workers');
    await runPlan(fx.plan, options({ threads: 1, workerFile: built!.worker, onGroupMode: record }));
    await runPlan(fx.plan, options({ threads: 2, workerFile: null, onGroupMode: record }));
    const injected = await runPlan(fx.plan, options({ threads: 2, workerFile: built!.worker, solvers: defaultSolvers, onGroupMode: record }));
    expect(reasons).toEqual(['one thread asked for', 'no worker bundle beside this program', 'injected solvers']);
    expect(bits(injected.fits)).toEqual(bits(sequential.fits));
  });

  it('reports progress on worker threads that never decreases and ends at the number of groups', async () => {
    const seen: number[] = [];
    await runPlan(fx.plan, options({ threads: 2, workerFile: built!.worker, onProgress: (p) => seen.push(p.done) }));
    expect(seen.length).toBeGreaterThan(0);
    for (let i = 1; i < seen.length; i++) expect(seen[i]).toBeGreaterThanOrEqual(seen[i - 1]);
    expect(seen[seen.length - 1]).toBe(43);
  });

  it('on cancellation leaves out the groups not started and says so, like the sequential loop', async () => {
    for (const threads of [1, 2]) {
      const token = { cancelled: false };
      const r = await runPlan(fx.plan, options({ threads, workerFile: built!.worker, cancel: token, onProgress: (p) => { if (p.done >= 3) token.cancelled = true; } }));
      expect(r.fits.length).toBeLessThan(43);
      expect(r.errors.map((e) => e.code)).toEqual(['cancelled']);
      expect(r.errors[0].message).toMatch(/^run cancelled before fit decay \[/);
      for (const f of r.fits) {
        const same = sequential.fits.find((s) => s.group === f.group)!;
        // a group stopped by the cancellation inside its solver may differ; finished ones are unchanged
        if (f.stop.code !== 'cancelled') expect(bits([f])).toEqual(bits([same]));
      }
    }
  });
});

describe('run/group-threads', () => {
  it('follows the documented automatic thresholds', () => {
    const cores = 8;
    expect(groupThreads(AUTO_MIN_GROUPS - 1, 10 * AUTO_MIN_ROWS, { cores })).toBe(1);
    expect(groupThreads(AUTO_MIN_GROUPS, AUTO_MIN_ROWS - 1, { cores })).toBe(1);
    expect(groupThreads(AUTO_MIN_GROUPS, AUTO_MIN_ROWS, { cores })).toBe(cores);
    expect(groupThreads(AUTO_GROUPS_ALONE, 100, { cores })).toBe(cores);
    expect(groupThreads(AUTO_GROUPS_ALONE, 100, { cores: 1 })).toBe(1);
  });

  it('obeys threads asked for, except with one group or injected solvers', () => {
    expect(groupThreads(2, 10, { threads: 3, cores: 1 })).toBe(3);
    expect(groupThreads(500, 1e6, { threads: 1 })).toBe(1);
    expect(groupThreads(1, 1e6, { threads: 4 })).toBe(1);
    expect(groupThreads(500, 1e6, { threads: 4, customSolvers: true })).toBe(1);
    expect(groupThreads(500, 1e6, { threads: 0 })).toBe(1);
  });
});
