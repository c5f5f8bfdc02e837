import { describe, expect, it } from 'vitest';
import { normals, runSpec, tempDir, writeCsv } from './helpers';
import { NESTING_TOLERANCE } from '../../engine/run/nesting';
import { comparisonBlock } from '../../engine/front/views/comparison';
import { fUpper } from '../../engine/stats/distributions';
import type { QueryResult, RunResult } from '../../engine/result';
import Ajv from 'ajv';
import schema from '../../engine/result.schema.json';
import { resultToJsonValue } from '../../engine/run/json';

const validate = new Ajv().compile(schema);

type Comparison = Extract<QueryResult, { kind: 'compare' }>;
const comparison = (r: RunResult): Comparison => r.queries.find((q): q is Comparison => q.kind === 'compare')!;

/** Invented decay readings: `n` times from `lo` to `hi`, signal = curve(t) + sd·noise. */
function decayCsv(dir: string, curve: (t: number) => number, n: number, lo: number, hi: number, sd: number, seed: number): void {
  const z = normals(seed, n);
  const rows = Array.from({ length: n }, (_, i) => {
    const t = lo + ((hi - lo) * i) / (n - 1);
    return [t.toFixed(4), (curve(t) + sd * z[i]).toFixed(6)];
  });
  writeCsv(dir, 'decay.csv', ['t_h', 'signal'], rows);
}

const POWER = ['fit power on d {', '  model signal = a * t_h^b', '  param a = 3', '  param b = -0.5', '}'];
const STRETCHED = ['fit stretched on d {', '  model signal = a * exp(-(t_h/c)^k)', '  param a = 5', '  param c = 2 in [1, 100]', '  param k = 0.5', '}'];

describe('run/nesting and run/compare-query', () => {
  it('regression: a power law against a stretched exponential (2 and 3 parameters, not nested) gets no F test, never a negative F', async () => {
    // the shape of the reported case: 39 points, F(1, 36) printed as −35.57 with p = 1 when nesting was read off the counts
    const dir = tempDir();
    decayCsv(dir, (t) => 3 * t ** -0.4, 39, 1, 8, 0.01, 3);
    const { result } = await runSpec(['data d = "decay.csv"', ...POWER, ...STRETCHED, 'compare power, stretched'].join('\n'), dir);
    const q = comparison(result);
    expect(q.rows.map((r) => r.p)).toEqual([2, 3]);
    expect(q.rows[1].ssr).toBeGreaterThan(q.rows[0].ssr); // the situation that gave F < 0
    expect(q.fTest).toBeUndefined();
    expect(q.nesting).toMatchObject({ simpler: 'power', richer: 'stretched', status: 'not_nested', tolerance: NESTING_TOLERANCE });
    expect(q.nesting!.distance!).toBeGreaterThan(1e-3); // measured ≈ 0.019: far above the tolerance
    expect(q.noFTest).toMatch(/^No nested test: the two models are not nested/);
    const block = comparisonBlock(q);
    expect(block.lead.join(' ')).not.toMatch(/F\(/);
    expect(block.lead).toContain(q.noFTest);
    // declared nested anyway: the richer fit ends above the simpler one, so F would be negative: refused with the reason
    const declared = await runSpec(['data d = "decay.csv"', ...POWER, ...STRETCHED, 'compare power within stretched'].join('\n'), dir);
    const d = comparison(declared.result);
    expect(d.fTest).toBeUndefined();
    expect(d.nesting?.status).toBe('declared');
    expect(d.nesting?.detail).toMatch(/as the spec declares .*power is not a special case of stretched/);
    expect(d.noFTest).toMatch(/stretched ends with a larger residual sum of squares than power/);
    for (const r of [result, declared.result]) expect(validate(resultToJsonValue(r)), JSON.stringify(validate.errors)).toBe(true);
  });

  it('nested pairs are established (line in quadratic, exponential in exponential with offset, Michaelis–Menten in Hill) and F is the by-hand value from the two SSRs', async () => {
    const dir = tempDir();
    const z = normals(11, 30);
    writeCsv(dir, 'k.csv', ['x', 'y'], Array.from({ length: 30 }, (_, i) => {
      const x = 0.2 + 0.3 * i;
      return [x.toFixed(3), (4 * Math.exp(-0.5 * x) + 0.3 + 0.02 * z[i]).toFixed(6)];
    }));
    writeCsv(dir, 'mm.csv', ['x', 'y'], Array.from({ length: 30 }, (_, i) => {
      const x = 0.2 + 0.3 * i;
      return [x.toFixed(3), (4 * x / (1.5 + x) + 0.02 * z[i]).toFixed(6)];
    }));
    const pairs: [string, string, string][] = [
      ['model y = a + b * x\n  param a = 1\n  param b = 0', 'model y = a + b * x + c * x^2\n  param a = 1\n  param b = 0\n  param c = 0', 'k.csv'],
      ['model y = a * exp(-k * x)\n  param a = 4\n  param k = 0.4', 'model y = a * exp(-k * x) + c\n  param a = 4\n  param k = 0.4\n  param c = 0', 'k.csv'],
      ['model y = v * x / (m + x)\n  param v = 1\n  param m = 1', 'model y = v * x^h / (m^h + x^h)\n  param v = 1\n  param m = 1\n  param h = 1', 'mm.csv'],
    ];
    for (const [simple, rich, file] of pairs) {
      const spec = [`data d = "${file}"`, `fit s on d {\n  ${simple}\n}`, `fit r on d {\n  ${rich}\n}`, 'compare s, r'].join('\n');
      const q = comparison((await runSpec(spec, dir)).result);
      expect(q.nesting?.status, simple).toBe('established');
      expect(q.nesting!.distance!).toBeLessThan(1e-9); // measured: converged reproductions reach rounding level
      const [s, r] = q.rows;
      // Draper & Smith 1998, extra sum of squares: F = ((SSR₁ − SSR₂)/(p₂ − p₁)) / (SSR₂/(n − p₂)), by hand from the rows
      const f = (s.ssr - r.ssr) / (r.p - s.p) / (r.ssr / (r.n - r.p));
      expect(q.fTest!.f).toBeCloseTo(f, 10);
      expect([q.fTest!.df1, q.fTest!.df2]).toEqual([r.p - s.p, r.n - r.p]);
      expect(q.fTest!.pValue).toBe(fUpper(f, r.p - s.p, r.n - r.p));
      expect(q.fTest!.f).toBeGreaterThanOrEqual(0);
    }
  });

  it('a fit that did not converge is left out of the ranking and marked with its reason; the others are still ranked', async () => {
    const dir = tempDir();
    decayCsv(dir, (t) => 5 * Math.exp(-0.3 * t), 20, 0, 10, 0.02, 5);
    const spec = [
      'data d = "decay.csv"',
      'fit one on d {', '  model signal = a * exp(-k * t_h)', '  param a = 4', '  param k = 0.2', '}',
      'fit two on d {', '  model signal = a * exp(-k * t_h) + c', '  param a = 4', '  param k = 0.2', '  param c = 0', '}',
      'fit short on d {', '  model signal = a * exp(-(t_h/c)^k)', '  param a = 1', '  param c = 50', '  param k = 3', '  iterations 1', '  explore 0', '}',
      'compare one, two, short',
    ].join('\n');
    const { result } = await runSpec(spec, dir);
    const q = comparison(result);
    expect(q.withheld).toBeUndefined();
    expect(q.rows.map((r) => r.fit)).toEqual(['one', 'two']);
    expect(q.rows.reduce((a, r) => a + r.akaikeWeight, 0)).toBeCloseTo(1, 12);
    expect(q.excluded).toEqual([{ fit: 'short', code: 'max_iterations', reason: expect.stringMatching(/^the fit did not converge \(max_iterations: /) }]);
    const block = comparisonBlock(q);
    expect(block.lead).toContain('Left out of the ranking: short (it is not a converged result; see below).');
    expect(block.headers).toEqual(['evidence', 'one', 'two']);
    expect(block.notes.some((n) => n.startsWith('short left out: the fit did not converge'))).toBe(true);
    // the two ranked fits are a nested pair: their test still runs
    expect(q.nesting).toMatchObject({ simpler: 'one', richer: 'two', status: 'established' });
    expect(q.fTest).toMatchObject({ simpler: 'one', richer: 'two', df1: 1, df2: 17 });
  });

  it('models of two columns are not checked: no F test unless declared with `within`', async () => {
    const dir = tempDir();
    const z = normals(21, 24);
    writeCsv(dir, 'm.csv', ['x', 'w', 'y'], Array.from({ length: 24 }, (_, i) => [i % 6, Math.floor(i / 6), (1 + 2 * (i % 6) + 0.5 * Math.floor(i / 6) + 0.1 * z[i]).toFixed(5)]));
    const fits = ['data d = "m.csv"', 'fit s on d {', '  model y = a + b * x + 0 * w', '  param a = 0', '  param b = 0', '}', 'fit r on d {', '  model y = a + b * x + c * w', '  param a = 0', '  param b = 0', '  param c = 0', '}'];
    const plain = comparison((await runSpec([...fits, 'compare s, r'].join('\n'), dir)).result);
    expect(plain.nesting).toMatchObject({ status: 'not_checked', distance: null });
    expect(plain.fTest).toBeUndefined();
    expect(plain.noFTest).toMatch(/could not be checked .* does not declare it/);
    const declared = comparison((await runSpec([...fits, 'compare s within r'].join('\n'), dir)).result);
    expect(declared.nesting?.status).toBe('declared');
    expect(declared.fTest).toBeDefined();
    expect(comparisonBlock(declared).notes.join(' ')).toMatch(/the spec declares it, so the test rests on that declaration/);
  });

  it('fits that weigh their points differently get no F test', async () => {
    const dir = tempDir();
    decayCsv(dir, (t) => 2 + 0.5 * t, 15, 1, 8, 0.05, 9);
    const spec = [
      'data d = "decay.csv"',
      'fit s on d {', '  model signal = a + b * t_h', '  param a = 1', '  param b = 0', '  weight 1 / t_h', '}',
      'fit r on d {', '  model signal = a + b * t_h + c * t_h^2', '  param a = 1', '  param b = 0', '  param c = 0', '}',
      'compare s, r',
    ].join('\n');
    const q = comparison((await runSpec(spec, dir)).result);
    expect(q.nesting?.status).toBe('established');
    expect(q.fTest).toBeUndefined();
    expect(q.noFTest).toMatch(/weigh their points differently/);
  });
});
