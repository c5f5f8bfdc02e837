import { createHash } from 'node:crypto';
import { readFileSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyze } from '../../parser/index';
import { runPlan, runPlanSync } from '../../engine/runner/run-plan';
import type { RunResult } from '../../engine/result';
import { tempDir, writeCsv } from './helpers';

const spec = `data d = "p.csv"
fit one on d {
  model y = a + b * x
  param a
  param b
}
fit two on d {
  model y = c * x
  param c
}
expect one.b above 0
expect two.c above 0
predict two at x = 2`;

function stripTimes(r: RunResult): unknown {
  return { ...r, provenance: { ...r.provenance, startedAt: '' }, fits: r.fits.map((f) => ({ ...f, elapsedMs: 0 })) };
}

describe('run/run-plan runPlan', () => {
  const dir = tempDir();
  const path = writeCsv(dir, 'p.csv', ['x', 'y'], [[1, 2.1], [2, 3.9], [3, 6.2], [4, 7.8], [5, 10.1]]);
  const { plan } = analyze(spec);

  it('gives the same result synchronously and asynchronously, and never writes the data file', async () => {
    const before = { bytes: readFileSync(path), mtime: statSync(path).mtimeMs };
    const a = await runPlan(plan, { baseDir: dir, specText: spec });
    const b = runPlanSync(plan, { baseDir: dir, specText: spec });
    expect(stripTimes(a)).toEqual(stripTimes(b));
    expect(readFileSync(path).equals(before.bytes)).toBe(true);
    expect(statSync(path).mtimeMs).toBe(before.mtime);
  });

  it('runs only the requested fits and skips queries/expectations of the others', async () => {
    const r = await runPlan(plan, { baseDir: dir, specText: spec, fits: ['one', 'ghost'] });
    expect(r.fits.map((f) => f.name)).toEqual(['one']);
    expect(r.expectations.map((e) => ('fit' in e.expectation.target ? e.expectation.target.fit : ''))).toEqual(['one']);
    expect(r.queries).toEqual([]);
    expect(r.errors.map((e) => e.code)).toEqual(['unknown_fit']);
  });

  it('reports progress per fit and stops when cancelled', async () => {
    const seen: string[] = [];
    const token = { cancelled: false };
    const r = await runPlan(plan, {
      baseDir: dir,
      specText: spec,
      cancel: token,
      onProgress: (p) => {
        seen.push(`${p.fit} ${p.done}/${p.total}`);
        token.cancelled = true;
      },
    });
    expect(seen).toEqual(['one 1/2']);
    expect(r.fits.map((f) => f.name)).toEqual(['one']);
    expect(r.errors.find((e) => e.code === 'cancelled')?.fit).toBe('two');
    expect(r.expectations.find((e) => 'fit' in e.expectation.target && e.expectation.target.fit === 'two')?.passed).toBe(false);
  });

  it('reports the accepted iterations of an iterative fit, with a falling objective', async () => {
    const text = `data d = "decay.csv"
fit d1 on d {
  model y = a * exp(-k * x)
  param a = 1
  param k = 1
}`;
    // y = 5·exp(−0.4x) with a small alternating offset, invented
    writeCsv(dir, 'decay.csv', ['x', 'y'], Array.from({ length: 12 }, (_, i) => [i, 5 * Math.exp(-0.4 * i) + (i % 2 ? 0.01 : -0.01)]));
    const a = analyze(text);
    const seen: { fit: string; iteration: number; cost: number }[] = [];
    const r = runPlanSync(a.plan, { baseDir: dir, specText: text, onIteration: (it) => seen.push(it) });
    const fit = r.fits[0];
    expect(fit.stop.converged).toBe(true);
    expect(seen.length).toBeGreaterThan(1);
    expect(seen.every((s) => s.fit === 'd1')).toBe(true);
    expect(seen.map((s) => s.iteration)).toEqual(seen.map((_, i) => i + 1));
    // Levenberg–Marquardt accepts only steps that lower ½‖r‖² (Moré 1978, common practice)
    for (let i = 1; i < seen.length; i++) expect(seen[i].cost).toBeLessThan(seen[i - 1].cost);
    expect(seen.at(-1)!.iteration).toBeLessThanOrEqual(fit.iterations);
    expect(2 * seen.at(-1)!.cost).toBeCloseTo(fit.goodness.ssr, 12);
  });

  it('reads through an injected reader, relative to baseDir, and records provenance', async () => {
    const asked: string[] = [];
    const r = await runPlan(plan, {
      baseDir: '/virtual',
      specText: spec,
      specPath: '/virtual/s.lsq',
      now: () => new Date('2024-01-02T03:04:05Z'),
      readFile: (p) => {
        asked.push(p);
        return 'x,y\n1,1\n2,2\n3,3.1\n';
      },
    });
    expect(asked).toEqual([join('/virtual', 'p.csv')]);
    expect(r.provenance).toMatchObject({ tool: 'leastwise', specPath: '/virtual/s.lsq', startedAt: '2024-01-02T03:04:05.000Z' });
    // general-purpose check: node:crypto SHA-256 of the same text, computed here
    const sha = createHash('sha256').update('x,y\n1,1\n2,2\n3,3.1\n').digest('hex');
    expect(r.provenance.data).toEqual([{ name: 'd', path: 'p.csv', sha256: sha, rows: 3 }]);
    expect(r.provenance.specSha256).toBe(createHash('sha256').update(spec).digest('hex'));
  });
});
