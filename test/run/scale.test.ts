/**
 * Scale equivariance (engine/linalg/scale.ts, norm.ts; engine/stats with the
 * response scale): the same data in units 1e-300, 1e-150, 1, 1e150 and 1e300
 * times apart give the same relative estimates, standard errors, goodness of
 * fit, bands, predictions and derived quantities, with exit-0 results and no
 * rank warning. Before, data near 1e-300 gave slope 0 with a rank warning.
 *
 * Data: invented (a calibration line, a quadratic drift, a decay), fixed
 * noise. Reference values at scale 1: numpy 2.4.6 `lstsq` with
 * s²(XᵀX)⁻¹ for the line and the quadratic, scipy 1.17.1 `curve_fit`
 * (tolerances 1e-15) for the decay; printed to 17 digits.
 * Tolerance: relative 1e-9 between scales (the data themselves are rounded
 * once more when scaled, ~1e-16, amplified by the condition of the problem),
 * relative 1e-8 against the references.
 */
import { describe, expect, it } from 'vitest';
import type { FitResult } from '../../engine/result';
import { runSpec, tempDir, writeCsv } from './helpers';

const X = Array.from({ length: 12 }, (_, i) => i + 1);
const Y_LINE = [3.87, 5.69, 8.3, 10.77, 12.57, 15.02, 17.47, 19.15, 21.86, 23.93, 26.4, 28.47];
const Y_QUAD = [0.35000000000000003, -0.19499999999999992, -0.16499999999999984, -0.02499999999999991, -0.040000000000000174, 0.44999999999999996, 1.1199999999999999, 1.5849999999999997, 2.7450000000000006, 3.7649999999999997, 5.164999999999999, 6.545];
const Y_DECAY = [5.133600545192795, 3.723599653635208, 2.7439806261243302, 2.016363459342646, 1.461997503101477, 1.073914161821665, 0.7888338978704327, 0.5705728254347205, 0.42130751715274334, 0.3071279534143425, 0.22568967518199687, 0.1645254464594685];

/** numpy 2.4.6 / scipy 1.17.1 at scale 1 (see the module comment). */
const REFERENCE = {
  line: { estimate: [1.48772727, 2.25188811], stderr: [0.1275483, 0.0173304] },
  quad: { estimate: [0.79931818, -0.60139361, 0.09017982], stderr: [0.11286536, 0.03991792, 0.00298918] },
  decay: { estimate: [7.003238826540786, 3.1976785888028476], stderr: [0.014828669987918588, 0.008187847521801772] },
};

const SCALES = [1e-300, 1e-150, 1, 1e150, 1e300];

interface Case {
  name: keyof typeof REFERENCE;
  y: number[];
  model: string;
  params: string[];
  /** Scale of x for a response scale s (the quadratic: √s, so that x² stays in the range of doubles). */
  xScale: (s: number) => number;
  /** Units of each parameter for x·xScale(s), y·s. */
  paramScale: (s: number) => number[];
}

const CASES: Case[] = [
  { name: 'line', y: Y_LINE, model: 'a + b * x', params: ['a', 'b'], xScale: (s) => s, paramScale: (s) => [s, 1] },
  { name: 'quad', y: Y_QUAD, model: 'a + b * x + c * x^2', params: ['a', 'b', 'c'], xScale: (s) => Math.sqrt(s), paramScale: (s) => [s, Math.sqrt(s), 1] },
  { name: 'decay', y: Y_DECAY, model: 'a * exp(-x / t)', params: ['a', 't'], xScale: (s) => s, paramScale: (s) => [s, s] },
];

async function fitAt(c: Case, s: number): Promise<{ fit: FitResult; derived: number[]; predicted: number[]; code: number }> {
  const dir = tempDir();
  const xs = c.xScale(s);
  writeCsv(dir, 'd.csv', ['x', 'y'], X.map((x, i) => [String(x * xs), String(c.y[i] * s)]));
  const spec = [
    'data d = "d.csv"',
    'fit f on d {',
    `  model y = ${c.model}`,
    ...c.params.map((p) => `  param ${p}`),
    '}',
    `predict f at x = ${String(5.5 * xs)}`,
    `derive twice = 2 * f.${c.params[c.params.length - 1]}`,
  ].join('\n');
  const { result } = await runSpec(spec, dir);
  expect(result.errors).toEqual([]);
  const fit = result.fits[0];
  const query = result.queries[0];
  const predicted = query.kind === 'predict' ? [query.predictions[0].fitted, ...query.predictions[0].confidence, ...query.predictions[0].prediction] : [];
  const d = result.derived?.[0];
  return { fit, derived: [d?.value ?? NaN, d?.stderr ?? NaN], predicted, code: fit.stop.converged ? 0 : 3 };
}

const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);

describe.each(CASES)('run: $name fitted in units 1e-300 … 1e300', (c) => {
  it('gives the same relative estimates, standard errors, statistics, bands, predictions and derived values', async () => {
    const ref = await fitAt(c, 1);
    // outside check at scale 1 (numpy / scipy)
    ref.fit.parameters.forEach((p, j) => {
      expect(rel(p.estimate, REFERENCE[c.name].estimate[j])).toBeLessThan(c.name === 'decay' ? 1e-8 : 1e-7);
      expect(rel(p.stderr!, REFERENCE[c.name].stderr[j])).toBeLessThan(c.name === 'decay' ? 1e-6 : 1e-6);
    });
    for (const s of SCALES) {
      const got = await fitAt(c, s);
      const unit = c.paramScale(s);
      expect(got.code, `scale ${s}`).toBe(0);
      expect(got.fit.warnings.map((w) => w.code)).not.toContain('rank_deficient');
      got.fit.parameters.forEach((p, j) => {
        expect(rel(p.estimate / unit[j], ref.fit.parameters[j].estimate), `${p.name} at ${s}`).toBeLessThan(1e-9);
        expect(rel(p.stderr! / unit[j], ref.fit.parameters[j].stderr!), `se ${p.name} at ${s}`).toBeLessThan(1e-9);
        expect(rel(p.upper! / unit[j], ref.fit.parameters[j].upper!)).toBeLessThan(1e-9);
      });
      const g = got.fit.goodness;
      const r = ref.fit.goodness;
      expect(rel(g.rmse / s, r.rmse)).toBeLessThan(1e-9);
      expect(Math.abs(g.r2 - r.r2)).toBeLessThan(1e-12);
      // ln L shifts by −n·ln s for an unweighted fit (variance estimated)
      expect(Math.abs(g.logLikelihood + 12 * Math.log(s) - r.logLikelihood)).toBeLessThan(1e-7 * Math.abs(r.logLikelihood) + 1e-9);
      expect(rel(g.condition, r.condition)).toBeLessThan(1e-6);
      for (const k of [0, 3, 11]) {
        expect(Math.abs(got.fit.points.standardized[k] - ref.fit.points.standardized[k])).toBeLessThan(1e-8);
        expect(Math.abs(got.fit.points.leverage[k] - ref.fit.points.leverage[k])).toBeLessThan(1e-12);
      }
      const bands = got.fit.bands!;
      for (const k of [0, 100, 199]) {
        expect(rel(bands.confidenceUpper[k] - bands.fitted[k], s * (ref.fit.bands!.confidenceUpper[k] - ref.fit.bands!.fitted[k]))).toBeLessThan(1e-8);
        expect(rel(bands.predictionUpper[k] - bands.fitted[k], s * (ref.fit.bands!.predictionUpper[k] - ref.fit.bands!.fitted[k]))).toBeLessThan(1e-8);
      }
      got.predicted.forEach((v, k) => expect(rel(v / s, ref.predicted[k])).toBeLessThan(1e-9));
      const last = unit[unit.length - 1];
      expect(rel(got.derived[0] / last, ref.derived[0])).toBeLessThan(1e-9);
      expect(rel(got.derived[1] / last, ref.derived[1])).toBeLessThan(1e-9);
    }
  });
});

describe('run: models whose own arithmetic leaves the range of doubles', () => {
  it('a quadratic in x near 1e+300 (x² overflows) is refused, not reported as converged', async () => {
    const dir = tempDir();
    writeCsv(dir, 'd.csv', ['x', 'y'], X.map((x, i) => [String(x * 1e300), String(Y_QUAD[i] * 1e300)]));
    const { result } = await runSpec('data d = "d.csv"\nfit f on d {\n  model y = a + b * x + c * x^2\n  param a\n  param b\n  param c\n}\n', dir);
    expect(result.fits[0].stop.converged).toBe(false);
    expect(result.fits[0].stop.code).toBe('non_finite');
  });

  it('a quadratic in x near 1e-300 (x² underflows to 0) leaves c undetermined and says so', async () => {
    const dir = tempDir();
    writeCsv(dir, 'd.csv', ['x', 'y'], X.map((x, i) => [String(x * 1e-300), String(Y_QUAD[i] * 1e-300)]));
    const { result } = await runSpec('data d = "d.csv"\nfit f on d {\n  model y = a + b * x + c * x^2\n  param a\n  param b\n  param c\n}\n', dir);
    const fit = result.fits[0];
    expect(fit.warnings.find((w) => w.code === 'rank_deficient')?.parameters).toEqual(['c']);
    expect(fit.parameters[2].stderr).toBeNaN();
  });
});
