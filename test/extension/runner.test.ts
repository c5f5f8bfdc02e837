/**
 * The fit runner against the real engine worker (engine/worker.ts bundled
 * here like build.mjs does): a sample spec runs to a result, an
 * already-cancelled run ends as cancelled, a run cancelled while it fits
 * stops through the shared flag (the solver sees it and answers), a worker
 * that never answers is terminated after the grace period, and a missing
 * worker file is a crash value, not an exception.
 *
 * The long jobs are gradient descent with a large iteration limit: about
 * 20 s (per-group job) and several minutes (single fit) on this machine if
 * nothing stopped them; each is cancelled on its first progress or iteration
 * message, i.e. while it runs. The graces given are far above the time the
 * flag needs (one solver iteration), so `how` tells which mechanism ended the
 * run, not how fast.
 */
import { build } from 'esbuild';
import { mkdirSync, mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { analyze, hasErrors } from '../../parser';
import { readHeaderFile } from '../../engine/data';
import { runInWorker, type CancelSignal } from '../../extension/fit/runner';
import type { RunIteration } from '../../engine/runner';
import { writeSlowJob } from '../fixtures/slow-job.cjs';

const ROOT = resolve(__dirname, '..', '..');
const OUT = join(ROOT, 'test', 'artifacts', 'extension', 'worker-build');
const WORKER = join(OUT, 'worker.js');
const SPEC = join(ROOT, 'samples', 'cooling', 'cooling.lsq');

function job(spec = SPEC) {
  const text = readFileSync(spec, 'utf8');
  const a = analyze(text, { headers: (_n, p) => readHeaderFile(join(dirname(spec), p))?.headers });
  expect(hasErrors(a.diagnostics)).toBe(false);
  return { plan: a.plan, options: { baseDir: dirname(spec), specText: text, specPath: spec } };
}

/** A cancel source the test fires itself (vscode.CancellationTokenSource's shape). */
function cancelSource(): CancelSignal & { cancel(): void } {
  const listeners: (() => void)[] = [];
  let requested = false;
  return {
    get isCancellationRequested() {
      return requested;
    },
    onCancellationRequested(l) {
      listeners.push(l);
      return { dispose() {} };
    },
    cancel() {
      if (requested) return;
      requested = true;
      for (const l of listeners) l();
    },
  };
}

/** The slow gradient-descent job of test/fixtures/slow-job.cjs in a fresh temporary folder; returns the spec path. */
function slowSpec(batches: number, perBatch: boolean): string {
  const dir = mkdtempSync(join(tmpdir(), 'leastwise-cancel-'));
  return writeSlowJob(dir, { batches, iterations: perBatch ? 50000 : 100000000, perBatch, specName: perBatch ? 'per-batch.lsq' : 'single.lsq' });
}

const never = { isCancellationRequested: false, onCancellationRequested: () => ({ dispose() {} }) };
const already = { isCancellationRequested: true, onCancellationRequested: () => ({ dispose() {} }) };

describe('extension/fit/runner', () => {
  beforeAll(async () => {
    mkdirSync(OUT, { recursive: true });
    await build({ entryPoints: { worker: join(ROOT, 'engine', 'worker.ts') }, outdir: OUT, bundle: true, platform: 'node', target: 'node20', format: 'cjs', mainFields: ['module', 'main'], logLevel: 'warning' });
  });

  it('runs a sample spec in the worker and reports progress', async () => {
    const progress: [number, number][] = [];
    const outcome = await runInWorker(WORKER, { ...job(), onProgress: (d, t) => progress.push([d, t]) }, never);
    expect(outcome.kind).toBe('done');
    if (outcome.kind !== 'done') return;
    expect(outcome.result.fits.map((f) => f.name)).toEqual(['newton']);
    expect(outcome.result.fits[0].stop.converged).toBe(true);
    expect(progress.length).toBeGreaterThan(0);
    expect(progress.at(-1)![0]).toBe(progress.at(-1)![1]);
  });

  it('ends a run cancelled before it started as cancelled', async () => {
    const outcome = await runInWorker(WORKER, job(), already);
    expect(outcome.kind === 'cancelled' && outcome.how).toBe('stopped');
  });

  it('stops a per-group run cancelled after its first group through the shared flag', async () => {
    const spec = slowSpec(200, true);
    const source = cancelSource();
    const progress: [number, number][] = [];
    const outcome = await runInWorker(
      WORKER,
      {
        ...job(spec),
        graceMs: 60_000,
        onProgress: (d, t) => {
          progress.push([d, t]);
          if (d >= 1) source.cancel();
        },
      },
      source,
    );
    expect(outcome.kind === 'cancelled' && outcome.how).toBe('stopped');
    if (outcome.kind !== 'cancelled' || outcome.how !== 'stopped') return;
    expect(progress[0]).toEqual([1, 200]);
    // Groups fitted before the flag keep their results; the run names where the cancel caught it
    // (engine/runner/run-plan.ts leaves out the groups not started).
    const fitted = outcome.partial.fits;
    expect(fitted.length).toBeGreaterThan(0);
    expect(fitted.length).toBeLessThan(200);
    expect(outcome.partial.errors.some((e) => e.code === 'cancelled' && e.fit === 'decay')).toBe(true);
  });

  it('reports the iterations of a single long fit and stops it inside the solver when cancelled', async () => {
    const spec = slowSpec(2000, false); // 120,000 rows by gradient descent: minutes if nothing stopped it
    const source = cancelSource();
    const seen: RunIteration[] = [];
    // cancel at the first iteration message: the solver is running
    const outcome = await runInWorker(WORKER, { ...job(spec), graceMs: 60_000, onIteration: (it) => { seen.push(it); source.cancel(); } }, source);
    expect(seen.length).toBeGreaterThan(0);
    expect(seen[0].fit).toBe('decay');
    expect(seen[0].iteration).toBeGreaterThan(0);
    expect(Number.isFinite(seen[0].cost)).toBe(true);
    expect(outcome.kind === 'cancelled' && outcome.how).toBe('stopped');
    if (outcome.kind !== 'cancelled' || outcome.how !== 'stopped') return;
    const [fit] = outcome.partial.fits;
    expect(fit.stop.code).toBe('cancelled');
    expect(fit.stop.converged).toBe(false);
    expect(fit.iterations).toBeGreaterThanOrEqual(seen[0].iteration);
  });

  it('terminates a worker that does not answer a cancel within the grace period', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'leastwise-deaf-'));
    const deaf = join(dir, 'deaf-worker.js');
    // A worker that takes the request and never answers (a solver stuck outside its iteration loop).
    writeFileSync(deaf, "require('node:worker_threads').parentPort.on('message', () => {});\n");
    const source = cancelSource();
    const pending = runInWorker(deaf, { ...job(), graceMs: 50 }, source);
    source.cancel();
    expect(await pending).toEqual({ kind: 'cancelled', how: 'terminated' });
  });

  it('turns a missing worker script into a crash value', async () => {
    const outcome = await runInWorker(join(OUT, 'no-such-worker.js'), job(), never);
    expect(outcome.kind).toBe('crashed');
  });
});
