/**
 * Inputs shared by the benchmark cases: fit plans made from spec text by
 * the real parser, in-memory fit data, and a counting wrapper around a
 * least-squares problem. All data are invented and generated with a fixed seed.
 */
import { analyze } from '../../parser/index';
import type { Expr, FitPlan, Plan } from '../../parser/plan';
import type { FitData } from '../../engine/run';
import type { LeastSquaresProblem } from '../../engine/solve/problem';
import { performance } from 'node:perf_hooks';
import { gaussian, rng } from '../fixtures/random';

export interface ModelSpec {
  plan: Plan;
  fit: FitPlan;
  model: Expr;
  /** Free parameter names in declaration order. */
  params: string[];
}

/**
 * A one-fit spec `fit f on d { model y = MODEL; param ... }` checked by the
 * parser (headers unknown: unresolved names are columns). `params` lines are
 * the text after `param`, e.g. `k = 0.3 in [0, 10]`.
 */
export function modelSpec(model: string, params: string[], extra: string[] = []): ModelSpec {
  const text = ['data d = "d.csv"', 'fit f on d {', `  model y = ${model}`, ...params.map((p) => `  param ${p}`), ...extra.map((e) => `  ${e}`), '}', ''].join('\n');
  const a = analyze(text);
  const errors = a.diagnostics.filter((d) => d.severity === 'error');
  if (errors.length > 0) throw new Error(`benchmark spec does not check: ${errors.map((e) => e.message).join('; ')}`);
  const fit = a.plan.fits[0];
  return { plan: a.plan, fit, model: fit.blocks[0].model, params: fit.parameters.filter((p) => !p.fixed).map((p) => p.name) };
}

/** FitData for `runFit` from in-memory columns (the model's columns in `names` order). */
export function fitData(fit: FitPlan, names: string[], columns: Float64Array[], y: Float64Array, group?: string): FitData {
  const n = y.length;
  const predictor = names.length === 1 ? names[0] : null;
  return {
    fit: fit.name,
    source: 'd',
    file: 'd.csv',
    ...(group !== undefined ? { group } : {}),
    n,
    modelColumns: names,
    columns,
    lines: Int32Array.from({ length: n }, (_, i) => i + 2),
    y,
    weights: null,
    sigmaAbsolute: false,
    x: predictor !== null ? columns[0] : null,
    predictor,
    rowsDropped: 0,
    rowsWithoutGroup: 0,
  };
}

/** Four-parameter logistic dose-response curve (Hill equation form), the same formula as LOGISTIC_MODEL. */
export function logistic4(x: number, bottom: number, top: number, ec50: number, hill: number): number {
  return bottom + (top - bottom) / (1 + Math.pow(x / ec50, hill));
}

export const LOGISTIC_MODEL = 'bottom + (top - bottom) / (1 + (x / ec50)^hill)';

/** How `groupedLogisticCsv` draws its invented curves. */
export interface GroupedLogisticOptions {
  /** Header line, three columns: group, dose, response. */
  header: string;
  /** Group label prefix; labels are the prefix and a 5-digit index. */
  prefix: string;
  doses: readonly number[];
  /** ec50 = ec50Low · 10^(ec50Decades · u), u uniform on [0, 1). */
  ec50Low: number;
  ec50Decades: number;
  /** Seeds of the noise and of the per-group constants. */
  seeds: [noise: number, constants: number];
}

/**
 * CSV text of invented per-group 4PL curves: per group bottom 2–6, top
 * 90–105, ec50 log-uniform, hill 0.7–1.9, plus N(0, 1.5) noise, three decimals.
 */
export function groupedLogisticCsv(groups: number, o: GroupedLogisticOptions): string {
  const g = gaussian(rng(o.seeds[0]));
  const u = rng(o.seeds[1]);
  const lines = [o.header];
  for (let p = 0; p < groups; p++) {
    const label = `${o.prefix}${String(p).padStart(5, '0')}`;
    const bottom = 2 + 4 * u();
    const top = 90 + 15 * u();
    const ec50 = o.ec50Low * 10 ** (o.ec50Decades * u());
    const hill = 0.7 + 1.2 * u();
    for (const d of o.doses) lines.push(`${label},${d},${(logistic4(d, bottom, top, ec50, hill) + 1.5 * g()).toFixed(3)}`);
  }
  return lines.join('\n') + '\n';
}

export interface Trace {
  /** Residual and Jacobian passes over the data so far. */
  passes: number;
  /** Passes and milliseconds when SSR first came within the target, or null. */
  reachedAtPasses: number | null;
  reachedAtMs: number | null;
}

/**
 * Wraps a problem to count passes over the data and note when ½‖r‖² first
 * drops to `targetCost` or below; the returned token is cancelled at that
 * moment so the solver stops at its next iteration check.
 */
export function traced(problem: LeastSquaresProblem, targetCost: number): { problem: LeastSquaresProblem; trace: Trace; cancel: { cancelled: boolean }; start(): void } {
  const trace: Trace = { passes: 0, reachedAtPasses: null, reachedAtMs: null };
  const cancel = { cancelled: false };
  let t0 = performance.now();
  const wrapped: LeastSquaresProblem = {
    n: problem.n,
    p: problem.p,
    lower: problem.lower,
    upper: problem.upper,
    residuals(theta, out) {
      problem.residuals(theta, out);
      trace.passes++;
      if (trace.reachedAtPasses === null) {
        let ss = 0;
        for (let i = 0; i < out.length; i++) ss += out[i] * out[i];
        if (0.5 * ss <= targetCost) {
          trace.reachedAtPasses = trace.passes;
          trace.reachedAtMs = performance.now() - t0;
          cancel.cancelled = true;
        }
      }
    },
    jacobian(theta, out) {
      problem.jacobian(theta, out);
      trace.passes++;
    },
  };
  return { problem: wrapped, trace, cancel, start: () => (t0 = performance.now()) };
}
