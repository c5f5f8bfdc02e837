/**
 * Losses (`loss …` in a fit): the one list of their names, with the ρ(z) each
 * applies to z = (r/c)² (engine/solve/loss.ts, which implements them by
 * name), a doc line and the label the views print. Derived from it: the
 * plan's `LossKind` type, the checker (with the former names it still
 * recognises), completion, the keyword doc of `loss`, LANGUAGE.md's table.
 * Checked against it: the schemas' loss enums, the TextMate value list.
 */

export interface LossSpec {
  /** ρ(z) of the loss, z = (residual / scale)² (cost ½·Σ c²·ρ(z)). */
  readonly rho: string;
  readonly doc: string;
  readonly label: string;
  /**
   * Tuning constant k: without a `scale`, the scale is k times the robust
   * spread of the residuals (engine/solve/loss.ts). Huber 1.345 and Cauchy
   * 2.385 give 95 % asymptotic efficiency at the normal distribution
   * (Holland & Welsch, Comm. Statist. Theory Methods 6 (1977) 813-827;
   * values from memory, common practice); pseudo-Huber takes Huber's, whose
   * loss it smooths; squared loss has none (1, unused).
   */
  readonly tuning: number;
}

export const LOSS_SPECS = {
  squared: { rho: 'z', doc: 'ordinary least squares', label: 'squared loss', tuning: 1 },
  huber: { rho: 'z for z ≤ 1, else 2√z − 1', doc: 'quadratic near zero, linear in |r| beyond the scale (Huber 1964)', label: 'Huber loss', tuning: 1.345 },
  pseudo_huber: { rho: '2(√(1 + z) − 1)', doc: 'a smooth Huber loss: quadratic near zero, growing like |r| far out', label: 'pseudo-Huber loss', tuning: 1.345 },
  cauchy: { rho: 'ln(1 + z)', doc: 'Cauchy (Lorentzian): large residuals count only logarithmically', label: 'Cauchy loss', tuning: 2.385 },
} as const satisfies Record<string, LossSpec>;

export type LossKind = keyof typeof LOSS_SPECS;
export const LOSSES: readonly LossKind[] = Object.freeze(Object.keys(LOSS_SPECS) as LossKind[]);

export function isLoss(name: string): name is LossKind {
  return Object.prototype.hasOwnProperty.call(LOSS_SPECS, name);
}

/**
 * Former names of losses. A spec that still uses one gets a located error
 * with the new name as its "did you mean" (and quick fix), never a silent
 * acceptance.
 */
export const RENAMED_LOSSES: Readonly<Record<string, LossKind>> = Object.freeze({ soft_l1: 'pseudo_huber' });
