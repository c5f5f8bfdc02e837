/**
 * (1) Levenberg–Marquardt vs gradient descent on the same problems: passes
 * over the data and time until ½‖r‖² is within 1e-9 (relative) of the
 * optimum. Gradient descent runs with the solver's feature scaling and the
 * best learning rate of a small grid (the grid search itself is not timed,
 * which favours gradient descent). The optimum is the lowest cost any solver
 * reached with tight tolerances (1e-15).
 */
import { compileModel } from '../../../engine/compile';
import { gradientDescent, levenbergMarquardt, modelProblem, solveLinear } from '../../../engine/solve';
import type { LeastSquaresProblem } from '../../../engine/solve/problem';
import { performance } from 'node:perf_hooks';
import { gaussian, rng, statsOf } from '../harness';
import { modelSpec, traced } from '../data';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

/** Learning rates (in feature-scaled units; scaled Jacobian columns have unit norm, so λ_max ∈ [1, p]). */
const RATES = [1.5, 1, 0.7, 0.5, 0.35, 0.25, 0.15, 0.1, 0.05];
const RELATIVE = 1e-9;

interface Case {
  name: string;
  problem: LeastSquaresProblem;
  theta0: Float64Array;
  linear: boolean;
}

function cases(n: number): Case[] {
  const g = gaussian(rng(11));
  // straight-line calibration over an uncentred range (invented)
  const line = modelSpec('a + b * x', ['a = 0', 'b = 0']);
  const x = Float64Array.from({ length: n }, (_, i) => 10 + (50 * i) / (n - 1));
  const y1 = x.map((v) => 3 + 0.8 * v + 0.5 * g());
  const m1 = compileModel(line.model, line.params, ['x']);
  // exponential decay towards a baseline (invented)
  const decay = modelSpec('amp * exp(-k * t) + base', ['amp = 3', 'k = 0.2', 'base = 0']);
  const t = Float64Array.from({ length: n }, (_, i) => (20 * i) / (n - 1));
  const y2 = t.map((v) => 5 * Math.exp(-0.35 * v) + 1 + 0.05 * g());
  const m2 = compileModel(decay.model, decay.params, ['t']);
  return [
    { name: 'line (linear)', problem: modelProblem({ model: m1, columns: [x], response: y1, n }), theta0: new Float64Array(2), linear: true },
    { name: 'decay (nonlinear)', problem: modelProblem({ model: m2, columns: [t], response: y2, n }), theta0: Float64Array.from([3, 0.2, 0]), linear: false },
  ];
}

function optimum(c: Case): number {
  const tight = { ftol: 1e-15, xtol: 1e-15, gtol: 1e-15, maxIterations: 1000 };
  const costs = [levenbergMarquardt(c.problem, c.theta0, tight).cost];
  if (c.linear) costs.push(solveLinear(c.problem).cost);
  return Math.min(...costs);
}

interface Reach {
  passes: number | null;
  ms: number | null;
}

function runLM(c: Case, target: number): Reach {
  const t = traced(c.problem, target);
  t.start();
  levenbergMarquardt(t.problem, c.theta0, { cancel: t.cancel, polish: false });
  return { passes: t.trace.reachedAtPasses, ms: t.trace.reachedAtMs };
}

function runGD(c: Case, target: number, rate: number, maxIterations: number): Reach {
  const t = traced(c.problem, target);
  t.start();
  gradientDescent(t.problem, c.theta0, { cancel: t.cancel, learningRate: rate, maxIterations, maxEvaluations: 2 * maxIterations + 10 });
  return { passes: t.trace.reachedAtPasses, ms: t.trace.reachedAtMs };
}

export async function benchDescent(ctx: BenchContext): Promise<BenchRow> {
  const n = ctx.quick ? 200 : 1000;
  const cap = ctx.quick ? 5000 : 200000;
  const runs = ctx.quick ? 1 : 5;
  const details: Record<string, unknown> = { n, relativeTarget: RELATIVE, rateGrid: RATES, gdIterationCap: cap };
  const parts: string[] = [];
  /** Per problem: median time ratio GD/LM, its spread, and whether it is only a lower bound. */
  const perProblem: { median: number; min: number; max: number; lowerBound: boolean }[] = [];
  for (const c of cases(n)) {
    ctx.log(`  (1) ${c.name}`);
    const target = optimum(c) * (1 + RELATIVE);
    let best: { rate: number; passes: number } | null = null;
    const grid: Record<string, number | null> = {};
    for (const rate of RATES) {
      const r = runGD(c, target, rate, cap);
      grid[String(rate)] = r.passes;
      if (r.passes !== null && (best === null || r.passes < best.passes)) best = { rate, passes: r.passes };
    }
    const lm: number[] = [];
    const gd: number[] = [];
    let lmPasses = NaN;
    for (let k = 0; k < runs; k++) {
      const a = runLM(c, target);
      lmPasses = a.passes ?? NaN;
      lm.push(a.ms ?? NaN);
      if (best) {
        gd.push(runGD(c, target, best.rate, cap).ms ?? NaN);
      } else {
        // never reached: the time of the whole capped run is a lower bound
        const t0 = performance.now();
        runGD(c, target, RATES[0], cap);
        gd.push(performance.now() - t0);
      }
    }
    const ratio = statsOf(gd.map((v, k) => v / lm[k]));
    perProblem.push({ median: ratio.median, min: ratio.min, max: ratio.max, lowerBound: best === null });
    details[c.name] = { lmPasses, gdPasses: best?.passes ?? null, bestRate: best?.rate ?? null, lmMs: statsOf(lm), gdMs: statsOf(gd), timeRatio: ratio, grid };
    parts.push(best
      ? `${c.name}: ${fmt(ratio.median)}× (passes ${best.passes} vs ${lmPasses})`
      : `${c.name}: >${fmt(ratio.median)}× (GD not within ${2 * cap} passes; LM ${lmPasses})`);
  }
  const worst = perProblem.reduce((a, b) => (a.median <= b.median ? a : b));
  return {
    id: 1,
    name: 'LM vs gradient descent: time to SSR within 1e-9 of optimum',
    value: worst.median,
    unit: '×',
    spread: [worst.min, worst.max],
    text: parts.join('; '),
    goal: 'LM ≥ 100× faster',
    met: worst.median >= 100,
    details,
  };
}
