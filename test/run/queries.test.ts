/**
 * run/queries: predict and invert of weighted fits (the new observation's
 * spread at the query point, or as the query states it), invert from the
 * mean of m readings, back-calculated standards with their ends, predictions
 * beyond the data, a transformed response brought back to its column's scale,
 * and expectations on query limits.
 *
 * Reference values: computed once with numpy 2.4.6 and scipy 1.17.1 (python3)
 * from the same invented data, by the weighted-least-squares formulas
 * β = (XᵀWX)⁻¹XᵀWy, C = (XᵀWX)⁻¹ (absolute σ) or s²(XᵀWX)⁻¹ (relative weights,
 * s² = Σwᵢrᵢ²/(n − p)), prediction half-width t·√(gᵀCg + v₀) with v₀ = σ(x₀)²
 * or s²/w(x₀), t = scipy.stats.t.ppf(0.975, n − p); the inverse interval by
 * the closed form of Draper & Smith 1998, Applied Regression Analysis, §3.2
 * (the quadratic (y₀ − a − bx)² = t²s²(1/m + 1/n + (x − x̄)²/Sxx), numpy).
 */
import { describe, expect, it } from 'vitest';
import { analyze } from '../../parser/index';
import { headerLookup } from '../../engine/data/header';
import { runPlan } from '../../engine/runner/run-plan';
import { queryTextLines } from '../../engine/front/views/text';
import { markdownReport } from '../../engine/front/views/markdown';
import { resultToJson } from '../../engine/run/json';
import { buildPanelModel } from '../../extension/logic/panel-model';
import type { QueryResult } from '../../engine/result';
import { runSpec, tempDir, writeCsv } from './helpers';

/** |actual − expected| ≤ tol·|expected| (relative agreement; 1e-12: twelve digits). */
function close(actual: number | null | undefined, expected: number, tol = 1e-12): void {
  expect(actual, `expected ${expected}`).not.toBeNull();
  expect(Math.abs((actual as number) - expected), `${actual} vs ${expected}`).toBeLessThanOrEqual(tol * Math.abs(expected));
}

// invented calibration: 8 levels × 3 replicates, signal noise growing with the concentration
const CONC = [0.5, 1, 2, 5, 10, 20, 50, 100].flatMap((c) => [c, c, c]);
const SIGNAL = [
  0.009945, 0.008865, 0.012817, 0.031618, 0.026411, 0.025188, 0.042382, 0.043532, 0.047524, 0.109135, 0.101138, 0.111265,
  0.21874, 0.230968, 0.255173, 0.307704, 0.404856, 0.433863, 1.155822, 1.138127, 0.965822, 2.310634, 1.969885, 1.900682,
];
const SD = CONC.map((c) => 0.002 + 0.003 * c);

const dir = tempDir();
writeCsv(dir, 'cal.csv', ['conc', 'signal', 'sd'], CONC.map((c, i) => [c, SIGNAL[i], Number(SD[i].toFixed(6))]));
const fit = (name: string, item: string) => `fit ${name} on d {\n  model signal = a + b * conc\n  param a\n  param b\n${item}\n}`;
const DATA = 'data d = "cal.csv"';

function query(result: { queries: QueryResult[] }, i: number) {
  return result.queries[i];
}

describe('run/queries weighted prediction', () => {
  it('evaluates a sigma expression of the predictor at the query point (numpy/scipy WLS, 12 digits)', async () => {
    const { result } = await runSpec(`${DATA}\n${fit('cal', '  sigma 0.002 + 0.003 * conc')}\npredict cal at conc = 0.5, 8, 100`, dir);
    const q = query(result, 0);
    if (q.kind !== 'predict') throw new Error('predict expected');
    expect(q.observation).toBe('expression');
    // numpy 2.4.6 / scipy 1.17.1: fitted, confidence, prediction at 0.5, 8, 100
    const ref = [
      [0.012721743577004592, 0.00940927897412237, 0.016034208179886815, 0.004743081211537312, 0.020700405942471873],
      [0.17212779696182304, 0.15963167038369425, 0.18462392353995183, 0.11677804499617904, 0.22747754892746702],
      [2.1275087184822628, 1.9556589201249706, 2.299358516839555, 1.4780503660411142, 2.776967070923411],
    ];
    q.predictions.forEach((p, i) => {
      close(p.fitted, ref[i][0]);
      close(p.confidence[0], ref[i][1]);
      close(p.confidence[1], ref[i][2]);
      close(p.prediction[0], ref[i][3]);
      close(p.prediction[1], ref[i][4]);
      close(p.observationSd, 0.002 + 0.003 * p.x);
    });
  });

  it('takes s²/w(x₀) for relative weights of the predictor (numpy/scipy WLS, 12 digits)', async () => {
    const { result } = await runSpec(`${DATA}\n${fit('cal', '  weight 1 / conc^2')}\npredict cal at conc = 0.5, 8, 100`, dir);
    const q = query(result, 0);
    if (q.kind !== 'predict') throw new Error('predict expected');
    // numpy 2.4.6 / scipy 1.17.1: fitted and prediction interval; with the old mean of 1/wᵢ the half-width at 0.5 was 71.8× this one
    const ref = [
      [0.011799178382585067, 0.0079440549924514, 0.015654301772718735],
      [0.1747413580965742, 0.11843683139134253, 0.23104588480180588],
      [2.1734987625881743, 1.4665762611393247, 2.880421264037024],
    ];
    q.predictions.forEach((p, i) => {
      close(p.fitted, ref[i][0]);
      close(p.prediction[0], ref[i][1]);
      close(p.prediction[1], ref[i][2]);
    });
  });

  it('takes a stated relative weight as s²/W: W = w(x₀) gives the expression\'s interval (numpy/scipy, 12 digits)', async () => {
    const { result } = await runSpec(`${DATA}\n${fit('cal', '  weight 1 / conc^2')}\npredict cal at conc = 0.5, 8 weight 4, 0.015625`, dir);
    const q = query(result, 0);
    if (q.kind !== 'predict') throw new Error('predict expected');
    expect(q.observation).toBe('stated');
    // the same numpy 2.4.6 / scipy 1.17.1 references as above: 1/0.5² = 4, 1/8² = 0.015625
    close(q.predictions[0].prediction[0], 0.0079440549924514);
    close(q.predictions[1].prediction[1], 0.23104588480180588);
  });

  it('uses the σ the query states for a sigma column (numpy/scipy, 12 digits)', async () => {
    const { result } = await runSpec(`${DATA}\n${fit('cal', '  sigma sd')}\npredict cal at conc = 8 sigma 0.05`, dir);
    const q = query(result, 0);
    if (q.kind !== 'predict') throw new Error('predict expected');
    expect(q.observation).toBe('stated');
    // numpy 2.4.6 / scipy 1.17.1, σ₀ = 0.05 at conc = 8 (the sd column holds the same σᵢ as the expression above, to 6 decimals)
    close(q.predictions[0].prediction[0], 0.06768390324897473, 1e-9);
    close(q.predictions[0].prediction[1], 0.27657169067467136, 1e-9);
    expect(queryTextLines(result).join('\n')).toContain("New observation's σ as stated in the query.");
  });

  it('refuses a sigma column without a stated σ: located at check, and in the engine as a guard (never the mean of σᵢ²)', async () => {
    const spec = `${DATA}\n${fit('cal', '  sigma sd')}\npredict cal at conc = 8 sigma 0.05\ninvert cal at signal = 0.5 sigma 0.05`;
    const bad = analyze(`${DATA}\n${fit('cal', '  sigma sd')}\npredict cal at conc = 8`, { headers: headerLookup(dir) });
    const d = bad.diagnostics.find((x) => x.code === 'new_sigma_needed');
    expect(d?.range.start.line).toBe(8);
    expect(d?.message).toContain('`predict cal at conc = 8 sigma S`');
    // a plan written by hand without the σ: the run refuses the queries with the same text
    const { plan } = analyze(spec, { headers: headerLookup(dir) });
    for (const q of plan.queries) if (q.kind === 'predict' || q.kind === 'invert') delete q.observation;
    const result = await runPlan(plan, { baseDir: dir, specText: spec });
    expect(result.queries).toEqual([]);
    expect(result.errors.map((e) => e.code)).toEqual(['new_sigma_needed', 'new_sigma_needed']);
    expect(result.errors[0].message).toMatch(/the sigma of 'cal' reads 'sd', not only the predictor 'conc'/);
  });
});

describe('run/queries invert from the mean of m readings', () => {
  it('divides the new-reading variance by m (Draper & Smith §3.2 closed form with numpy)', async () => {
    const { result } = await runSpec(`${DATA}\n${fit('cal', '')}\ninvert cal at signal = 0.51, 0.88 readings 3\ninvert cal at signal = 0.51`, dir);
    const three = query(result, 0);
    const one = query(result, 1);
    if (three.kind !== 'invert' || one.kind !== 'invert') throw new Error('invert expected');
    expect(three.readings).toBe(3);
    // numpy 2.4.6 / scipy 1.17.1: x̂, lower, upper
    const ref = [[24.322891986527697, 19.413480586111895, 29.23609964024069], [42.19060664518703, 37.238318117073504, 47.235895905192955]];
    three.inversions.forEach((v, i) => {
      close(v.x, ref[i][0], 1e-10);
      close(v.interval[0], ref[i][1], 1e-10);
      close(v.interval[1], ref[i][2], 1e-10);
    });
    close(one.inversions[0].interval[0], 16.139431361824425, 1e-10);
    close(one.inversions[0].interval[1], 32.51014886452816, 1e-10);
    const text = queryTextLines(result).join('\n');
    expect(text).toContain('conc from signal (mean of 3 readings)');
    expect(text).toContain('the mean of 3 readings');
  });
});

describe('run/queries backcalc', () => {
  it('reads every standard back, the lowest and highest included (once n/a with exit 0), with percent deviations', async () => {
    const { result } = await runSpec(`${DATA}\n${fit('cal', '  weight 1 / conc^2')}\nbackcalc cal`, dir);
    const q = query(result, 0);
    if (q.kind !== 'backcalc') throw new Error('backcalc expected');
    expect(q.standards).toHaveLength(24);
    for (const s of q.standards) {
      expect(s.x, `row ${s.row}`).not.toBeNull();
      // every end is a number or said to be open - never a silent null
      s.interval.forEach((v, k) => expect(v !== null || s.ends?.[k] === 'open', `row ${s.row}`).toBe(true));
      expect(s.deviationPercent).toBeCloseTo((100 * (s.x! - s.nominal)) / s.nominal, 10);
    }
    // the ends of the range: their interval reaches beyond the data and says so
    const lowest = q.standards.filter((s) => s.nominal === 0.5);
    expect(lowest.every((s) => s.ends?.[0] === 'extrapolated' && s.interval[0] !== null)).toBe(true);
    const text = queryTextLines(result).join('\n');
    expect(text).toContain('Back-calculated standards of cal: conc from signal');
    expect(text).toContain('validated procedure');
    expect(text).not.toMatch(/\[n\/a,|, n\/a\]/);
  });

  it('agrees with the closed-form inverse of an unweighted line for each standard (Draper & Smith §3.2)', async () => {
    const { result } = await runSpec(`${DATA}\n${fit('cal', '')}\nbackcalc cal\ninvert cal at signal = ${SIGNAL[0]}, ${SIGNAL[23]}`, dir);
    const q = query(result, 0);
    const inv = query(result, 1);
    if (q.kind !== 'backcalc' || inv.kind !== 'invert') throw new Error('backcalc and invert expected');
    // the back-calculation of a standard is `invert` of its response (one new reading, spread s)
    for (const [k, i] of [[0, 0], [1, 23]] as const) {
      expect(q.standards[i].x).toBe(inv.inversions[k].x);
      expect(q.standards[i].interval).toEqual(inv.inversions[k].interval);
    }
    expect(inv.inversions.every((v) => v.interval.every((e) => e !== null))).toBe(true);
  });

  it('says a blank (nominal 0) has no percent deviation', async () => {
    const d = tempDir();
    writeCsv(d, 'b.csv', ['conc', 'signal'], [[0, 0.011], [0, 0.009], [1, 0.031], [2, 0.052], [4, 0.089], [8, 0.171]]);
    const { result } = await runSpec(`data d = "b.csv"\n${fit('cal', '')}\nbackcalc cal`, d);
    const q = query(result, 0);
    if (q.kind !== 'backcalc') throw new Error('backcalc expected');
    expect(q.standards[0].deviationPercent).toBeNull();
    expect(q.standards[0].x).not.toBeNull();
    expect(queryTextLines(result).join('\n')).toContain('A standard of nominal 0 (blank) has no percent deviation.');
  });
});

describe('run/queries predict beyond the data and a transformed response', () => {
  // invented stress-life data; ln(life) straight in stress
  const STRESS = [200, 200, 250, 250, 300, 300, 350, 350, 400, 400];
  const LIFE = [27685.6, 19569.7, 16867.0, 10921.4, 8244.5, 7016.8, 4464.7, 4095.7, 1917.7, 2533.1];
  const d = tempDir();
  writeCsv(d, 'life.csv', ['stress', 'life'], STRESS.map((s, i) => [s, LIFE[i]]));
  const spec = 'data d = "life.csv"\nfit life on d {\n  model ln(life) = c0 + c1 * stress\n  param c0\n  param c1\n}\npredict life at stress = 260, 450';

  it('reports the back-transformed fitted value and interval ends (numpy: exp of the log-scale ends, 12 digits), log scale kept', async () => {
    const { result } = await runSpec(spec, d);
    const q = query(result, 0);
    if (q.kind !== 'predict') throw new Error('predict expected');
    expect(q.transform).toEqual({ column: 'life', expression: 'ln(life)' });
    const [p] = q.predictions;
    // numpy 2.4.6 / scipy 1.17.1
    close(p.fitted, 9.382853153227078);
    close(p.prediction[0], 8.976445139945614);
    close(p.prediction[1], 9.789261166508542);
    close(p.original?.fitted, 11882.870083123182);
    close(p.original?.confidence[0], 10343.084703073611);
    close(p.original?.confidence[1], 13651.884855049415);
    close(p.original?.prediction[0], 7914.447296093957);
    close(p.original?.prediction[1], 17841.119680217227);
    // not symmetric about the fitted value
    expect(p.original!.prediction[1] - p.original!.fitted).toBeGreaterThan(p.original!.fitted - p.original!.prediction[0]);
    const text = queryTextLines(result).join('\n');
    expect(text).toContain('Predictions from life at stress (life, back from ln(life))');
    expect(text).toContain('mapped back through its inverse');
  });

  it('marks a value beyond the data range and says the prediction extrapolates', async () => {
    const { result } = await runSpec(spec, d);
    const q = query(result, 0);
    if (q.kind !== 'predict') throw new Error('predict expected');
    expect(q.predictions.map((p) => p.extrapolated ?? false)).toEqual([false, true]);
    expect(q.range).toEqual([200, 400]);
    expect(queryTextLines(result).join('\n')).toContain('Extrapolated beyond the data (stress from 200 to 400): stress = 450');
  });
});

describe('run/queries expectations on query limits', () => {
  it('checks a prediction limit and an inverse limit at a point, as predict and invert compute them', async () => {
    const spec = `${DATA}\n${fit('cal', '  sigma 0.002 + 0.003 * conc')}\n`
      + 'expect cal.prediction.lower at conc = 8 above 0.11\nexpect cal.prediction.lower at conc = 8 above 0.12\n'
      + 'expect cal.fitted at conc = 8 within 0.17 .. 0.18\nexpect cal.inverse.upper at signal = 0.51 readings 3 below 100\n'
      + 'invert cal at signal = 0.51 readings 3';
    const { result } = await runSpec(spec, dir);
    const [low, high, fitted, inv] = result.expectations;
    // numpy 2.4.6 / scipy 1.17.1: the lower 95 % prediction limit at conc = 8 is 0.11677804499617904
    close(low.actual, 0.11677804499617904);
    expect(low.passed).toBe(true);
    expect(high.passed).toBe(false);
    close(fitted.actual, 0.17212779696182304);
    const q = query(result, 0);
    if (q.kind !== 'invert') throw new Error('invert expected');
    expect(inv.actual).toBe(q.inversions[0].interval[1]);
    expect(inv.passed).toBe(true);
  });

  it('fails an open inverse end as not computed', async () => {
    const wide = tempDir();
    writeCsv(wide, 'w.csv', ['conc', 'signal'], [[1, 0.2], [2, 0.1], [3, 0.35], [4, 0.15], [5, 0.3]]);
    const { result } = await runSpec(`data d = "w.csv"\n${fit('cal', '')}\nexpect cal.inverse.upper at signal = 0.25 below 100`, wide);
    expect(result.expectations[0].passed).toBe(false);
    expect(result.expectations[0].actual).toBeNull();
    expect(result.expectations[0].message).toMatch(/could not be computed/);
  });
});

describe('run/queries in every view', () => {
  it('puts the backcalc, readings and stated-σ tables in the Markdown report, the panel and the JSON alike', async () => {
    const spec = `${DATA}\n${fit('cal', '  sigma sd')}\npredict cal at conc = 8 sigma 0.05\ninvert cal at signal = 0.51 readings 2 sigma 0.05\nbackcalc cal`;
    const { result } = await runSpec(spec, dir);
    const md = markdownReport(result);
    expect(md).toContain('Back-calculated standards of cal');
    expect(md).toContain('validated procedure');
    expect(md).toContain('(mean of 2 readings)');
    const panel = buildPanelModel(result, { specUri: 'file:///cal.lsq', specName: 'cal.lsq' });
    const headings = panel.queries.map((b) => b.heading);
    expect(headings).toEqual([
      'Predictions from cal at conc',
      'Inverse predictions from cal: conc from signal (mean of 2 readings)',
      'Back-calculated standards of cal: conc from signal',
    ]);
    const back = panel.queries[2];
    expect(back.rows).toHaveLength(24);
    expect(back.rows.every((r) => r.length === back.headers.length)).toBe(true);
    const json = JSON.parse(resultToJson(result)) as { queries: QueryResult[] };
    expect(json.queries.map((q) => q.kind)).toEqual(['predict', 'invert', 'backcalc']);
  });
});
