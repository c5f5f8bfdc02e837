/**
 * Stops of the iterative solvers: non-finite trial points (rejected, not the
 * end of the fit), the located non-finite stop when no finite step is left,
 * the stagnation stop, option validation, the projected-gradient test of
 * gradient descent and the bounded trace. Problems are small closed forms
 * whose minima are known exactly (calculus, from memory).
 */
import { describe, it, expect } from 'vitest';
import { levenbergMarquardt } from '../../engine/solve/lm';
import { reflectiveTrustRegion } from '../../engine/solve/reflective';
import { gradientDescent } from '../../engine/solve/descent';
import { StagnationWatch } from '../../engine/solve/stagnation';
import { TRACE_HEAD, TRACE_TAIL } from '../../engine/solve/trace';
import { nonFiniteDetail } from '../../engine/solve/messages';
import type { LeastSquaresProblem } from '../../engine/solve/problem';

/**
 * r = exp(θ) − 10 (minimum at θ = ln 10) on two identical rows, with the
 * residuals (or only the Jacobian) NaN beyond θ = `edge`.
 */
function guarded(edge: number, what: 'residuals' | 'jacobian', target = 10): LeastSquaresProblem {
  const bad = (t: Float64Array) => t[0] > edge;
  return {
    n: 2,
    p: 1,
    residuals(t, out) {
      const v = what === 'residuals' && bad(t) ? NaN : Math.exp(t[0]) - target;
      out[0] = v;
      out[1] = v;
    },
    jacobian(t, out) {
      const d = bad(t) ? NaN : Math.exp(t[0]);
      out[0] = d;
      out[1] = d;
    },
  };
}

describe('engine/solve non-finite trial points', () => {
  for (const [name, solve] of [['Levenberg–Marquardt', levenbergMarquardt], ['reflective trust region', reflectiveTrustRegion]] as const) {
    for (const what of ['residuals', 'jacobian'] as const) {
      it(`${name}: a trial with non-finite ${what} shrinks the trust region and the fit still converges`, () => {
        // the first Gauss–Newton step from 0 goes to θ = 9, beyond the edge 2.5
        const out = solve(guarded(2.5, what), Float64Array.of(0));
        expect(out.stop.converged).toBe(true);
        expect(out.theta[0]).toBeCloseTo(Math.log(10), 10);
      });
    }

    it(`${name}: with the minimum beyond the edge, the stop is non_finite with the rows and the parameter values`, () => {
      // exp(θ) − 100 has its minimum at ln 100 ≈ 4.6, beyond the edge 2
      const out = solve(guarded(2, 'residuals', 100), Float64Array.of(0));
      expect(out.stop.code).toBe('non_finite');
      expect(out.stop.converged).toBe(false);
      expect(out.stop.message).toMatch(/^no finite step/);
      expect(out.nonFinite?.rows).toEqual([0, 1]);
      expect(out.nonFinite?.theta[0]).toBeGreaterThan(2);
      // the returned point is the last finite one, at the edge
      expect(out.theta[0]).toBeLessThanOrEqual(2);
      expect(out.theta[0]).toBeGreaterThan(1.99);
    });
  }

  it('non-finite residuals at the starting values end the fit at once, naming them', () => {
    const out = levenbergMarquardt(guarded(-1, 'residuals'), Float64Array.of(0));
    expect(out.stop.code).toBe('non_finite');
    expect(out.stop.message).toBe('the residuals at the starting values are not finite');
    expect(out.nonFinite).toMatchObject({ what: 'residuals', rows: [0, 1], count: 2, theta: [0] });
  });

  it('the located text names data lines, the derivative and the parameter values', () => {
    const text = nonFiniteDetail({ what: 'jacobian', rows: [0, 1, 2, 3, 4], count: 7, parameters: [1], theta: [100, 0] }, ['top', 'ec'], Int32Array.of(2, 3, 14, 15, 26, 27, 38));
    expect(text).toBe('not finite at data lines 2, 3, 14, 15, 26 and 2 more (derivative with respect to ec) with top = 100, ec = 0');
  });
});

describe('engine/solve stagnation', () => {
  it('gradient descent cycling at a learning rate on its stability limit stops as stagnated, far below a huge iteration limit', () => {
    // r = (2θ₁ − 1, θ₂ − 1): a quadratic; rate 1 in scaled coordinates is the stability limit of the scaled iteration (λ_max = 1 per scaled column),
    // here 2.0 makes φ ← φ − 2(φ − φ*) flip around the minimum forever with a constant cost
    const p: LeastSquaresProblem = {
      n: 2,
      p: 2,
      residuals(t, out) { out[0] = 2 * t[0] - 1; out[1] = t[1] - 1; },
      jacobian(_t, out) { out[0] = 2; out[1] = 0; out[2] = 0; out[3] = 1; },
    };
    const out = gradientDescent(p, Float64Array.of(0, 0), { learningRate: 2, maxIterations: 1_000_000_000 });
    expect(out.stop.code).toBe('stagnated');
    expect(out.stop.converged).toBe(false);
    expect(out.iterations).toBeLessThan(1100);
    expect(out.stop.message).toMatch(/^no progress over the last 1000 iterations: the best cost fell by a relative 0/);
  });

  it('the watch fires only when both the best cost and the best point stop moving over the window', () => {
    const w = new StagnationWatch(1, { window: 3, costTolerance: 1e-10, stepTolerance: 1e-6 });
    const x = Float64Array.of(1);
    // the cost improves at every step: no stop
    for (let k = 0; k < 10; k++) expect(w.record(10 - k, x)).toBeNull();
    // now constant: the window must first fill with the constant best
    const got: (object | null)[] = [];
    for (let k = 0; k < 4; k++) got.push(w.record(5, x));
    expect(got.slice(0, 2)).toEqual([null, null]);
    expect(got[3]).toMatchObject({ window: 3, reduction: 0, move: 0 });
  });
});

describe('engine/solve option validation', () => {
  const p = guarded(100, 'residuals');
  it('refuses a relative tolerance of 1 or more, a fractional iteration limit and a negative learning rate', () => {
    const a = levenbergMarquardt(p, Float64Array.of(0), { reductionTolerance: 5 });
    expect(a.stop.code).toBe('failed');
    expect(a.stop.message).toBe('invalid solver option: the reduction tolerance must be at least 0 and below 1: it is relative (got 5)');
    expect(reflectiveTrustRegion(p, Float64Array.of(0), { maxIterations: 1.5 }).stop.message).toMatch(/iteration limit must be a whole number of at least 1 \(got 1\.5\)/);
    expect(gradientDescent(p, Float64Array.of(0), { learningRate: -1 }).stop.message).toMatch(/learning rate must be a positive finite number \(got -1\)/);
  });
});

describe('engine/solve gradient descent at a bound', () => {
  it('stops on the projected gradient when the optimum sits on a bound (the gradient component pushing outwards does not count)', () => {
    // r = (θ + 1, θ + 1) with θ ≥ 0: the minimum is on the bound θ = 0, where ∂/∂θ ½‖r‖² = 2 > 0
    const p: LeastSquaresProblem = {
      n: 2, p: 1, lower: Float64Array.of(0),
      residuals(t, out) { out[0] = t[0] + 1; out[1] = t[0] + 1; },
      jacobian(_t, out) { out[0] = 1; out[1] = 1; },
    };
    const out = gradientDescent(p, Float64Array.of(3), { maxIterations: 100000 });
    expect(out.theta[0]).toBe(0);
    expect(out.stop.converged).toBe(true);
    expect(out.iterations).toBeLessThan(100);
  });
});

describe('engine/solve trace', () => {
  it('keeps the first and the last records of a long run and counts the rest', () => {
    const p: LeastSquaresProblem = {
      n: 2, p: 1,
      residuals(t, out) { out[0] = t[0] - 1; out[1] = t[0] - 1; },
      jacobian(_t, out) { out[0] = 1; out[1] = 1; },
    };
    // a tiny fixed rate: 5000 iterations, no convergence test met (tolerances 0)
    const out = gradientDescent(p, Float64Array.of(0), { learningRate: 1e-6, maxIterations: 5000, gradientTolerance: 0, reductionTolerance: 0, stepTolerance: 0, trace: true });
    const t = out.trace!;
    expect(t.solver).toBe('gradient_descent');
    expect(t.records).toHaveLength(TRACE_HEAD + TRACE_TAIL);
    expect(t.omitted).toBe(5000 - TRACE_HEAD - TRACE_TAIL);
    expect(t.records[0].iteration).toBe(0);
    expect(t.records.at(-1)!.iteration).toBe(4999);
    expect(t.records[TRACE_HEAD].iteration).toBe(5000 - TRACE_TAIL);
  });

  it('Levenberg–Marquardt records every trial with cost, radius and ratio; accepted trials lower the cost', () => {
    const out = levenbergMarquardt(guarded(2.5, 'residuals'), Float64Array.of(0), { trace: true });
    const recs = out.trace!.records;
    expect(recs.some((r) => !r.accepted && r.trialCost === null)).toBe(true); // the non-finite trial
    for (const r of recs) {
      expect(r.radius).toBeGreaterThan(0);
      if (r.accepted) expect(r.trialCost!).toBeLessThan(r.cost);
    }
    expect(recs.filter((r) => r.accepted)).toHaveLength(out.iterations);
  });
});
