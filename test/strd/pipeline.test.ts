import { describe, it, expect, beforeAll, afterAll } from 'vitest';
import { requireInCi } from '../fixtures/required';
import { strdDir, strdAvailable, readStrd, type StrdDataset } from './read-strd';
import { NLS_ORDER, LLS_ORDER, TARGETS } from './run-strd';
import { NONLINEAR_MODELS } from './models';
import { runViaSpec, makeWorkDir, specText, pipelineTable, type PipelineRow } from './pipeline';

const dir = strdDir();
const available = requireInCi('NIST StRD data', strdAvailable(dir), `STRD_DIR=${dir}`);

let work: ReturnType<typeof makeWorkDir> | null = null;
const rows: PipelineRow[] = [];
const cache = new Map<string, StrdDataset>();
const dataset = (kind: 'nls' | 'lls', name: string): StrdDataset => {
  if (!cache.has(name)) cache.set(name, readStrd(kind, name, dir));
  return cache.get(name)!;
};

beforeAll(() => {
  if (available) work = makeWorkDir();
});
afterAll(() => {
  work?.dispose();
  if (process.env.STRD_TABLE && rows.length) console.log(`\nNIST StRD via spec (parser -> engine)\n${pipelineTable(rows)}\n* Lanczos1 floor rule (run-strd.ts)\n`);
});

/** Checks common to every case: the spec checks clean, the run has no errors, all rows were fitted. */
function expectCleanRun(row: PipelineRow, ds: StrdDataset): NonNullable<PipelineRow['fit']> {
  expect(row.diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
  expect(row.runErrors).toEqual([]);
  expect(row.fit).not.toBeNull();
  const fit = row.fit!;
  expect(fit.goodness.n).toBe(ds.n);
  expect(fit.parameters.map((q) => q.name)).toEqual(ds.parameters.map((q) => q.name));
  return fit;
}

describe.skipIf(!available)('test/strd/pipeline: NIST StRD nonlinear through .lsq spec, analyze and runPlan (both starts)', () => {
  for (const name of NLS_ORDER) {
    for (const start of [1, 2] as const) {
      it(`NIST StRD ${name} start ${start} via spec`, async () => {
        const ds = dataset('nls', name);
        const row = await runViaSpec(ds, start, work!.dir);
        rows.push(row);
        const fit = expectCleanRun(row, ds);
        expect(fit.method).toBe('levenberg_marquardt');
        expect(fit.stop.converged).toBe(true);
        // The spec's start values reached the solver unchanged (no guess, no clamping).
        expect(fit.parameters.map((q) => q.start)).toEqual(ds.parameters.map(() => 'given'));
        expect(fit.parameters.map((q) => q.initial)).toEqual(ds.parameters.map((q) => q.starts![start - 1]));
        // The CSV carried the response exactly (NIST StRD data block).
        if (!NONLINEAR_MODELS[name].response) expect(fit.points.y).toEqual(Array.from(ds.data[0]));
        expect(row.minLreParams).toBeGreaterThanOrEqual(TARGETS.nls.params);
        expect(row.minLreSE).toBeGreaterThanOrEqual(TARGETS.nls.se);
        expect(row.lreRSS).toBeGreaterThanOrEqual(TARGETS.nls.rss);
      });
    }
  }
});

describe.skipIf(!available)('test/strd/pipeline: NIST StRD linear through .lsq spec, analyze and runPlan', () => {
  for (const name of LLS_ORDER) {
    it(`NIST StRD ${name} via spec`, async () => {
      const ds = dataset('lls', name);
      const row = await runViaSpec(ds, null, work!.dir);
      rows.push(row);
      const fit = expectCleanRun(row, ds);
      // `method auto` picks the direct QR solve for a model linear in its parameters.
      expect(fit.method).toBe('linear');
      expect(fit.stop.code).toBe('exact');
      expect(fit.points.y).toEqual(Array.from(ds.data[0]));
      expect(row.minLreParams).toBeGreaterThanOrEqual(TARGETS.lls.params);
      expect(row.minLreSE).toBeGreaterThanOrEqual(TARGETS.lls.se);
      expect(row.lreRSS).toBeGreaterThanOrEqual(TARGETS.lls.rss);
    });
  }
});

describe.skipIf(!available)('test/strd/pipeline: generated specs', () => {
  it('NIST StRD Nelson: the spec fits ln(y), as the certified model states', () => {
    const text = specText(dataset('nls', 'Nelson'), 1, 'Nelson.csv');
    expect(text).toMatch(/^\s*model ln\(y\) = b1 - b2\*x1 \* exp\(-b3\*x2\)$/m);
  });
  it('NIST StRD Bennett5 start 1: one param line per parameter with the NIST start', () => {
    const ds = dataset('nls', 'Bennett5');
    const params = specText(ds, 1, 'Bennett5.csv').split('\n').filter((l) => /^\s*param /.test(l));
    expect(params).toEqual(['  param b1 = -2000', '  param b2 = 50', '  param b3 = 0.8']);
  });
  it('NIST StRD NoInt1: the spec model has no intercept; Longley has 6 predictors', () => {
    expect(specText(dataset('lls', 'NoInt1'), null, 'NoInt1.csv')).toMatch(/^\s*model y = B1\*x$/m);
    expect(specText(dataset('lls', 'Longley'), null, 'Longley.csv')).toMatch(/^\s*model y = B0 \+ B1\*x1 \+ B2\*x2 \+ B3\*x3 \+ B4\*x4 \+ B5\*x5 \+ B6\*x6$/m);
  });
});
