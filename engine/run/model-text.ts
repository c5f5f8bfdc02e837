/**
 * The model equation and the weighting of a fit as plain data for the result
 * (`FitResult.model`), from its plan: `response = model` as written, and
 * whether points carry relative weights, an absolute σ, or neither. Every
 * view states both (engine/front/views/summary.ts `modelLine`), and derived
 * quantities that read a weighted fit's scale say so (engine/run/derived.ts).
 */
import type { DataSource, FitPlan } from '../../parser/plan';
import type { FitModelText, FitUnits } from '../result';
import { exprText } from '../../parser/plan-expr';

export function fitModelText(fit: FitPlan): FitModelText {
  const block = fit.blocks[0];
  const equation = `${exprText(block.response)} = ${exprText(block.model)}`;
  if (block.sigma) return { equation, weighting: { kind: 'sigma', expression: exprText(block.sigma) } };
  if (block.weight) return { equation, weighting: { kind: 'weight', expression: exprText(block.weight) } };
  return { equation, weighting: { kind: 'none', expression: null } };
}

/**
 * The declared units of a fit's response and predictor (`units COLUMN [UNIT]` of its data), for labels
 * (`FitResult.units`). The response has a unit only when it is a plain column (a transformed response such as
 * `ln(rate)` has none here); undefined when neither has one.
 */
export function fitUnits(fit: FitPlan, data: readonly DataSource[]): FitUnits | undefined {
  const block = fit.blocks[0];
  if (!block) return undefined;
  const declared = data.find((d) => d.name === block.data)?.units;
  if (!declared) return undefined;
  const unitOf = (column: string | undefined) => (column !== undefined && Object.prototype.hasOwnProperty.call(declared, column) ? declared[column] : undefined);
  const out: FitUnits = {};
  const response = block.response.kind === 'column' ? unitOf(block.response.name) : undefined;
  const predictor = unitOf(block.predictor);
  if (response !== undefined) out.response = response;
  if (predictor !== undefined) out.predictor = predictor;
  return out.response !== undefined || out.predictor !== undefined ? out : undefined;
}
