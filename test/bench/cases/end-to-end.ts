/**
 * (4) A 1e6-point, 4-parameter nonlinear fit end to end in the engine:
 * `runFit` on in-memory columns (start values given, as a user writes them),
 * including every statistic of the FitResult (covariance, intervals,
 * residual diagnostics, point table, bands). The solver alone
 * (Levenberg–Marquardt on the same problem) is shown for comparison.
 */
import { compileModel } from '../../../engine/compile';
import { runFit } from '../../../engine/run';
import { levenbergMarquardt, modelProblem } from '../../../engine/solve';
import { measure } from '../harness';
import { gaussian, rng } from '../../fixtures/random';
import { fitData, logistic4, LOGISTIC_MODEL, modelSpec } from '../data';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

export const E2E_PARAMS = ['bottom = 5', 'top = 90', 'ec50 = 1 in [0, inf]', 'hill = 1'];

/** Invented dose-response readings: 4PL(bottom 2, top 98, ec50 0.7, hill 1.3) + N(0, 1) noise, doses log-spaced 1e-3…1e2. */
export function doseResponse(n: number, seed = 5): { x: Float64Array; y: Float64Array } {
  const g = gaussian(rng(seed));
  const x = Float64Array.from({ length: n }, (_, i) => 0.001 * 10 ** ((5 * i) / (n - 1)));
  const y = x.map((v) => logistic4(v, 2, 98, 0.7, 1.3) + g());
  return { x, y };
}

export async function benchEndToEnd(ctx: BenchContext): Promise<BenchRow> {
  const n = ctx.quick ? 20_000 : 1_000_000;
  const spec = modelSpec(LOGISTIC_MODEL, E2E_PARAMS);
  const { x, y } = doseResponse(n);
  const data = fitData(spec.fit, ['x'], [x], y);
  let last = runFit(spec.fit, data);
  const runs = ctx.quick ? 1 : 5;
  const fit = await measure(() => {
    last = runFit(spec.fit, data);
  }, runs);
  const model = compileModel(spec.model, spec.params, ['x']);
  const theta0 = Float64Array.from([5, 90, 1, 1]);
  const solver = await measure(() => levenbergMarquardt(modelProblem({ model, columns: [x], response: y, n }), theta0), runs);
  const est = last.parameters.map((p) => `${p.name} ${fmt(p.estimate, 4)}`).join(', ');
  return {
    id: 4,
    name: `${fmt(n, 1)}-point 4-parameter nonlinear fit (runFit, end to end)`,
    value: fit.median / 1000,
    unit: 's',
    spread: [fit.min / 1000, fit.max / 1000],
    text: `${fmt(fit.median / 1000)} s (solver alone ${fmt(solver.median / 1000)} s; ${last.iterations} iterations, stop ${last.stop.code}; ${est})`,
    goal: '≤ 1 s',
    met: last.stop.converged && fit.median <= 1000,
    details: { n, runFitMs: fit, solverMs: solver, iterations: last.iterations, evaluations: last.evaluations, stop: last.stop, estimates: last.parameters.map((p) => [p.name, p.estimate]) },
  };
}
