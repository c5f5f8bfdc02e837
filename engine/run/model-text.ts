/**
 * The model equation and the weighting of a fit as plain data for the result
 * (`FitResult.model`), from its plan: `response = model` as written, and
 * whether points carry relative weights, an absolute σ, or neither. Every
 * view states both (engine/front/views/summary.ts `modelLine`), and derived
 * quantities that read a weighted fit's scale say so (engine/run/derived.ts).
 */
import type { FitPlan } from '../../parser/plan';
import type { FitModelText } from '../result';
import { exprText } from '../../parser/plan-expr';

export function fitModelText(fit: FitPlan): FitModelText {
  const block = fit.blocks[0];
  const equation = `${exprText(block.response)} = ${exprText(block.model)}`;
  if (block.sigma) return { equation, weighting: { kind: 'sigma', expression: exprText(block.sigma) } };
  if (block.weight) return { equation, weighting: { kind: 'weight', expression: exprText(block.weight) } };
  return { equation, weighting: { kind: 'none', expression: null } };
}
