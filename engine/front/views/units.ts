/**
 * Declared units in labels (`data … units COLUMN [UNIT]`, carried as `FitResult.units`): axis titles, query-table
 * headers and the response-scale statistics. One form everywhere: `conc (ng/mL)`. Labels only, never converted.
 */
import type { FitResult, Weighting } from '../../result';

/** `text (unit)`, or the text alone without a unit. */
export function withUnit(text: string, unit: string | undefined): string {
  return unit ? `${text} (${unit})` : text;
}

/** The declared unit of the fit's response (a plain column only), if any. */
export function responseUnit(fit: Pick<FitResult, 'units'> | undefined): string | undefined {
  return fit?.units?.response;
}

/** The declared unit of the fit's single predictor, if any. */
export function predictorUnit(fit: Pick<FitResult, 'units'> | undefined): string | undefined {
  return fit?.units?.predictor;
}

/**
 * The unit of the fit's residuals, RMSE and (squared) SSR: the response's for an unweighted fit. None for a
 * weighted one: with `sigma` they are in σ units (summary.ts `weightedNote` says so), with relative weights
 * they carry the weights' scale. `weighting`: summary.ts `weightingOf(fit).kind`.
 */
export function residualUnit(fit: Pick<FitResult, 'units'>, weighting: Weighting['kind']): string | undefined {
  return weighting === 'none' ? responseUnit(fit) : undefined;
}

/** The square of a unit, for SSR: `mV²`, `(ng/mL)²` around a compound unit. */
export function squaredUnit(unit: string | undefined): string | undefined {
  if (!unit) return undefined;
  return /^[\p{L}\p{N}°µμΩ%_]+$/u.test(unit) && !/[\^\d]$/.test(unit) ? `${unit}²` : `(${unit})²`;
}
