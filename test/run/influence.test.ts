/**
 * Influence, outliers, lack of fit and curvature through the whole run (spec → result → JSON, text, report,
 * panel model), and the false-flag rates of the rules on clean data against their statistical bounds.
 */
import { describe, expect, it } from 'vitest';
import { runSpec, tempDir, writeCsv } from './helpers';
import { normals } from '../fixtures/random';
import { resultToJsonValue } from '../../engine/run/json';
import { runText } from '../../engine/front/views/text';
import { markdownReport } from '../../engine/front/views/markdown';
import { buildPanelModel } from '../../extension/logic/panel-model';
import { PivotedQR } from '../../engine/linalg/qr';
import { hatDiagonal, influence } from '../../engine/stats/influence';
import { influenceReport, influenceWarnings } from '../../engine/stats/influence-flags';
import { curvatureTest } from '../../engine/stats/curvature';
import { lackOfFit } from '../../engine/stats/lack-of-fit';
import type { FitResult } from '../../engine/result';

const LINE = (file: string) => `data d = "${file}"\nfit line on d {\n  model y = a + b * x\n  param a\n  param b\n}\n`;

async function fitLine(x: number[], y: number[]): Promise<FitResult> {
  const dir = tempDir();
  writeCsv(dir, 'd.csv', ['x', 'y'], x.map((v, i) => [v, y[i]]));
  const { result } = await runSpec(LINE('d.csv'), dir);
  expect(result.errors).toEqual([]);
  return result.fits[0];
}

const codes = (f: FitResult) => f.warnings.map((w) => w.code);

describe('influence and outliers in a run', () => {
  // Anscombe (1973, Amer. Statist. 27:17–21), data set III: a line with one outlier (values from memory).
  // Reference figures of the outlying row (x = 13, CSV row 4) from numpy 2.4.6 (QR hat diagonal, textbook formulas):
  // Cook's distance 1.3928494502510664, internally studentized 2.9999917156435556, deleted 1203.5394636977283.
  const A3 = { x: [10, 8, 13, 9, 11, 14, 6, 4, 12, 7, 5], y: [7.46, 6.77, 12.74, 7.11, 7.81, 8.84, 6.08, 5.39, 8.15, 6.42, 5.73] };

  it('warns of high leverage only where the point also moves the fit (Cook above 4/n); the others are listed, not warned of', async () => {
    // invented: ten standards at 0…9 and one far beyond them (x = 30) that sits off the line
    const x = Array.from({ length: 10 }, (_, i) => i);
    const y = x.map((v, i) => 1 + 0.5 * v + 0.05 * Math.sin(3.1 * i));
    const far = await fitLine([...x, 30], [...y, 1 + 0.5 * 30 + 1.5]);
    const w = far.warnings.find((x) => x.code === 'high_leverage');
    expect(w?.rows).toEqual([12]);
    expect(w?.message).toMatch(/^row 12 \(h = [0-9.]+\) has high leverage \(above 2p\/n = [0-9.]+\) and moves the fit \(Cook's distance above 4\/n/);
    // the rule itself: of two high-leverage rows only the one with a notable Cook's distance is warned of
    const inf = { leverage: Float64Array.from([0.1, 0.6, 0.1, 0.7]), cooksDistance: Float64Array.from([0, 0.01, 0, 2]), deletedStudentized: Float64Array.from([0, 0, 0, 0]), exact: [] } as unknown as Parameters<typeof influenceWarnings>[1];
    const report = { linearised: false, leverageCutoff: 0.5, cooksCutoff: 1, cooksNotice: 0.5, outlierLevel: 0.05, outlierCritical: null, exact: [], highLeverage: [3, 5], influential: [5], notable: [5], outliers: [] };
    const ws = influenceWarnings(report, inf, [2, 3, 4, 5], undefined, null, 1);
    expect(ws.find((x) => x.code === 'high_leverage')?.rows).toEqual([5]);
  });

  it('names the outlier of a published 11-point line by its row: influential (D > 1) and Bonferroni outlier', async () => {
    const f = await fitLine(A3.x, A3.y);
    const i = f.points.row.indexOf(4);
    expect(f.points.cooksDistance[i]).toBeCloseTo(1.3928494502510664, 10);
    expect(f.points.studentized[i]).toBeCloseTo(2.9999917156435556, 10);
    expect(f.points.deletedStudentized![i] / 1203.5394636977283).toBeCloseTo(1, 8);
    expect(f.influence?.influential).toEqual([4]);
    expect(f.influence?.outliers.map((o) => o.row)).toEqual([4]);
    const outlier = f.warnings.find((w) => w.code === 'outlier');
    expect(outlier?.rows).toEqual([4]);
    expect(outlier?.message).toMatch(/^row 4 \(t = 1204\) is an outlier/);
    expect(f.warnings.find((w) => w.code === 'influential_point')?.message).toMatch(/Cook's distance above 1, a rule of thumb of common practice/);
    // the views show the row and the rule
    const text = runText({ ...emptyRun(), fits: [f] });
    expect(text).toMatch(/Rows to check[\s\S]*\n\s+4\s+13\s+12\.74/);
    expect(text).toContain('outlier test');
    const md = markdownReport({ ...emptyRun(), fits: [f] });
    expect(md).toContain('### Rows to check');
    expect(md).toContain('Bonferroni-adjusted test on the studentized deleted residuals');
    const panel = buildPanelModel({ ...emptyRun(), fits: [f] }, { specUri: 'file:///s.lsq', specName: 's.lsq' }).fits[0];
    expect(panel.flaggedPoints.rows.map((r) => r[0])).toEqual(['4']);
    expect(panel.flaggedPoints.rows[0].at(-1)).toMatch(/outlier/);
  });

  // Anscombe data set IV (values from memory): every x is 8 but one (x = 19, CSV row 9), whose leverage is 1.
  const A4 = { x: [8, 8, 8, 8, 8, 8, 8, 19, 8, 8, 8], y: [6.58, 5.76, 7.71, 8.84, 8.47, 7.04, 5.25, 12.5, 5.56, 7.91, 6.89] };

  it('leverage 1: "the fit passes through row 9", no division by zero, nulls in JSON, no lack-of-fit test (2 settings, 2 parameters)', async () => {
    const f = await fitLine(A4.x, A4.y);
    const w = f.warnings.find((x) => x.code === 'exact_point');
    expect(w?.message).toMatch(/^the fit passes through row 9 \(leverage 1\): its residual carries no information/);
    expect(w?.rows).toEqual([9]);
    expect(f.influence?.exact).toEqual([9]);
    expect(f.influence?.highLeverage).toEqual([]); // the exact row has its own warning
    const i = f.points.row.indexOf(9);
    expect(f.points.leverage[i]).toBe(1);
    const json = resultToJsonValue({ ...emptyRun(), fits: [f] }) as { fits: { points: Record<string, (number | null)[]> }[] };
    expect(json.fits[0].points.cooksDistance[i]).toBeNull();
    expect(json.fits[0].points.deletedStudentized[i]).toBeNull();
    expect(json.fits[0].points.studentized[i]).toBeNull();
    for (let k = 0; k < 11; k++) if (k !== i) expect(Number.isFinite(json.fits[0].points.deletedStudentized[k])).toBe(true);
    expect(f.residuals.lackOfFit?.f).toBeNull();
    expect(f.residuals.lackOfFit?.note).toMatch(/2 distinct predictor settings for 2 parameters/);
    const text = runText({ ...emptyRun(), fits: [f] });
    expect(text).toContain('leverage 1: passes through it');
  });

  it('replicate-free data: no lack-of-fit test, and the summary says so', async () => {
    const x = Array.from({ length: 12 }, (_, i) => i + 1);
    const z = normals(7, 12);
    const f = await fitLine(x, x.map((v, i) => 2 + 0.5 * v + 0.1 * z[i]));
    expect(f.residuals.lackOfFit).toMatchObject({ f: null, pValue: null, levels: 12, replicatedRows: 0 });
    expect(codes(f)).not.toContain('lack_of_fit');
    expect(runText({ ...emptyRun(), fits: [f] })).toMatch(/lack-of-fit test\s+not run\s+\(no replicates: no predictor setting occurs twice/);
  });

  it('replicated standards with a bend: the lack-of-fit warning with F, dofs and p (numpy/scipy reference), and curvature', async () => {
    // invented: 5 standards read 3 times, slightly curved response (the values of test/stats/influence.test.ts);
    // numpy 2.4.6 / scipy 1.17.1: F(3, 10) = 14.934762563393209, p = 0.0005041445384739723
    const x = [0, 0, 0, 2, 2, 2, 4, 4, 4, 6, 6, 6, 8, 8, 8];
    const y = [0.012, 0.018, 0.009, 0.221, 0.214, 0.229, 0.418, 0.409, 0.425, 0.597, 0.604, 0.59, 0.762, 0.771, 0.757];
    const f = await fitLine(x, y);
    const t = f.residuals.lackOfFit!;
    expect([t.dfLackOfFit, t.dfPureError]).toEqual([3, 10]);
    expect(t.f! / 14.934762563393209).toBeCloseTo(1, 9);
    expect(t.pValue! / 0.0005041445384739723).toBeCloseTo(1, 7);
    expect(f.warnings.find((w) => w.code === 'lack_of_fit')?.message).toContain('lack-of-fit F(3, 10) = 14.93, p = 0.000504 < 0.05');
    expect(codes(f)).toContain('curvature');
    expect(f.warnings.find((w) => w.code === 'curvature')?.message).toMatch(/^curvature: the residuals bend/);
  });

  it('a planted outlier in invented data is found at its row; the rest of the rows are not flagged', async () => {
    const z = normals(11, 25);
    const x = Array.from({ length: 25 }, (_, i) => i);
    const y = x.map((v, i) => 5 + 0.3 * v + 0.05 * z[i]);
    y[12] += 0.6; // 12 standard deviations: CSV row 14
    const f = await fitLine(x, y);
    expect(f.influence?.outliers.map((o) => o.row)).toEqual([14]);
    expect(codes(f)).toContain('outlier');
    expect(f.influence?.highLeverage).toEqual([]);
  });

  it('a nonlinear fit: figures of the linearisation, said so in the warning text and the report', async () => {
    const dir = tempDir();
    const t = [0, 2, 4, 6, 8, 10, 12, 15, 18, 22, 26, 30];
    const y = [50.3, 41.8, 34.6, 28.1, 23.6, 19.2, 16.1, 12.2, 9.4, 6.6, 4.4, 3.3];
    y[6] += 4; // invented spike at CSV row 8
    writeCsv(dir, 'c.csv', ['t', 'y'], t.map((v, i) => [v, y[i]]));
    const { result } = await runSpec('data d = "c.csv"\nfit decay on d {\n  model y = A * exp(-k * t)\n  param A = 50\n  param k = 0.1\n}\n', dir);
    const f = result.fits[0];
    expect(f.stop.converged).toBe(true);
    expect(f.influence?.linearised).toBe(true);
    expect(f.influence?.outliers.map((o) => o.row)).toEqual([8]);
    expect(f.warnings.find((w) => w.code === 'outlier')?.message).toContain('linearised model');
    expect(markdownReport(result)).toContain('all figures are those of its linearisation at the estimate');
  });

  it('a weighted fit (sigma column): leverage, Cook distance and deleted residuals of the whole run equal numpy/scipy', async () => {
    // invented sensor data with σ growing with x; reference: numpy 2.4.6 (QR of the weighted design, textbook formulas,
    // checked there by leave-one-out refits), the values of test/stats/influence.test.ts
    const x = [0.0, 5.0, 10.0, 15.0, 20.0, 25.0, 30.0, 35.0, 40.0, 45.0, 50.0, 60.0];
    const y = [1.02, 1.49, 2.11, 2.48, 3.19, 3.61, 4.28, 4.71, 5.52, 5.86, 6.73, 8.62];
    const sigma = [0.02, 0.04, 0.06, 0.08, 0.1, 0.12000000000000001, 0.13999999999999999, 0.16, 0.18, 0.19999999999999998, 0.22, 0.26];
    const ref = { h: [0.9067219378936939, 0.2190590711456254, 0.2115981595361278, 0.1968491711854629, 0.16606513077544918, 0.13421246751360436, 0.11208465211667998, 0.10651537341467844, 0.12186881052416997, 0.16101892931005224, 0.22592129072517256, 0.43808500585928367], cooks: [0.4199243504870074, 0.022038711071430874, 0.26028371635850794, 0.055232429878596355, 0.0720297943802121, 0.009051529965401326, 0.002120435098385702, 0.03521455465288603, 0.0012409192826159938, 0.13865709295780226, 0.017553120014677383, 0.9676718722364516], deleted: [-0.34187881555900695, -0.4638404668010763, 1.954866424167973, -0.8060643787605417, 1.047290157922695, -0.398494834873267, 0.21224078439389207, -0.9347408651416849, 0.15464565474158037, -1.5930199076542153, -0.4045507436898185, 2.376054727455834] };
    const dir = tempDir();
    writeCsv(dir, 's.csv', ['x', 'y', 's'], x.map((v, i) => [v, y[i], sigma[i]]));
    const { result } = await runSpec('data d = "s.csv"\nfit q on d {\n  model y = a + b * x + c * x^2\n  sigma s\n  param a\n  param b\n  param c\n}\n', dir);
    const f = result.fits[0];
    expect(f.sigmaAbsolute).toBe(true);
    for (let i = 0; i < x.length; i++) {
      expect(Math.abs(f.points.leverage[i] - ref.h[i])).toBeLessThan(1e-10);
      expect(f.points.cooksDistance[i] / ref.cooks[i]).toBeCloseTo(1, 8);
      expect(f.points.deletedStudentized![i] / ref.deleted[i]).toBeCloseTo(1, 8);
    }
  });

  it('a robust fit (huber) gets its figures, a report and the curvature test without error', async () => {
    const z = normals(3, 20);
    const x = Array.from({ length: 20 }, (_, i) => i);
    const y = x.map((v, i) => 1 + 0.5 * v + 0.2 * z[i]);
    y[10] += 5;
    const dir = tempDir();
    writeCsv(dir, 'r.csv', ['x', 'y'], x.map((v, i) => [v, y[i]]));
    const { result } = await runSpec('data d = "r.csv"\nfit line on d {\n  model y = a + b * x\n  param a = 1\n  param b = 1\n  loss huber\n}\n', dir);
    const f = result.fits[0];
    expect(f.stop.converged).toBe(true);
    expect(f.influence).toBeDefined();
    expect(f.residuals.curvature).not.toBeNull();
    expect(f.points.deletedStudentized!.every((v) => Number.isFinite(v))).toBe(true);
  });

  it('a logistic curve: no curvature test (its tangent space holds the squared fitted value), and the summary says so', async () => {
    // ŷ = low + (high − low)·g with ∂ŷ/∂ic50 ∝ g(1 − g): g² lies in the span of the Jacobian, so Tukey's column adds nothing
    const dose = [0.01, 0.03, 0.1, 0.3, 1, 3, 10, 30, 100];
    const z = normals(21, 18);
    const rows = dose.flatMap((d, k) => [0, 1].map((j) => [d, 5 + 90 / (1 + (d / 1.5) ** 1.1) + 1.5 * z[2 * k + j]]));
    const dir = tempDir();
    writeCsv(dir, 'l.csv', ['dose', 'y'], rows);
    const { result } = await runSpec('data d = "l.csv"\nfit curve on d {\n  model y = low + (high - low) / (1 + (dose / ic50)^hill)\n  param high = 100\n  param low = 0\n  param ic50 = 1\n  param hill = 1\n}\n', dir);
    const f = result.fits[0];
    expect(f.stop.converged).toBe(true);
    expect(f.residuals.curvature).toBeNull();
    expect(runText(result)).toMatch(/curvature test\s+not run\s+\(the model's own shape already contains the squared fitted value/);
    expect(f.residuals.lackOfFit?.f).not.toBeNull(); // duplicates at 9 doses: the lack-of-fit test still runs
  });

  it('a fit that did not converge has no influence report and no influence warnings', async () => {
    const dir = tempDir();
    writeCsv(dir, 'c.csv', ['t', 'y'], [[0, 5], [1, 3], [2, 2], [3, 1.4], [4, 1.1]]);
    const { result } = await runSpec('data d = "c.csv"\nfit decay on d {\n  model y = A * exp(-k * t)\n  param A = 5\n  param k = 0.5\n  iterations 1\n}\n', dir);
    const f = result.fits[0];
    expect(f.stop.converged).toBe(false);
    expect(f.influence).toBeUndefined();
    expect(codes(f).filter((c) => ['outlier', 'influential_point', 'high_leverage', 'exact_point', 'curvature', 'lack_of_fit'].includes(c))).toEqual([]);
  });

  it('Durbin–Watson hint follows the value (not "near 2" beside d = 0.4)', async () => {
    // invented: a line fitted to a slow oscillation: neighbouring residuals alike
    const x = Array.from({ length: 30 }, (_, i) => i);
    const f = await fitLine(x, x.map((v) => 1 + 0.2 * v + Math.sin(v / 4)));
    expect(f.residuals.durbinWatson!).toBeLessThan(0.5);
    const text = runText({ ...emptyRun(), fits: [f] });
    expect(text).toMatch(/Durbin–Watson\s+[0-9.]+\s+\(in order of x; far below 2: neighbouring residuals alike/);
    expect(text).not.toContain('near 2');
  });
});

/**
 * The rules on clean data, 2,000 data sets with normal errors and the right model (a line, n = 20, x = 0…19),
 * through the functions the fit uses. Bounds from the binomial distribution of the number of flagged sets
 * (scipy 1.17.1 binom): each bound is exceeded with probability below 1e-6 when the rule's rate is what its theory
 * says, so a failure means the rule flags clean data more often than it should, not bad luck.
 * - Outlier test: Bonferroni bounds the chance of any flag in a set by 0.05 → at most 149 of 2,000.
 * - Curvature: t exact under the null (linear model), rate 0.01 → between 3 and 44 of 2,000 (the test is alive).
 * - Lack of fit (10 settings × 2 replicates): F(8, 10) exact, rate 0.05 → between 57 and 149 of 2,000.
 * - Cook's distance > 1: eᵢ*²/ν ~ Beta(1/2, (ν − 1)/2) (Cook & Weisberg 1982, §2.2.1), so P(any Dᵢ > 1) ≤
 *   Σᵢ P(eᵢ*² > 2(1 − hᵢ)/hᵢ) = 0.00204 for this design → at most 17 of 2,000.
 * - High leverage: none by design (max hᵢ = 0.186 < 2p/n = 0.2), in every set.
 */
describe('no false flags on clean data (rates within their statistical bounds)', () => {
  const n = 20;
  const sets = 2000;

  function lineFit(x: number[], y: number[]) {
    const a = new Float64Array(2 * n);
    for (let i = 0; i < n; i++) { a[i] = 1; a[n + i] = x[i]; }
    const qr = new PivotedQR(n, 2).factor(a, n, 2, { pivot: true, scale: true });
    const rhs = Float64Array.from(y);
    const beta = new Float64Array(2);
    qr.solveLeastSquares(rhs, beta);
    const r = Float64Array.from(y, (v, i) => v - beta[0] - beta[1] * x[i]);
    const s = Math.sqrt(r.reduce((t, v) => t + v * v, 0) / (n - 2));
    return { qr, r, s, fitted: y.map((v, i) => v - r[i]) };
  }

  it('outliers, influential rows, high leverage, curvature', () => {
    const x = Array.from({ length: n }, (_, i) => i);
    const rows = x.map((_, i) => i + 2);
    let outlierSets = 0;
    let influentialSets = 0;
    let leverageSets = 0;
    let curvatureSets = 0;
    for (let k = 0; k < sets; k++) {
      const z = normals(1000 + k, n);
      const y = x.map((v, i) => 3 + 0.7 * v + z[i]);
      const { qr, r, s, fitted } = lineFit(x, y);
      const inf = influence(r, hatDiagonal(qr), s, 2);
      const rep = influenceReport({ inf, rows, rank: 2, linear: true, exactFit: false });
      if (rep.outliers.length) outlierSets++;
      if (rep.influential.length) influentialSets++;
      if (rep.highLeverage.length) leverageSets++;
      const c = curvatureTest(qr, r, fitted, null);
      if (c && c.pValue < 0.01) curvatureSets++;
    }
    expect(outlierSets).toBeLessThanOrEqual(149);
    expect(influentialSets).toBeLessThanOrEqual(17);
    expect(leverageSets).toBe(0);
    expect(curvatureSets).toBeGreaterThanOrEqual(3);
    expect(curvatureSets).toBeLessThanOrEqual(44);
  });

  it('lack of fit with replicates', () => {
    const x = Array.from({ length: n }, (_, i) => Math.floor(i / 2));
    let flagged = 0;
    for (let k = 0; k < sets; k++) {
      const z = normals(5000 + k, n);
      const y = x.map((v, i) => 1 - 0.4 * v + 0.3 * z[i]);
      const { r } = lineFit(x, y);
      const t = lackOfFit([x], r, null, 2);
      expect(t.dfLackOfFit).toBe(8);
      if (t.pValue !== null && t.pValue < 0.05) flagged++;
    }
    expect(flagged).toBeGreaterThanOrEqual(57);
    expect(flagged).toBeLessThanOrEqual(149);
  });

  it('a clean run through the engine carries no influence, outlier, curvature or lack-of-fit warning', async () => {
    // one of the sets above (seed 1000); the rates above are the argument that this is not a lucky draw
    const x = Array.from({ length: n }, (_, i) => i);
    const z = normals(1000, n);
    const f = await fitLine(x, x.map((v, i) => 3 + 0.7 * v + z[i]));
    expect(codes(f).filter((c) => ['outlier', 'influential_point', 'high_leverage', 'exact_point', 'curvature', 'lack_of_fit'].includes(c))).toEqual([]);
    expect(f.influence).toMatchObject({ exact: [], highLeverage: [], influential: [], outliers: [] });
  });
});

function emptyRun() {
  return {
    version: 1 as const,
    provenance: { tool: 'leastwise', toolVersion: '0', specSha256: '', data: [], startedAt: '2026-12-03T00:00:00Z' },
    fits: [] as FitResult[], queries: [], expectations: [], errors: [],
  };
}
