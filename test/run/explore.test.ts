/**
 * The multi-start search through the runner (engine/run/fit.ts): when it
 * runs, what it reports, the lower-minimum warning, JSON against the result
 * schema. Invented data: one sinusoid, whose sum of squares in the frequency
 * has many local minima.
 */
import { describe, expect, it } from 'vitest';
import { runSpec, tempDir, writeCsv } from './helpers';
import { validateResult } from '../front/cli/helpers';
import { resultToJsonValue } from '../../engine/run';
import { fitTextLines } from '../../engine/front/views/text';
import { FAMILIES, curvesOf } from '../robustness/scenarios';

const rows = Array.from({ length: 101 }, (_, i) => {
  const x = i * 0.1;
  return [x, Number((1.7 * Math.sin(3.1 * x) + 0.6 * Math.cos(3.1 * x) + 0.01 * Math.sin(17 * x)).toFixed(6))];
});
const spec = (params: string, extra = '') => `data d = "wave.csv"\nfit wave on d {\n  model y = a * sin(w * x) + b * cos(w * x)\n${params}\n${extra}}\n`;

async function run(params: string, extra = '') {
  const dir = tempDir();
  writeCsv(dir, 'wave.csv', ['x', 'y'], rows);
  const { result } = await runSpec(spec(params, extra), dir);
  return result;
}

describe('run/fit multi-start search', () => {
  it('runs by default when a nonlinear parameter has no start, and reports its minima', async () => {
    const result = await run('  param a\n  param w in [0, 20]\n  param b');
    const fit = result.fits[0];
    expect(fit.search?.reason).toBe('no_start');
    expect(fit.parameters[1].estimate).toBeCloseTo(3.1, 4);
    expect(fit.search!.minima[0].reported).toBe(true);
    expect(fit.search!.parameters).toEqual(['a', 'w', 'b']);
    expect(fit.search!.box.map((b) => b.parameter)).toEqual(['w']);
    const json = resultToJsonValue(result);
    const v = validateResult(json);
    expect(v.ok, v.errors).toBe(true);
    // lines: heading, model and weighting, stop, search
    expect(fitTextLines(fit)[3]).toMatch(/^ {2}Search: \d+ starting points, \d+ refined, \d+ distinct minim/);
  });

  it('with given starts, searches only when asked, and warns that the start leads to a higher minimum', async () => {
    const none = await run('  param a = 1\n  param w = 1 in [0, 20]\n  param b = 0');
    expect(none.fits[0].search).toBeUndefined();
    expect(Math.abs(none.fits[0].parameters[1].estimate - 3.1)).toBeGreaterThan(0.5);

    const asked = await run('  param a = 1\n  param w = 1 in [0, 20]\n  param b = 0', '  explore 32\n');
    const fit = asked.fits[0];
    expect(fit.search?.reason).toBe('asked');
    expect(fit.search!.lowerElsewhere).toBe(true);
    expect(fit.parameters[1].estimate).toBeCloseTo(3.1, 4);
    expect(fit.goodness.ssr).toBeLessThan(0.01 * fit.search!.startSsr);
    expect(fit.stop.converged).toBe(true);
    expect(fit.stop.message).toContain('the multi-start search found this minimum below the one reached from the starting values');
    const w = fit.warnings.find((x) => x.code === 'lower_minimum');
    expect(w?.message).toMatch(/from the given starting values the fit stops at a local minimum \(SSR [\d.e+-]+\); the search over 34 starting points found a lower one/);
    expect(fit.search!.minima.find((m) => m.fromStart)?.ssr).toBeCloseTo(fit.search!.startSsr, 8);
    expect(validateResult(resultToJsonValue(asked)).ok).toBe(true);
  });

  it('explore 0 switches the search off', async () => {
    const result = await run('  param a\n  param w in [0, 20]\n  param b', '  explore 0\n');
    expect(result.fits[0].search).toBeUndefined();
  });

  it('does not search a model linear in its parameters', async () => {
    const dir = tempDir();
    writeCsv(dir, 'wave.csv', ['x', 'y'], rows);
    const { result } = await runSpec('data d = "wave.csv"\nfit line on d {\n  model y = a + b * x\n  param a\n  param b\n  explore 16\n}\n', dir);
    expect(result.fits[0].method).toBe('linear');
    expect(result.fits[0].search).toBeUndefined();
  });

  it('checks a fit from given starts: a potency on its bound runs the search, per group too; the same minimum leaves the fit as it was', async () => {
    const dir = tempDir();
    // well A: curve 12 of the robustness suite's rising zero-dose family (test/robustness/scenarios.ts), whose
    // potency lies below the lowest dose; well B: curve 0 of the plain rising family, potency inside the doses
    const zero = curvesOf(FAMILIES.find((f) => f.id === 'logistic4-rising-zero')!, 13)[12];
    const plain = curvesOf(FAMILIES.find((f) => f.id === 'logistic4-rising-plain')!, 1)[0];
    const rowsOf = (well: string, c: { x: number[]; y: number[] }) => c.x.map((d, i) => [well, d, c.y[i]]);
    writeCsv(dir, 'plate.csv', ['well', 'dose', 'signal'], [...rowsOf('A', zero), ...rowsOf('B', plain)]);
    const body = (per: string, extra = '') => `data p = "plate.csv"\nfit hill on p {\n  model signal = bot + (top - bot) / (1 + (dose / ec)^h)\n  param bot = 100\n  param top = 0\n  param ec = 1 in [0, inf]\n  param h = 1 in [0.1, 10]\n${per}${extra}}\n`;
    const { result } = await runSpec(body('  per well\n'), dir);
    const [a, b] = result.fits;
    expect(a.group).toBe('A');
    expect(a.search).toMatchObject({ reason: 'check', mark: 'ec ended on its lower bound', lowerElsewhere: true });
    expect(a.goodness.ssr).toBeLessThan(a.search!.startSsr);
    expect(a.warnings.map((w) => w.code)).toContain('lower_minimum');
    expect(fitTextLines(a).join('\n')).toMatch(/Search \(run because ec ended on its lower bound\): \d+ starting points/);
    expect(b.search).toBeUndefined();
    expect(b.stop.converged).toBe(true);
    expect(validateResult(resultToJsonValue(result)).ok).toBe(true);
    // explore 0: no check, the fit stays where the start leads
    const { result: off } = await runSpec(body('  per well\n', '  explore 0\n'), dir);
    expect(off.fits[0].search).toBeUndefined();
    expect(off.fits[0].goodness.ssr).toBeCloseTo(a.search!.startSsr, 6);
  });
});
