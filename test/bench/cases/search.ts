/**
 * (12) The multi-start search (engine/solve/start/explore.ts): time of a fit
 * with no start values (data-driven start + search) against the same fit
 * from good given starts (no search), on invented problems - two Gaussian
 * peaks on a decaying baseline (n = 250, 5 nonlinear parameters), a
 * 4-parameter logistic with zero-dose wells (n = 36), and a 4-parameter
 * logistic with 1e5 points. Goal: without starts the fit reaches at least
 * the minimum of the given starts (SSR not above it by more than 1 ppm).
 *
 * Would worker threads pay? The part of the search that could run on other
 * threads is the partial solves from the design points; it is measured as
 * the time of the default search minus a search with no design points
 * (`explore 1`: the start and one point). Against it: the start-up of one
 * engine worker (dist/worker.js) answering a tiny job. On c cores the
 * partial phase would shrink at best by (1 − 1/c); it pays when that saving
 * exceeds the start-up.
 */
import { performance } from 'node:perf_hooks';
import { Worker } from 'node:worker_threads';
import os from 'node:os';
import { runFit } from '../../../engine/run';
import { defaultWorkerFile } from '../../../engine/groups/fit-groups';
import { measure } from '../harness';
import { fitData, modelSpec } from '../data';
import { gaussian, rng } from '../../fixtures/random';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

interface Problem {
  name: string;
  model: string;
  free: string[];
  given: string[];
  x: Float64Array;
  y: Float64Array;
}

function problems(quick: boolean): Problem[] {
  const g = gaussian(rng(41));
  const x1 = Float64Array.from({ length: 250 }, (_, i) => 1 + i);
  const peaks = x1.map((x) => 100 * Math.exp(-0.01 * x) + 90 * Math.exp(-((x - 110) ** 2) / 20 ** 2) + 70 * Math.exp(-((x - 150) ** 2) / 18 ** 2) + 2 * g());
  const doses = [0, 0, 0, 0.1, 0.3, 1, 3, 10, 30, 100, 300, 1000].flatMap((d) => [d, d, d]);
  const x2 = Float64Array.from(doses);
  const l4 = (d: number) => 95 + (5 - 95) / (1 + (d / 12) ** 1.1);
  const y2 = x2.map((d) => l4(d) + 2 * g());
  const big = quick ? 5_000 : 100_000;
  const x3 = Float64Array.from({ length: big }, (_, i) => 10 ** (-2 + (5 * i) / big));
  const y3 = x3.map((d) => l4(d) + 2 * g());
  const L4 = 'top + (bottom - top) / (1 + (x / ec50)^hill)';
  return [
    { name: 'two peaks, n = 250', model: 'b1 * exp(-b2 * x) + b3 * exp(-(x - b4)^2 / b5^2) + b6 * exp(-(x - b7)^2 / b8^2)', free: ['b1', 'b2', 'b3', 'b4', 'b5', 'b6', 'b7', 'b8'].map((p) => p), given: ['b1 = 100', 'b2 = 0.01', 'b3 = 90', 'b4 = 110', 'b5 = 20', 'b6 = 70', 'b7 = 150', 'b8 = 18'], x: x1, y: peaks },
    { name: '4PL with zero doses, n = 36', model: L4, free: ['top', 'bottom', 'ec50 in [0, inf]', 'hill'], given: ['top = 90', 'bottom = 10', 'ec50 = 10 in [0, inf]', 'hill = 1'], x: x2, y: y2 },
    { name: `4PL, n = ${fmt(big, 2)}`, model: L4, free: ['top', 'bottom', 'ec50 in [0, inf]', 'hill'], given: ['top = 90', 'bottom = 10', 'ec50 = 10 in [0, inf]', 'hill = 1'], x: x3, y: y3 },
  ];
}

/** Milliseconds until one engine worker started and answered a one-group job. */
async function workerStartMs(file: string): Promise<number> {
  const spec = modelSpec('a + b * x', ['a', 'b'], ['per g']);
  const data = fitData(spec.fit, ['x'], [Float64Array.of(1, 2, 3)], Float64Array.of(2, 4, 6.1), 'g1');
  const t0 = performance.now();
  const w = new Worker(file);
  await new Promise<void>((resolve, reject) => {
    w.on('message', (m: { kind: string }) => (m.kind === 'groupsDone' ? resolve() : undefined));
    w.on('error', reject);
    w.postMessage({ kind: 'fitGroups', id: 1, fit: spec.fit, groups: [data], cancelFlag: null });
  });
  const ms = performance.now() - t0;
  await w.terminate();
  return ms;
}

export async function benchSearch(ctx: BenchContext): Promise<BenchRow> {
  const runs = ctx.quick ? 1 : 5;
  const rows: Record<string, unknown>[] = [];
  const shares: { partialMs: number; totalMs: number }[] = [];
  const texts: string[] = [];
  let worst = 0;
  let maxPartial = 0;
  let bestShare = 0;
  let reached = true;
  for (const p of problems(ctx.quick)) {
    const auto = modelSpec(p.model, p.free.map((f) => f));
    const one = modelSpec(p.model, p.free, ['explore 1']);
    const given = modelSpec(p.model, p.given);
    const data = (s: typeof auto) => fitData(s.fit, ['x'], [p.x], p.y);
    let last = runFit(auto.fit, data(auto));
    let fromGiven = runFit(given.fit, data(given));
    const tAuto = await measure(() => (last = runFit(auto.fit, data(auto))), runs, 0);
    const tOne = await measure(() => runFit(one.fit, data(one)), runs, 0);
    const tGiven = await measure(() => (fromGiven = runFit(given.fit, data(given))), runs, 0);
    if (!(last.stop.converged && last.goodness.ssr <= fromGiven.goodness.ssr * (1 + 1e-6))) reached = false;
    const partialMs = Math.max(0, tAuto.median - tOne.median);
    maxPartial = Math.max(maxPartial, partialMs);
    shares.push({ partialMs, totalMs: tAuto.median });
    const ratio = tAuto.median / tGiven.median;
    worst = Math.max(worst, tAuto.median);
    const s = last.search;
    texts.push(`${p.name}: ${fmt(tAuto.median)} ms with search (${s?.points ?? 0} points, ${s?.minima.length ?? 0} minima) vs ${fmt(tGiven.median)} ms from given starts (×${fmt(ratio)}); design phase ${fmt(partialMs)} ms`);
    rows.push({ problem: p.name, autoMs: tAuto, exploreOneMs: tOne, givenMs: tGiven, partialMs, ratio, points: s?.points, minima: s?.minima.length, ssrSearch: last.goodness.ssr, converged: last.stop.converged });
  }
  const file = defaultWorkerFile();
  const startMs = file ? (await measure(() => workerStartMs(file), ctx.quick ? 1 : 3, 0)).median : NaN;
  const cores = os.availableParallelism();
  // best case on c cores: the design phase shrinks by (1 − 1/c), minus one worker start-up
  for (const s of shares) bestShare = Math.max(bestShare, (s.partialMs * (1 - 1 / cores) - startMs) / s.totalMs);
  const pays = Number.isFinite(startMs) && bestShare > 0;
  texts.push(`one engine worker starts and answers in ${fmt(startMs)} ms; on ${cores} cores threads could save at most ${fmt(Math.max(0, bestShare) * 100, 2)} % of a search here (largest design phase ${fmt(maxPartial)} ms)`);
  return {
    id: 12,
    name: 'Multi-start search: fits without start values vs from given starts',
    value: worst,
    unit: 'ms (slowest search)',
    spread: null,
    text: texts.join('; '),
    goal: 'no-start fit reaches the given-start minimum',
    met: reached,
    details: { problems: rows, workerStartMs: startMs, cores, bestThreadSaving: bestShare, threadsCouldSave: pays },
    ...(file === null ? { note: 'no dist/worker.js beside the script: worker start-up not measured' } : {}),
  };
}
