/**
 * Reference values of the influence figures, the lack-of-fit and curvature tests and
 * the upper tails, on invented data. Computed once with numpy 2.4.6 and scipy
 * 1.17.1 (python3): hat diagonal from numpy.linalg.qr of the weighted design,
 * Cook's distance and studentized deleted residuals by their textbook formulas (Cook 1977;
 * Belsley, Kuh & Welsch 1980, eq. 2.14), each checked there against leaving the row out and
 * refitting with numpy.linalg.lstsq (agreement 1e-9 relative); lack of fit with the pure
 * error of the cell-means model (numpy.linalg.lstsq on indicator columns) and
 * scipy.stats.f.sf; curvature as the t of an added centred squared fitted value (numpy
 * lstsq, its standard error from the inverse Gram matrix) and scipy.stats.t.sf; the
 * nonlinear case at the optimum of scipy.optimize.least_squares (tolerances 1e-15).
 */
import { describe, expect, it } from 'vitest';
import { PivotedQR } from '../../engine/linalg/qr';
import { hatDiagonal, influence, leverageOneTolerance, leverages } from '../../engine/stats/influence';
import { lackOfFit } from '../../engine/stats/lack-of-fit';
import { curvatureTest } from '../../engine/stats/curvature';
import { fUpper, tUpper } from '../../engine/stats/distributions';
import { influenceReport } from '../../engine/stats/influence-flags';

const rel = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);

/** Column-major n×p weighted design √wᵢ·[1, x, x², …] and weighted response. */
function design(x: number[], y: number[], degree: number, w?: number[]) {
  const n = x.length;
  const p = degree + 1;
  const a = new Float64Array(n * p);
  const b = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const sw = w ? Math.sqrt(w[i]) : 1;
    for (let j = 0; j < p; j++) a[j * n + i] = sw * x[i] ** j;
    b[i] = sw * y[i];
  }
  return { a, b, n, p };
}

/** Least squares by the project's QR: weighted residuals, s, the factor. */
function solve(x: number[], y: number[], degree: number, w?: number[]) {
  const { a, b, n, p } = design(x, y, degree, w);
  const qr = new PivotedQR(n, p).factor(a, n, p, { pivot: true, scale: true });
  const beta = new Float64Array(p);
  const rhs = Float64Array.from(b);
  qr.solveLeastSquares(rhs, beta);
  const r = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let f = 0;
    for (let j = 0; j < p; j++) f += a[j * n + i] * beta[j];
    r[i] = b[i] - f;
  }
  const s = Math.sqrt(r.reduce((t, v) => t + v * v, 0) / (n - p));
  const fitted = x.map((_, i) => (y[i] * (w ? Math.sqrt(w[i]) : 1) - r[i]) / (w ? Math.sqrt(w[i]) : 1));
  return { qr, r, s, n, p, a, fitted };
}

const WQ = {
  x: [0.0, 5.0, 10.0, 15.0, 20.0, 25.0, 30.0, 35.0, 40.0, 45.0, 50.0, 60.0],
  y: [1.02, 1.49, 2.11, 2.48, 3.19, 3.61, 4.28, 4.71, 5.52, 5.86, 6.73, 8.62],
  sigma: [0.02, 0.04, 0.06, 0.08, 0.1, 0.12000000000000001, 0.13999999999999999, 0.16, 0.18, 0.19999999999999998, 0.22, 0.26],
  h: [0.9067219378936939, 0.2190590711456254, 0.2115981595361278, 0.1968491711854629, 0.16606513077544918, 0.13421246751360436, 0.11208465211667998, 0.10651537341467844, 0.12186881052416997, 0.16101892931005224, 0.22592129072517256, 0.43808500585928367],
  cooks: [0.4199243504870074, 0.022038711071430874, 0.26028371635850794, 0.055232429878596355, 0.0720297943802121, 0.009051529965401326, 0.002120435098385702, 0.03521455465288603, 0.0012409192826159938, 0.13865709295780226, 0.017553120014677383, 0.9676718722364516],
  internal: [-0.3599969759421883, -0.48549213021436644, 1.7056974438350678, -0.8222227005403051, 1.0417021382503773, -0.4185341092169864, 0.22448422462629455, -0.9413673311099021, 0.16378186385052118, -1.4722083838156546, -0.42476797830143453, 1.9296600337417147],
  deleted: [-0.34187881555900695, -0.4638404668010763, 1.954866424167973, -0.8060643787605417, 1.047290157922695, -0.398494834873267, 0.21224078439389207, -0.9347408651416849, 0.15464565474158037, -1.5930199076542153, -0.4045507436898185, 2.376054727455834],
};

const PO = {
  x: [1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0, 8.0, 9.0, 10.0, 11.0, 12.0, 13.0, 14.0, 15.0],
  y: [2.61, 3.09, 3.72, 4.18, 4.79, 6.78, 5.81, 6.41, 6.79, 7.42, 7.9, 8.38, 9.01, 9.47, 10.02],
  h: [0.24166666666666659, 0.1952380952380953, 0.15595238095238098, 0.12380952380952384, 0.09880952380952383, 0.08095238095238097, 0.07023809523809525, 0.06666666666666668, 0.07023809523809525, 0.08095238095238096, 0.09880952380952382, 0.12380952380952381, 0.15595238095238098, 0.19523809523809527, 0.24166666666666672],
  cooks: [0.046548494979060225, 0.047960024661259246, 0.00901790104115194, 0.014898155988939015, 0.0024868205261770237, 0.5649577114495276, 0.002356046496915255, 5.4871608216283975e-05, 0.005812053271989102, 0.0004907452507235375, 0.0023037277666792056, 0.006688601545203487, 1.3163050583290341e-05, 0.003563804691442046, 0.0011598123218772808],
  deleted: [-0.5252230669065995, -0.6135243818393743, -0.30130809627604865, -0.44480898534138796, -0.20498595015438742, 29.90412416257883, -0.2405302965145862, -0.037661487754638935, -0.37912619886493026, -0.10146176112228122, -0.19727019656402178, -0.29669549643799487, -0.011468379864876985, -0.16486695570096438, -0.08199193162232798],
  /** scipy.stats.t.ppf(1 − 0.05/(2·15), 12) */
  critical: 3.648889276853286,
  /** min(1, 15·2·scipy.stats.t.sf(|t₆|, 12)) of the planted row (index 5) */
  adjusted5: 1.8342673348874545e-11,
};

const NL = {
  t: [0.0, 2.0, 4.0, 6.0, 8.0, 10.0, 12.0, 15.0, 18.0, 22.0, 26.0, 30.0],
  y: [50.3, 41.8, 34.6, 28.1, 23.6, 19.2, 16.1, 12.2, 9.4, 6.6, 4.4, 3.3],
  /** scipy.optimize.least_squares optimum (A, k) of y = A·exp(−k·t) */
  theta: [50.26380558769364, 0.09444954259422769],
  h: [0.5718505911751293, 0.2621339447747508, 0.15312059894326738, 0.12953615730004087, 0.1349549504308793, 0.14423595309661658, 0.14808982514633567, 0.1405815099029178, 0.1218313939454872, 0.09086377183285023, 0.062394598284967635, 0.040406705166757456],
  cooks: [0.03241085357831795, 0.13510317219919443, 0.03848135518793838, 0.2385968695755591, 0.0001558366486076117, 0.18740138486837507, 0.010843639077923593, 0.00017934476685469352, 0.0598020821317457, 0.08231578935440004, 0.004275967726648022, 0.041209303245891254],
  deleted: [0.20950496083613324, 0.8607440063373295, 0.6325590961320712, -2.061138504908103, -0.04240717971897718, -1.6042698319798514, -0.33719741104024986, 0.04442899327855662, 0.9214693585708238, 1.3322366616259693, 0.3422935098993816, 1.4799601986491537],
  /** Leaving each row out and refitting the nonlinear model (scipy): the linearised figures differ by < 1 % here. */
  deletedRefit: [0.21065653484542227, 0.8612540245691662, 0.6325606731170467, -2.0616058698766735, -0.04243949050375969, -1.605965054854984, -0.3376665692571258, 0.044495030769341457, 0.9225549691412169, 1.333202105799279, 0.3424990672373959, 1.4803529590763482],
};

describe('engine/stats/influence', () => {
  it('hat diagonal from Q₁ equals numpy QR on a weighted quadratic, sums to p, and matches Jᵢ(JᵀJ)⁻¹Jᵢᵀ', () => {
    const w = WQ.sigma.map((s) => 1 / (s * s));
    const { qr, n, p, a } = solve(WQ.x, WQ.y, 2, w);
    const h = hatDiagonal(qr);
    for (let i = 0; i < n; i++) expect(rel(h[i], WQ.h[i])).toBeLessThan(1e-10);
    expect(h.reduce((s, v) => s + v, 0)).toBeCloseTo(p, 12);
    // the other route, through the inverse Gram matrix (kept for this cross-check)
    const g = new Float64Array(p * p);
    for (let j = 0; j < p; j++) for (let k = 0; k < p; k++) { let s = 0; for (let i = 0; i < n; i++) s += a[j * n + i] * a[k * n + i]; g[j * p + k] = s; }
    const inv = invert(g, p);
    const h2 = leverages(a, n, p, inv);
    for (let i = 0; i < n; i++) expect(Math.abs(h[i] - h2[i])).toBeLessThan(1e-8);
  });

  it('Cook distance, internally and externally studentized residuals equal the numpy/scipy values (weighted quadratic)', () => {
    const w = WQ.sigma.map((s) => 1 / (s * s));
    const { qr, r, s, n, p } = solve(WQ.x, WQ.y, 2, w);
    const inf = influence(r, hatDiagonal(qr), s, p);
    for (let i = 0; i < n; i++) {
      expect(rel(inf.cooksDistance[i], WQ.cooks[i])).toBeLessThan(1e-8);
      expect(rel(inf.studentized[i], WQ.internal[i])).toBeLessThan(1e-8);
      expect(rel(inf.deletedStudentized[i], WQ.deleted[i])).toBeLessThan(1e-8);
    }
    expect(inf.exact).toEqual([]);
  });

  it('a planted outlier: its deleted residual and Bonferroni-adjusted p match scipy, and it is the only row flagged', () => {
    const { qr, r, s, n, p } = solve(PO.x, PO.y, 1);
    const inf = influence(r, hatDiagonal(qr), s, p);
    for (let i = 0; i < n; i++) {
      expect(rel(inf.leverage[i], PO.h[i])).toBeLessThan(1e-10);
      expect(rel(inf.cooksDistance[i], PO.cooks[i])).toBeLessThan(1e-8);
      expect(rel(inf.deletedStudentized[i], PO.deleted[i])).toBeLessThan(1e-8);
    }
    const rows = PO.x.map((_, i) => i + 2);
    const report = influenceReport({ inf, rows, rank: p, linear: true, exactFit: false });
    expect(report.outliers.map((o) => o.row)).toEqual([7]);
    expect(rel(report.outliers[0].pValue, PO.adjusted5)).toBeLessThan(1e-6);
    expect(rel(report.outlierCritical!, PO.critical)).toBeLessThan(1e-8);
    expect(report.leverageCutoff).toBeCloseTo(4 / 15, 15);
  });

  it('a nonlinear fit: the tangent-plane figures at the optimum equal numpy/scipy, and are within 1 % of leave-one-out refits', () => {
    const n = NL.t.length;
    const [A, k] = NL.theta;
    const jac = new Float64Array(2 * n);
    const r = new Float64Array(n);
    for (let i = 0; i < n; i++) {
      const e = Math.exp(-k * NL.t[i]);
      jac[i] = e;
      jac[n + i] = -A * NL.t[i] * e;
      r[i] = NL.y[i] - A * e;
    }
    const qr = new PivotedQR(n, 2).factor(jac, n, 2, { pivot: true, scale: true });
    const s = Math.sqrt(r.reduce((t, v) => t + v * v, 0) / (n - 2));
    const inf = influence(r, hatDiagonal(qr), s, 2);
    for (let i = 0; i < n; i++) {
      expect(rel(inf.leverage[i], NL.h[i])).toBeLessThan(1e-10);
      expect(rel(inf.cooksDistance[i], NL.cooks[i])).toBeLessThan(1e-8);
      expect(rel(inf.deletedStudentized[i], NL.deleted[i])).toBeLessThan(1e-8);
      expect(Math.abs(inf.deletedStudentized[i] - NL.deletedRefit[i])).toBeLessThan(0.01 * Math.abs(NL.deletedRefit[i]) + 1e-3);
    }
  });

  it('leverage one: no division by zero, NaN figures, the row listed as exact (one x apart from a column of equal x)', () => {
    // invented: ten readings at x = 8 and one at x = 19 (the line must pass through the lone point)
    const x = [8, 8, 8, 8, 8, 8, 8, 19, 8, 8, 8];
    const y = [6.58, 5.76, 7.71, 8.84, 8.47, 7.04, 5.25, 12.5, 5.56, 7.91, 6.89];
    const { qr, r, s, p } = solve(x, y, 1);
    const h = hatDiagonal(qr);
    expect(1 - h[7]).toBeLessThanOrEqual(leverageOneTolerance(11));
    const inf = influence(r, h, s, p);
    expect(inf.exact).toEqual([7]);
    expect(inf.cooksDistance[7]).toBeNaN();
    expect(inf.studentized[7]).toBeNaN();
    expect(inf.deletedStudentized[7]).toBeNaN();
    for (let i = 0; i < 11; i++) if (i !== 7) {
      expect(h[i]).toBeCloseTo(0.1, 12);
      expect(Number.isFinite(inf.deletedStudentized[i])).toBe(true);
    }
    const report = influenceReport({ inf, rows: x.map((_, i) => i + 2), rank: 2, linear: true, exactFit: false });
    expect(report.exact).toEqual([9]);
    expect(report.highLeverage).toEqual([]);
  });

  it('the tolerance of leverage one grows with n above its floor', () => {
    expect(leverageOneTolerance(10)).toBe(1e-10);
    expect(leverageOneTolerance(1e7)).toBeCloseTo(10 * 1e7 * 2 ** -52, 20);
  });
});

describe('engine/stats/lack-of-fit', () => {
  const LF = { x: [0.0, 0.0, 0.0, 2.0, 2.0, 2.0, 4.0, 4.0, 4.0, 6.0, 6.0, 6.0, 8.0, 8.0, 8.0], y: [0.012, 0.018, 0.009, 0.221, 0.214, 0.229, 0.418, 0.409, 0.425, 0.597, 0.604, 0.59, 0.762, 0.771, 0.757] };
  const W = [40000.0, 40000.0, 40000.0, 1599.9999999999998, 1599.9999999999998, 1599.9999999999998, 493.8271604938272, 493.8271604938272, 493.8271604938272, 236.68639053254435, 236.68639053254435, 236.68639053254435, 138.40830449826987, 138.40830449826987, 138.40830449826987];

  it('replicated standards, unweighted: F, dofs, p and both sums of squares equal the numpy/scipy cell-means values', () => {
    const { r } = solve(LF.x, LF.y, 1);
    const t = lackOfFit([LF.x], r, null, 2);
    expect(t.levels).toBe(5);
    expect(t.replicatedRows).toBe(15);
    expect([t.dfLackOfFit, t.dfPureError]).toEqual([3, 10]);
    expect(rel(t.f!, 14.934762563393209)).toBeLessThan(1e-9);
    expect(rel(t.pValue!, 0.0005041445384739723)).toBeLessThan(1e-8);
    expect(rel(t.ssPureError!, 0.0004820000000000008)).toBeLessThan(1e-9);
    expect(rel(t.ssLackOfFit!, 0.0021595666666666615)).toBeLessThan(1e-9);
    expect(t.note).toBeNull();
  });

  it('weighted (wᵢ = 1/σᵢ²): the same with weights', () => {
    const { r } = solve(LF.x, LF.y, 1, W);
    const t = lackOfFit([LF.x], r, W, 2);
    expect(rel(t.f!, 2.3446062641511913)).toBeLessThan(1e-9);
    expect(rel(t.pValue!, 0.13449988680053224)).toBeLessThan(1e-8);
    expect(rel(t.ssPureError!, 1.9609341302418875)).toBeLessThan(1e-9);
  });

  it('scaled residuals (response scale c) give the same F and sums of squares in response units', () => {
    const { r } = solve(LF.x, LF.y, 1);
    const c = 2 ** 20;
    const t = lackOfFit([LF.x], r.map((v) => v / c), null, 2, c);
    expect(rel(t.f!, 14.934762563393209)).toBeLessThan(1e-9);
    expect(rel(t.ssPureError!, 0.0004820000000000008)).toBeLessThan(1e-9);
  });

  it('no replicates: no test, and it says so', () => {
    const x = [1, 2, 3, 4, 5, 6];
    const { r } = solve(x, [1.1, 1.9, 3.2, 3.9, 5.1, 6.0], 1);
    const t = lackOfFit([x], r, null, 2);
    expect(t.f).toBeNull();
    expect(t.pValue).toBeNull();
    expect(t.note).toMatch(/no replicates/);
    expect(t.levels).toBe(6);
  });

  it('as many settings as parameters: no test (the model passes through every mean)', () => {
    const x = [8, 8, 8, 19, 8, 8];
    const { r } = solve(x, [6.1, 5.8, 7.0, 12.5, 6.6, 7.2], 1);
    const t = lackOfFit([x], r, null, 2);
    expect(t.f).toBeNull();
    expect(t.note).toMatch(/2 distinct predictor settings for 2 parameters/);
  });

  it('a setting is the values of every predictor column (two columns)', () => {
    const a = [1, 1, 1, 2, 2, 2];
    const b = [0, 0, 1, 0, 1, 1];
    const t = lackOfFit([a, b], [0.1, -0.1, 0.2, -0.2, 0.05, -0.05], null, 2);
    expect(t.levels).toBe(4);
    expect(t.dfPureError).toBe(2);
  });
});

describe('engine/stats/curvature', () => {
  it('a line through curved data: t, dof and p equal the numpy/scipy values of the augmented fit', () => {
    const x = [0.0, 1.0, 2.0, 3.0, 4.0, 5.0, 6.0, 7.0, 8.0, 9.0, 10.0, 11.0, 12.0, 13.0, 14.0, 15.0, 16.0, 17.0, 18.0, 19.0];
    const y = [10.1, 10.9, 12.2, 13.0, 14.2, 15.1, 16.3, 17.0, 17.9, 18.8, 19.5, 20.1, 20.9, 21.3, 21.9, 22.4, 22.8, 23.3, 23.5, 23.8];
    const { qr, r, fitted } = solve(x, y, 1);
    const c = curvatureTest(qr, r, fitted, null)!;
    expect(c.dof).toBe(17);
    expect(rel(c.t, -27.620601290459255)).toBeLessThan(1e-9);
    expect(rel(c.pValue, 1.449127231257536e-15)).toBeLessThan(1e-6);
  });

  it('the planted-outlier line has no curvature (numpy/scipy values)', () => {
    const { qr, r, fitted } = solve(PO.x, PO.y, 1);
    const c = curvatureTest(qr, r, fitted, null)!;
    expect(rel(c.t, -0.9682932322067935)).toBeLessThan(1e-9);
    expect(rel(c.pValue, 0.35200941155439386)).toBeLessThan(1e-9);
  });

  it('no test when the squared fitted value is in the model span (a constant model) or dof < 1', () => {
    const x = [1, 2, 3, 4, 5];
    const { qr, r, fitted } = solve(x, [2, 2.1, 1.9, 2.05, 1.95], 0);
    expect(curvatureTest(qr, r, fitted, null)).toBeNull();
    const two = solve([1, 2, 3], [1, 2.1, 2.9], 1);
    expect(curvatureTest(two.qr, two.r, two.fitted, null)).toBeNull();
  });
});

describe('engine/stats/distributions upper tails (scipy.stats sf)', () => {
  it.each([[8, 5, 0.0002464533302862221], [40, 10, 1.1404288715428768e-12], [1.5, 3, 0.11529193262241147]])('P(T > %d; %d) = %g', (x, dof, ref) => {
    expect(rel(tUpper(x, dof), ref)).toBeLessThan(1e-10);
  });
  it.each([[30, 3, 10, 2.5917092737191237e-05], [200, 2, 20, 5.995246616608975e-14], [0.5, 4, 6, 0.73828125], [10000.0, 3, 12, 1.1981157894217155e-20]])('P(F > %d; %d, %d) = %g', (x, d1, d2, ref) => {
    expect(rel(fUpper(x, d1, d2), ref)).toBeLessThan(1e-10);
  });
  it('fUpper at 0 is 1; NaN for bad dofs', () => {
    expect(fUpper(0, 2, 3)).toBe(1);
    expect(fUpper(1, 0, 3)).toBeNaN();
  });
});

/** Gauss–Jordan inverse of a small symmetric positive definite matrix (test only). */
function invert(g: Float64Array, p: number): Float64Array {
  const a = Array.from({ length: p }, (_, i) => [...Array.from(g.subarray(i * p, (i + 1) * p)), ...Array.from({ length: p }, (_, j) => (i === j ? 1 : 0))]);
  for (let c = 0; c < p; c++) {
    const piv = a[c][c];
    for (let j = 0; j < 2 * p; j++) a[c][j] /= piv;
    for (let i = 0; i < p; i++) if (i !== c) { const f = a[i][c]; for (let j = 0; j < 2 * p; j++) a[i][j] -= f * a[c][j]; }
  }
  const out = new Float64Array(p * p);
  for (let i = 0; i < p; i++) for (let j = 0; j < p; j++) out[i * p + j] = a[i][p + j];
  return out;
}
