/**
 * The fit runner against the real engine worker (engine/worker.ts bundled
 * here like build.mjs does): a sample spec runs to a result, an
 * already-cancelled run ends as cancelled, and a missing worker file is a
 * crash value, not an exception.
 */
import { build } from 'esbuild';
import { mkdirSync, readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import { analyze, hasErrors } from '../../parser';
import { readHeaderFile } from '../../engine/data';
import { runInWorker } from '../../extension/fit/runner';

const ROOT = resolve(__dirname, '..', '..');
const OUT = join(ROOT, 'test', 'artifacts', 'extension', 'worker-build');
const WORKER = join(OUT, 'worker.js');
const SPEC = join(ROOT, 'samples', 'cooling', 'cooling.lsq');

function job() {
  const text = readFileSync(SPEC, 'utf8');
  const a = analyze(text, { headers: (_n, p) => readHeaderFile(join(dirname(SPEC), p))?.headers });
  expect(hasErrors(a.diagnostics)).toBe(false);
  return { plan: a.plan, options: { baseDir: dirname(SPEC), specText: text, specPath: SPEC } };
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
    expect(outcome.kind).toBe('cancelled');
  });

  it('turns a missing worker script into a crash value', async () => {
    const outcome = await runInWorker(join(OUT, 'no-such-worker.js'), job(), never);
    expect(outcome.kind).toBe('crashed');
  });
});
