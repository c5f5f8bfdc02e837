/**
 * Stagnation stop shared by the iterative solvers: besides the iteration
 * limit, a run ends (code `stagnated`, not converged) when over the last
 * `window` iterations neither the objective nor the point made progress:
 *
 *   (best cost W iterations ago − best cost now) ≤ costTolerance · best cost now,  and
 *   max_j |θ*_j − θ*_j(W ago)| ≤ stepTolerance · (|θ*_j| + stepTolerance · scale_j)
 *
 * where θ* is the best point so far (for a monotone method, the current
 * one) and scale_j a typical size of θ_j given by the solver (1 when
 * none). Comparing best values, not the last iterate, also catches a
 * method cycling between points (gradient descent with a learning rate near
 * its stability limit oscillates with a constant cost and gradient).
 *
 * Defaults (each solver's module comment repeats them):
 *   Levenberg–Marquardt and the reflective method: window 50 accepted
 *     iterations, cost 1e-10 (the reduction tolerance), step 1e-6;
 *   gradient descent: window 1000 iterations, cost 1e-12, step 1e-9.
 * At a relative cost decrease of 1e-10 per 50 iterations a further 0.1 %
 * would take ~5·10⁸ iterations; at 1e-12 per 1000, 10⁹: no usable progress.
 * NIST StRD from both certified starts never meets the test before
 * converging (test/strd).
 */
import { workArray } from '../linalg/work-array';

export interface StagnationSettings {
  window: number;
  costTolerance: number;
  stepTolerance: number;
}

export const LM_STAGNATION: StagnationSettings = { window: 50, costTolerance: 1e-10, stepTolerance: 1e-6 };
export const DESCENT_STAGNATION: StagnationSettings = { window: 1000, costTolerance: 1e-12, stepTolerance: 1e-9 };

export interface Stagnation {
  window: number;
  /** Relative decrease of the best cost over the window. */
  reduction: number;
  /** Largest relative move of the best point over the window. */
  move: number;
}

export class StagnationWatch {
  private readonly costs: Float64Array;
  private readonly points: Float64Array;
  private count = 0;
  private bestCost = Infinity;
  private readonly best: Float64Array;

  constructor(private readonly p: number, readonly settings: StagnationSettings, private readonly scale?: Float64Array) {
    this.costs = workArray(settings.window);
    this.points = workArray(settings.window * p);
    this.best = new Float64Array(p);
  }

  /** Record iteration k's cost and point; returns the stagnation when the test holds. */
  record(cost: number, theta: Float64Array): Stagnation | null {
    const { window: w, costTolerance, stepTolerance } = this.settings;
    const p = this.p;
    if (cost < this.bestCost) {
      this.bestCost = cost;
      this.best.set(theta.subarray(0, p));
    }
    const slot = this.count % w;
    let result: Stagnation | null = null;
    if (this.count >= w) {
      const old = this.costs[slot];
      const reduction = (old - this.bestCost) / Math.max(this.bestCost, Number.MIN_VALUE);
      let move = 0;
      let within = true;
      for (let j = 0; j < p; j++) {
        const d = Math.abs(this.best[j] - this.points[slot * p + j]);
        const s = this.scale ? this.scale[j] : 1;
        const limit = stepTolerance * (Math.abs(this.best[j]) + stepTolerance * s);
        if (!(d <= limit)) within = false;
        move = Math.max(move, d / Math.max(Math.abs(this.best[j]), Number.MIN_VALUE));
      }
      if (reduction <= costTolerance && within) result = { window: w, reduction: Math.max(0, reduction), move };
    }
    this.costs[slot] = this.bestCost;
    this.points.set(this.best, slot * p);
    this.count++;
    return result;
  }

  /** The best point recorded so far and its cost. */
  bestPoint(): { cost: number; theta: Float64Array } {
    return { cost: this.bestCost, theta: this.best };
  }
}

/**
 * A reduction or step stop with the scaled gradient measure above this and a
 * predicted relative reduction no larger than the reduction tolerance is not
 * a minimum (shared by Levenberg–Marquardt, the reflective method and
 * gradient descent): the model cannot act on a large gradient, because a
 * Jacobian column has died out (an exponential whose rate ran off: NIST StRD
 * MGH17 from start 1 with sign bounds stopped there with γ = 0.27 and a
 * predicted reduction 7e-16) or because the trust region was cut down by
 * non-finite trial points at the edge of the model's domain. Near a minimum γ
 * is ~√(relative reduction), far below 1e-3; at a zero-residual solution γ is
 * rounding noise, but the predicted reduction of that noise is not small.
 * Such a stop is reported as `non_finite` (when non-finite trials were met)
 * or `stagnated`, never as converged.
 */
export const DEAD_GRADIENT = 1e-3;
