/**
 * The statistics of a fit that a spec may name after the fit's name
 * (`expect cal.r2 above 0.99`, `derive lod = 3.3 * cal.rmse / cal.slope`):
 * the one list of their names, with each one's documentation and unit.
 *
 * Derived from here: the plan's `StatisticName` type, the checker's lists,
 * hover and completion texts, the statistics table of LANGUAGE.md
 * (generated). Checked against it: the plan and result schemas' statistic
 * enums (test/registry/schema-parity.test.ts). The engine reads each
 * statistic from a fit result with the getter of the same name in
 * engine/run/statistics.ts, a `Record<StatisticName, …>`: a statistic added
 * here without its getter does not compile.
 */

/**
 * What a statistic's number is measured in: `none` (a pure number),
 * `response` (units of the (weighted) response), `response²`, `count`
 * (a whole number).
 */
export type StatisticUnit = 'none' | 'response' | 'response²' | 'count';

export interface StatisticSpec {
  readonly doc: string;
  readonly unit: StatisticUnit;
}

export const STATISTIC_SPECS = {
  r2: { doc: 'Coefficient of determination R².', unit: 'none' },
  adj_r2: { doc: 'R² adjusted for the number of free parameters.', unit: 'none' },
  rmse: { doc: 'Root mean square of the (weighted) residuals.', unit: 'response' },
  ssr: { doc: 'Sum of squared (weighted) residuals.', unit: 'response²' },
  chi2: { doc: 'Chi-square: sum of squared residuals over sigma² (needs sigma).', unit: 'none' },
  chi2_reduced: { doc: 'Chi-square divided by the degrees of freedom.', unit: 'none' },
  aic: { doc: 'Akaike information criterion.', unit: 'none' },
  aicc: { doc: 'AIC with the small-sample correction.', unit: 'none' },
  bic: { doc: 'Bayesian (Schwarz) information criterion.', unit: 'none' },
  n: { doc: 'Number of data points used.', unit: 'count' },
  dof: { doc: 'Degrees of freedom: points minus free parameters.', unit: 'count' },
  iterations: { doc: 'Iterations the solver took.', unit: 'count' },
} as const satisfies Record<string, StatisticSpec>;

export type StatisticName = keyof typeof STATISTIC_SPECS;

/** Every statistic name, in registry order (the order of LANGUAGE.md and completion). */
export const STATISTICS: readonly StatisticName[] = Object.freeze(Object.keys(STATISTIC_SPECS) as StatisticName[]);

export function isStatisticName(name: string): name is StatisticName {
  return Object.prototype.hasOwnProperty.call(STATISTIC_SPECS, name);
}

/** How each unit reads in docs and hovers. */
export const STATISTIC_UNIT_TEXT: Readonly<Record<StatisticUnit, string>> = {
  none: 'no unit',
  response: 'unit of the response',
  'response²': 'square of the response unit',
  count: 'a count',
};

/** The member after a parameter or derived quantity: its standard error (`expect cal.slope.se below 0.01`). */
export const STDERR_MEMBER = 'se';
export const STDERR_DOC = 'se - standard error of the parameter estimate (or of a derived quantity).';

/**
 * Every member that may follow a parameter or a derived quantity in `expect`
 * (`expect cal.slope.lower above 0.8`), with the value it reads (the plan's
 * `of`) and its doc. The checker, the expectations, hover and LANGUAGE.md read
 * this one list.
 */
/** What an `expect` target reads: the estimate itself, or the member's value (a plain union: the schema generator reads it). */
export type MemberOf = 'estimate' | 'stderr' | 'lower' | 'upper';

export const MEMBER_SPECS = {
  se: { of: 'stderr', doc: STDERR_DOC },
  lower: { of: 'lower', doc: 'lower - lower end of the confidence interval of the estimate, at the fit\'s level (the derived quantity\'s interval for a derived quantity).' },
  upper: { of: 'upper', doc: 'upper - upper end of the confidence interval of the estimate, at the fit\'s level (the derived quantity\'s interval for a derived quantity).' },
} as const satisfies Record<string, { of: Exclude<MemberOf, 'estimate'>; doc: string }>;

export type MemberName = keyof typeof MEMBER_SPECS;
export const MEMBERS: readonly MemberName[] = Object.freeze(Object.keys(MEMBER_SPECS) as MemberName[]);

export function isMember(name: string): name is MemberName {
  return Object.prototype.hasOwnProperty.call(MEMBER_SPECS, name);
}

/** The member's name for a plan `of` ('' for the estimate itself). */
export function memberName(of: MemberOf): string {
  return of === 'estimate' ? '' : MEMBERS.find((m) => MEMBER_SPECS[m].of === of) ?? '';
}

/**
 * Every number of a query an `expect` may test at one point
 * (`expect cal.prediction.lower at conc = 5 above 0.2`): the path after the
 * fit name, the query it is read from (`predict` at a predictor value,
 * `invert` at a response value) and its doc. The checker, the expectations,
 * hover and LANGUAGE.md read this one list. A transformed response
 * (`model ln(rate) = …`) is tested on the response column's scale, as reported.
 */
export const QUERY_MEMBER_SPECS = {
  fitted: { query: 'predict', doc: 'fitted - the fitted value at the predictor value.' },
  'confidence.lower': { query: 'predict', doc: 'confidence.lower - lower limit of the confidence interval of the mean response at the predictor value, at the fit\'s level.' },
  'confidence.upper': { query: 'predict', doc: 'confidence.upper - upper limit of the confidence interval of the mean response at the predictor value.' },
  'prediction.lower': { query: 'predict', doc: 'prediction.lower - lower limit of the prediction interval of one new observation at the predictor value.' },
  'prediction.upper': { query: 'predict', doc: 'prediction.upper - upper limit of the prediction interval of one new observation at the predictor value.' },
  inverse: { query: 'invert', doc: 'inverse - the predictor value read off the curve at the response value.' },
  'inverse.lower': { query: 'invert', doc: 'inverse.lower - lower limit of the inverse-prediction interval of the predictor (fails when the interval is open there).' },
  'inverse.upper': { query: 'invert', doc: 'inverse.upper - upper limit of the inverse-prediction interval of the predictor (fails when the interval is open there).' },
} as const satisfies Record<string, { query: 'predict' | 'invert'; doc: string }>;

export type QueryMemberName = keyof typeof QUERY_MEMBER_SPECS;
export const QUERY_MEMBERS: readonly QueryMemberName[] = Object.freeze(Object.keys(QUERY_MEMBER_SPECS) as QueryMemberName[]);

export function isQueryMember(path: string): path is QueryMemberName {
  return Object.prototype.hasOwnProperty.call(QUERY_MEMBER_SPECS, path);
}
