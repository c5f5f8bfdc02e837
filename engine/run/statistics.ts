/**
 * How each statistic a spec may name (`expect FIT.STAT`, `derive … FIT.STAT`,
 * parser/registry/statistics.ts) is read from a fit result. Keyed by the
 * registry's names: a statistic added there without a getter here does not
 * compile. Expectations, derived quantities and the editor's hover all read
 * statistics through `statisticValue`, so they cannot disagree.
 */
import type { StatisticName } from '../../parser/registry/statistics';
import type { FitResult } from '../result';

/** The number of statistic `name` in a fit result; null when the fit has none (e.g. χ² without sigma). */
export const STATISTIC_GETTERS: Readonly<Record<StatisticName, (r: FitResult) => number | null>> = {
  r2: (r) => r.goodness.r2,
  adj_r2: (r) => r.goodness.adjR2,
  rmse: (r) => r.goodness.rmse,
  ssr: (r) => r.goodness.ssr,
  chi2: (r) => r.goodness.chi2,
  chi2_reduced: (r) => r.goodness.chi2Reduced,
  aic: (r) => r.goodness.aic,
  aicc: (r) => r.goodness.aicc,
  bic: (r) => r.goodness.bic,
  n: (r) => r.goodness.n,
  dof: (r) => r.goodness.dof,
  iterations: (r) => r.iterations,
};

/**
 * The number an expectation or derived quantity reads from a fit result
 * (NaN when it cannot be computed: a result read back from JSON carries
 * null for NaN).
 */
export function statisticValue(result: FitResult, name: StatisticName): number {
  return STATISTIC_GETTERS[name](result) ?? NaN;
}
