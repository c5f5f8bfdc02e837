/**
 * Starts and retries of per-group fits (engine/groups/starts.ts,
 * engine/groups/group-job.ts): the shared start of each kind, a group that
 * fails from the shared start and is fitted again from its own data, the
 * retry record, the warning and the group summary counts; the runner's
 * sequential loop and the parallel entry give the same results.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { rmSync } from 'node:fs';
import { analyze } from '../../parser/index';
import { prepareFitData, type FitData } from '../../engine/run';
import { runPlanSync } from '../../engine/runner';
import { loadSources } from '../../engine/run/datasets';
import { compileColumnExpr } from '../../engine/compile';
import { sharedStart } from '../../engine/groups/starts';
import { fitGroupData } from '../../engine/groups/fit-groups';
import { buildGroupTable } from '../../engine/groups/table';
import { groupCountLine } from '../../engine/front/views/groups';
import { writeGroupFixture } from './groups-fixture';
import { tempDir as makeTemp } from '../fixtures/built';

const dirs: string[] = [];
const tempDir = (prefix: string) => {
  const d = makeTemp(prefix);
  dirs.push(d);
  return d;
};
afterAll(() => {
  for (const d of dirs) rmSync(d, { recursive: true, force: true });
});

function prepared(dir: string, spec: string) {
  const a = analyze(spec);
  expect(a.diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
  const src = loadSources(a.plan.data, dir).tables.get('batches')!;
  const p = prepareFitData(a.plan.fits[0], src.source, src.table, compileColumnExpr);
  if (!p.ok) throw new Error('fixture data did not prepare');
  return { plan: a.plan, fit: a.plan.fits[0], groups: p.data as FitData[] };
}

const body = (model: string, params: string[]) => ['data batches = "batches.csv"', 'fit decay on batches {', `  model ${model}`, ...params.map((p) => `  ${p}`), '  per batch', '}', ''].join('\n');

describe('engine/groups/starts', () => {
  const dir = tempDir('leastwise-starts-');
  writeGroupFixture(dir, { groups: 12 });

  it('keeps given starts, computes template shapes per group, and pools the rest', () => {
    const given = prepared(dir, body('y = amp * exp(-k * t) + base', ['param amp = 4', 'param k = 0.3', 'param base = 0']));
    expect(sharedStart(given.fit, given.groups)).toEqual({ kind: 'given' });
    const shape = prepared(dir, body('y = amp * exp(-k * t) + base', ['param amp', 'param k', 'param base']));
    expect(sharedStart(shape.fit, shape.groups)).toEqual({ kind: 'per_group', family: 'exponential with offset' });
    const other = prepared(dir, body('y = amp * exp(-k * t) + base + q * t^2', ['param amp', 'param k in [0, 10]', 'param base', 'param q']));
    const s = sharedStart(other.fit, other.groups);
    expect(s.kind).toBe('pooled');
    if (s.kind !== 'pooled') return;
    expect(s.theta).toHaveLength(4);
    expect(s.theta.every(Number.isFinite)).toBe(true);
    expect(s.how).toContain('on the rows of all 12 groups pooled');
    // the fixture's rates are 0.15 … 0.45: the pooled start is of that order
    expect(s.theta[1]).toBeGreaterThan(0.03);
    expect(s.theta[1]).toBeLessThan(3);
    const run = runPlanSync(other.plan, { baseDir: dir, specText: '' }).fits;
    expect(run.every((f) => f.stop.converged)).toBe(true);
    expect(run[0].parameters.every((p) => p.start === 'guessed')).toBe(true);
    expect(run[0].warnings.find((w) => w.code === 'guessed_start')?.message).toContain('pooled');
  });

  it('retries a group that fails from the shared start from its own data, and counts it', async () => {
    // k = -80 makes exp(-k·t) overflow at t = 9: residuals at the start are not finite in every group
    const bad = prepared(dir, body('y = amp * exp(-k * t) + base', ['param amp = 4', 'param k = -80', 'param base = 0']));
    const seq = runPlanSync(bad.plan, { baseDir: dir, specText: '' }).fits;
    expect(seq).toHaveLength(12);
    for (const f of seq) {
      expect(f.stop.converged, f.stop.message).toBe(true);
      expect(f.retry?.first.converged).toBe(false);
      expect(f.retry?.from).toBe('own_start');
      expect(f.warnings[0].code).toBe('retried_start');
      expect(f.warnings[0].message).toContain('which converged');
      expect(f.parameters[1].estimate).toBeGreaterThan(0.1);
    }
    const table = buildGroupTable(seq);
    expect(table.summary.retried).toBe(12);
    expect(table.summary.recovered).toBe(12);
    expect(groupCountLine(table)).toContain('12 retried from their own starting values (12 of them converged).');
    // the parallel entry (in this thread here) gives the same numbers
    const par = await fitGroupData(bad.fit, bad.groups, { threads: 1, workerFile: null });
    expect(par.map((f) => f.parameters.map((p) => p.estimate))).toEqual(seq.map((f) => f.parameters.map((p) => p.estimate)));
    expect(par.map((f) => f.retry)).toEqual(seq.map((f) => f.retry));
  });

  it('does not retry a group with fewer rows than parameters', () => {
    const d = tempDir('leastwise-starts-');
    writeGroupFixture(d, { groups: 3, extra: ['Z-short,1,2.5'] });
    const p = prepared(d, body('y = amp * exp(-k * t) + base', ['param amp = 4', 'param k = 0.3', 'param base = 0']));
    const fits = runPlanSync(p.plan, { baseDir: d, specText: '' }).fits;
    const short = fits.find((f) => f.group === 'Z-short')!;
    expect(short.stop.code).toBe('failed');
    expect(short.retry).toBeUndefined();
  });
});
