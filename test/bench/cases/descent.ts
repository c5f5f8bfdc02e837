/**
 * (1) Levenberg–Marquardt vs gradient descent on the same problems: passes
 * over the data and time until ½‖r‖² is within 1e-9 (relative) of the
 * optimum. Gradient descent runs with the solver's feature scaling and the
 * best learning rate of a small grid (the grid search itself is not timed,
 * which favours gradient descent; each rate is cut off at the passes of the
 * best rate so far, and at `cap` iterations). The optimum is the lowest cost any solver
 * reached with tight tolerances (1e-15). n = 10,000 rows per problem; a pass is
 * one residual or one Jacobian evaluation over all rows.
 */
import { compileModel } from '../../../engine/compile';
import { gradientDescent, levenbergMarquardt, modelProblem, solveLinear } from '../../../engine/solve';
import type { LeastSquaresProblem } from '../../../engine/solve/problem';
import { performance } from 'node:perf_hooks';
import { statsOf } from '../harness';
import { gaussian, rng } from '../../fixtures/random';
import { LOGISTIC_MODEL, logistic4, modelSpec, traced } from '../data';
import { fmt, type BenchRow } from '../report';
import type { BenchContext } from './context';

/**
 * Learning rates (in feature-scaled units; scaled Jacobian columns have unit
 * norm, so λ_max ∈ [1, p]), tried from the middle outwards so that an early
 * success cuts the slow or oscillating ones short.
 */
const RATES = [0.35, 0.5, 0.25, 0.7, 0.15, 1, 0.1, 1.5, 0.05];
const RELATIVE = 1e-9;

interface Case {
  name: string;
  problem: LeastSquaresProblem;
  theta0: Float64Array;
  linear: boolean;
}

function problem(model: string, params: string[], column: string, x: Float64Array, y: Float64Array, theta0: number[], linear: boolean, name: string): Case {
  const spec = modelSpec(model, params);
  const m = compileModel(spec.model, spec.params, [column]);
  return { name, problem: modelProblem({ model: m, columns: [x], response: y, n: x.length }), theta0: Float64Array.from(theta0), linear };
}

/** Invented problems: two linear in their parameters, two not. Starts are the same for both solvers. */
function cases(n: number): Case[] {
  const g = gaussian(rng(11));
  const grid = (a: number, b: number) => Float64Array.from({ length: n }, (_, i) => a + ((b - a) * i) / (n - 1));
  const xl = grid(10, 60);
  const xq = grid(0, 10);
  const t = grid(0, 20);
  const dose = Float64Array.from({ length: n }, (_, i) => 0.001 * 10 ** ((5 * i) / (n - 1)));
  return [
    problem('a + b * x', ['a = 0', 'b = 0'], 'x', xl, xl.map((v) => 3 + 0.8 * v + 0.5 * g()), [0, 0], true, 'line'),
    problem('a + b * x + c * x^2', ['a = 0', 'b = 0', 'c = 0'], 'x', xq, xq.map((v) => 1 + 0.5 * v - 0.03 * v * v + 0.05 * g()), [0, 0, 0], true, 'quadratic'),
    problem('amp * exp(-k * t) + base', ['amp = 3', 'k = 0.2', 'base = 0'], 't', t, t.map((v) => 5 * Math.exp(-0.35 * v) + 1 + 0.05 * g()), [3, 0.2, 0], false, 'exp. decay'),
    problem(LOGISTIC_MODEL, ['bottom = 5', 'top = 90', 'ec50 = 1', 'hill = 1'], 'x', dose, dose.map((v) => logistic4(v, 2, 98, 0.7, 1.3) + g()), [5, 90, 1, 1], false, '4PL'),
  ];
}

function optimum(c: Case): number {
  const tight = { reductionTolerance: 1e-15, stepTolerance: 1e-15, gradientTolerance: 1e-15, maxIterations: 1000 };
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
  const n = ctx.quick ? 200 : 10_000;
  const cap = ctx.quick ? 5000 : 20000;
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
      // a rate that needs more passes than the best so far cannot win: stop it there
      const limit = best ? Math.min(cap, Math.ceil(best.passes / 2) + 1) : cap;
      const r = runGD(c, target, rate, limit);
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
    name: 'LM vs gradient descent: time to SSR within 1e-9 of optimum (smallest ratio of 4 problems)',
    value: worst.median,
    unit: '×',
    spread: [worst.min, worst.max],
    text: parts.join('; '),
    goal: 'LM ≥ 100× faster',
    met: worst.median >= 100,
    details,
  };
}
