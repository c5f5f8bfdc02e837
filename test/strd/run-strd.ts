/**
 * Fits the NIST StRD regression datasets with the engine's solvers and
 * scores them by the log relative error (McCullough, "Assessing the
 * reliability of statistical software: Part I", The American Statistician
 * 52 (1998) 358-366):
 *     LRE = −log₁₀(|est − cert| / |cert|)   (−log₁₀|est| when cert = 0),
 * clipped to [0, d] with d the number of significant digits printed for the
 * certified value (11 for nonlinear, 15 for linear datasets), so that
 * agreement to all printed digits scores d.
 *
 * Nonlinear datasets are fitted from both NIST starts with Levenberg–
 * Marquardt (tolerances below); linear ones with the QR solver. Standard
 * errors are √(s²·(JᵀJ)⁻¹ⱼⱼ), s² = RSS/(n − p).
 *
 * Solver variants (the comparison behind engine/solve/nonlinear.ts):
 * `lm` (the default path without bounds), `reflective` (the interior
 * reflective trust region) and `projection` (LM with projection and an active
 * set), optionally with sign bounds (`bounds: 'sign'`): a parameter whose
 * certified value and both starts are positive gets [0, inf], all negative
 * [-inf, 0] — the bounds a user who knows the signs would write; they hold at
 * the certified minimum but may be met on the way.
 *
 * Rounding-level residuals (documented floor): when the certified RSS is
 * positive but below 1e-20·Σy² (only Lanczos1: RSS 1.4e-25 for Σy² ≈ 9), the residuals
 * are at the rounding level of the data and of double-precision model
 * evaluation: each residual ≈ 8e-14 carries an error ≈ 1e-16·|y| ≈ 3e-16
 * (0.1-1 % of itself) from converting the decimal data to double alone, so
 * RSS and s cannot be reproduced to 6 digits from double data (measured raw
 * LREs: RSS ≈ 2.8-3.1, SE ≈ 3.1-3.4; the README notes that even the
 * certified parameters give RSS ≈ 4e-21). There: RSS counts as matching when
 * |RSS − cert| ≤ 1e-20·Σy² (scored d, marked "floor"), and standard errors
 * are compared after dividing by the residual standard deviation (SEⱼ/s,
 * the part determined by the Jacobian), against certSEⱼ/cert_s.
 */
import { readStrd, type StrdDataset, type StrdKind } from './read-strd';
import { NONLINEAR_MODELS, LINEAR_MODELS, modelExpr } from './models';
import { bestRelabelling } from './relabel';
import { compileModel, compileColumnExpr } from '../../engine/compile/index';
import { modelProblem } from '../../engine/solve/model-problem';
import { levenbergMarquardt } from '../../engine/solve/lm';
import { reflectiveTrustRegion } from '../../engine/solve/reflective';
import { solveLinear } from '../../engine/solve/linear';
import { unscaledCovariance, standardErrors } from '../../engine/stats/covariance';
import type { SolveOptions, SolveOutcome } from '../../engine/solve/types';

/** LM settings for the certification runs: tight tolerances, generous limits. */
export const STRD_LM_OPTIONS: SolveOptions = { reductionTolerance: 1e-15, stepTolerance: 1e-15, gradientTolerance: 1e-15, maxIterations: 5000, maxEvaluations: 50000 };

/** Relative floor for rounding-level RSS (see module comment). */
export const RSS_FLOOR_RELATIVE = 1e-20;

export const TARGETS = { nls: { params: 7, se: 6, rss: 6 }, lls: { params: 9, se: 6, rss: 6 } } as const;

/** Min LRE over the parameters under the best relabelling of interchangeable terms and invisible signs (relabel.ts). */
export function relabelledLre(ds: StrdDataset, theta: ArrayLike<number>): number {
  const values = Object.fromEntries(ds.parameters.map((q, j) => [q.name, theta[j]]));
  return bestRelabelling(ds.name, values, (v) => Math.min(...ds.parameters.map((q) => lre(v[q.name], q.certified, q.digits)))).score;
}

export interface StrdRow {
  dataset: string;
  kind: StrdKind;
  /** NIST start 1 or 2 (nonlinear), null for linear datasets. */
  start: 1 | 2 | null;
  minLreParams: number;
  /** As `minLreParams`, under the best relabelling of interchangeable terms (relabel.ts). */
  minLreRelabelled: number;
  minLreSE: number;
  lreRSS: number;
  /** True when the RSS/SE floor rule applied. */
  floor: boolean;
  iterations: number;
  stop: string;
  stopMessage: string;
  estimates: number[];
  stderrs: number[];
  rss: number;
}

export function lre(estimate: number, certified: number, digits: number): number {
  if (!Number.isFinite(estimate)) return 0;
  const err = certified === 0 ? Math.abs(estimate) : Math.abs(estimate - certified) / Math.abs(certified);
  if (err === 0) return digits;
  return Math.min(digits, Math.max(0, -Math.log10(err)));
}

function sumSquares(x: Float64Array): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i] * x[i];
  return s;
}

export type StrdSolver = 'lm' | 'reflective' | 'projection';

export interface StrdVariant {
  solver: StrdSolver;
  bounds: 'none' | 'sign';
}

export const DEFAULT_VARIANT: StrdVariant = { solver: 'lm', bounds: 'none' };

/** Sign bounds of a dataset (module comment): lower and upper per parameter. */
export function signBounds(ds: StrdDataset): { lower: Float64Array; upper: Float64Array } {
  const lower = new Float64Array(ds.parameters.length).fill(-Infinity);
  const upper = new Float64Array(ds.parameters.length).fill(Infinity);
  ds.parameters.forEach((q, j) => {
    const values = [q.certified, ...(q.starts ?? [])];
    if (values.every((v) => v > 0)) lower[j] = 0;
    else if (values.every((v) => v < 0)) upper[j] = 0;
  });
  return { lower, upper };
}

export function fitDataset(ds: StrdDataset, start: 1 | 2 | null, options: SolveOptions = STRD_LM_OPTIONS, variant: StrdVariant = DEFAULT_VARIANT): StrdRow {
  const params = ds.parameters.map((q) => q.name);
  const spec = (ds.kind === 'nls' ? NONLINEAR_MODELS : LINEAR_MODELS)[ds.name];
  if (!spec) throw new Error(`no model for ${ds.name}`);
  const { model, response } = modelExpr(spec, params);
  const predictors = ds.columns.slice(1);
  const compiled = compileModel(model, params, predictors);
  const y = new Float64Array(ds.n);
  compileColumnExpr(response, ds.columns)(ds.data, ds.n, y);
  const bounds = variant.bounds === 'sign' && start !== null ? signBounds(ds) : {};
  const problem = modelProblem({ model: compiled, columns: ds.data.slice(1), response: y, n: ds.n, ...bounds });

  let out: SolveOutcome;
  if (start === null) out = solveLinear(problem);
  else {
    const theta0 = Float64Array.from(ds.parameters.map((q) => q.starts![start - 1]));
    out = variant.solver === 'reflective' ? reflectiveTrustRegion(problem, theta0, options) : levenbergMarquardt(problem, theta0, options);
  }

  const n = ds.n;
  const p = params.length;
  const rss = sumSquares(out.residuals);
  const s2 = rss / (n - p);
  const cov = unscaledCovariance(out.jacobian, n, p);
  const se = standardErrors(cov, s2);
  const floor = ds.rss > 0 && ds.rss < RSS_FLOOR_RELATIVE * sumSquares(y);

  const minLreParams = Math.min(...ds.parameters.map((q, j) => lre(out.theta[j], q.certified, q.digits)));
  let minLreSE: number;
  let lreRSS: number;
  if (floor) {
    const s = Math.sqrt(s2);
    minLreSE = Math.min(...ds.parameters.map((q, j) => lre(se[j] / s, q.certifiedSd / ds.residualSd, q.digits)));
    lreRSS = Math.abs(rss - ds.rss) <= RSS_FLOOR_RELATIVE * sumSquares(y) ? ds.rssDigits : lre(rss, ds.rss, ds.rssDigits);
  } else {
    minLreSE = Math.min(...ds.parameters.map((q, j) => lre(se[j], q.certifiedSd, q.digits)));
    lreRSS = lre(rss, ds.rss, ds.rssDigits);
  }
  return {
    dataset: ds.name, kind: ds.kind, start, minLreParams, minLreRelabelled: relabelledLre(ds, out.theta), minLreSE, lreRSS, floor,
    iterations: out.iterations, stop: out.stop.code, stopMessage: out.stop.message,
    estimates: Array.from(out.theta), stderrs: Array.from(se), rss,
  };
}

/** Every (dataset, start) case, in NIST's order of difficulty within each kind. */
export function runAll(names: { nls: string[]; lls: string[] }, dir?: string, variant: StrdVariant = DEFAULT_VARIANT): StrdRow[] {
  const rows: StrdRow[] = [];
  for (const name of names.nls) {
    const ds = readStrd('nls', name, dir);
    rows.push(fitDataset(ds, 1, STRD_LM_OPTIONS, variant), fitDataset(ds, 2, STRD_LM_OPTIONS, variant));
  }
  for (const name of names.lls) rows.push(fitDataset(readStrd('lls', name, dir), null));
  return rows;
}

export function meetsTargets(row: StrdRow): boolean {
  const t = TARGETS[row.kind];
  return row.minLreParams >= t.params && row.minLreSE >= t.se && row.lreRSS >= t.rss;
}

/** NIST's listing order (by difficulty) for the table. */
export const NLS_ORDER = Object.keys(NONLINEAR_MODELS);
export const LLS_ORDER = Object.keys(LINEAR_MODELS);
