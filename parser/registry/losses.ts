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
}

export const LOSS_SPECS = {
  squared: { rho: 'z', doc: 'ordinary least squares', label: 'squared loss' },
  huber: { rho: 'z for z ≤ 1, else 2√z − 1', doc: 'quadratic near zero, linear in |r| beyond the scale (Huber 1964)', label: 'Huber loss' },
  pseudo_huber: { rho: '2(√(1 + z) − 1)', doc: 'a smooth Huber loss: quadratic near zero, growing like |r| far out', label: 'pseudo-Huber loss' },
  cauchy: { rho: 'ln(1 + z)', doc: 'Cauchy (Lorentzian): large residuals count only logarithmically', label: 'Cauchy loss' },
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
