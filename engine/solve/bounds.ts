/**
 * Box constraints l ≤ θ ≤ u for the iterative solvers. Two treatments: the
 * interior reflective method (`reflective.ts`, the default for bounded
 * nonlinear fits) uses the Coleman–Li scaling and strictly feasible points
 * below; Levenberg–Marquardt's projection method and gradient descent use
 * projection with an active set:
 *  - iterates are kept feasible by projecting onto the box, Π(θ)ⱼ = min(uⱼ, max(lⱼ, θⱼ))
 *    (projected Levenberg–Marquardt: Kanzow, Yamashita & Fukushima, "Levenberg–
 *    Marquardt methods with strong local convergence properties for solving
 *    nonlinear equations with convex constraints", J. Comput. Appl. Math. 172
 *    (2004) 375-397);
 *  - a parameter sitting on a bound whose gradient component pushes it
 *    outwards is held fixed for the step (active set, as in Bertsekas,
 *    "Projected Newton methods for optimization problems with simple
 *    constraints", SIAM J. Control Optim. 20 (1982) 221-246), so the step
 *    is computed in the remaining free parameters.
 * "On a bound" means exactly equal after projection.
 */

export function hasBounds(lower: Float64Array | undefined, upper: Float64Array | undefined): boolean {
  if (lower) for (let j = 0; j < lower.length; j++) if (lower[j] > -Infinity) return true;
  if (upper) for (let j = 0; j < upper.length; j++) if (upper[j] < Infinity) return true;
  return false;
}

/** θ ← Π(θ); returns true when any component moved. */
export function project(theta: Float64Array, lower: Float64Array | undefined, upper: Float64Array | undefined): boolean {
  let moved = false;
  for (let j = 0; j < theta.length; j++) {
    const l = lower ? lower[j] : -Infinity;
    const u = upper ? upper[j] : Infinity;
    if (theta[j] < l) { theta[j] = l; moved = true; }
    else if (theta[j] > u) { theta[j] = u; moved = true; }
  }
  return moved;
}

/**
 * Free parameters for the next step: not (θⱼ = lⱼ and gⱼ > 0), not (θⱼ = uⱼ
 * and gⱼ < 0), and not blocked. g is the gradient Jᵀr of ½‖r‖². Writes the
 * free indices to `free` and returns their count.
 */
export function freeSet(
  theta: Float64Array, gradient: Float64Array, lower: Float64Array | undefined, upper: Float64Array | undefined,
  blocked: Uint8Array, free: Int32Array,
): number {
  let q = 0;
  for (let j = 0; j < theta.length; j++) {
    if (blocked[j]) continue;
    if (lower && theta[j] <= lower[j] && gradient[j] > 0) continue;
    if (upper && theta[j] >= upper[j] && gradient[j] < 0) continue;
    free[q++] = j;
  }
  return q;
}

/**
 * The Coleman–Li scaling vector for the interior reflective method
 * (Coleman & Li, SIAM J. Optim. 6 (1996) 418-445, §2): for g = ∇f,
 *   |vⱼ| = uⱼ − θⱼ  when gⱼ < 0 and uⱼ < ∞   (the gradient points at the upper bound),
 *   |vⱼ| = θⱼ − lⱼ  when gⱼ ≥ 0 and lⱼ > −∞  (it points at the lower bound),
 *   |vⱼ| = 1        otherwise (no bound in the descent direction).
 * Writes |vⱼ| to `v` and marks `toward[j]` = 1 when it is a bound distance
 * (then ∂|vⱼ|/∂θⱼ·gⱼ = |gⱼ|, the diagonal term of the Newton system).
 */
export function colemanLiScaling(
  theta: Float64Array, gradient: Float64Array, lower: Float64Array | undefined, upper: Float64Array | undefined,
  v: Float64Array, toward: Uint8Array,
): void {
  for (let j = 0; j < theta.length; j++) {
    const l = lower ? lower[j] : -Infinity;
    const u = upper ? upper[j] : Infinity;
    if (gradient[j] < 0 && u < Infinity) {
      v[j] = u - theta[j];
      toward[j] = 1;
    } else if (gradient[j] >= 0 && l > -Infinity) {
      v[j] = theta[j] - l;
      toward[j] = 1;
    } else {
      v[j] = 1;
      toward[j] = 0;
    }
  }
}

/** Relative offset from a bound for a start that sits on it: INTERIOR_OFFSET·max(1, |bound|), at most 1 % of the box width. */
export const INTERIOR_OFFSET = 1e-10;

/**
 * θ ← a strictly feasible point: projected onto the box, then moved off a
 * bound it sits on by INTERIOR_OFFSET·max(1, |bound|) (at most 1 % of uⱼ − lⱼ).
 * Returns true when any component moved.
 */
export function makeStrictlyFeasible(theta: Float64Array, lower: Float64Array | undefined, upper: Float64Array | undefined): boolean {
  let moved = project(theta, lower, upper);
  for (let j = 0; j < theta.length; j++) {
    const l = lower ? lower[j] : -Infinity;
    const u = upper ? upper[j] : Infinity;
    const width = u - l;
    if (theta[j] <= l) {
      theta[j] = l + Math.min(INTERIOR_OFFSET * Math.max(1, Math.abs(l)), 0.01 * width);
      moved = true;
    } else if (theta[j] >= u) {
      theta[j] = u - Math.min(INTERIOR_OFFSET * Math.max(1, Math.abs(u)), 0.01 * width);
      moved = true;
    }
  }
  return moved;
}
