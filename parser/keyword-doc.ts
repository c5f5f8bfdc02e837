/**
 * One-line documentation of every keyword and expectation statistic, shared
 * by LANGUAGE.md and the editor (hover, completion).
 */
import type { StatisticName } from './plan';

export const KEYWORD_DOCS: Readonly<Record<string, string>> = {
  data: 'data NAME = "file.csv" [where CONDITION] [delimiter ";"] [decimal ","] - a table of measurements.',
  where: 'where CONDITION - keep only the rows where the condition holds.',
  delimiter: 'delimiter "," | ";" | "tab" - field separator (detected from the header line when absent).',
  decimal: 'decimal "." | "," - decimal mark of the numbers in the file (default ".").',
  const: 'const NAME = NUMBER [UNIT] - a named number, usable in expressions and values.',
  fit: 'fit NAME on DATA { ... } - one least-squares fit of a model to a data table.',
  on: 'fit NAME on DATA - the data table the fit reads.',
  model: 'model RESPONSE = EXPRESSION - what is fitted: the response (a column or an expression of columns) against the model.',
  param: 'param NAME [= START] [in [LOW, HIGH]] [fixed] [UNIT] - a fitted parameter.',
  in: 'in [LOW, HIGH] - bounds of a parameter; use inf or -inf for an open side.',
  fixed: 'fixed - hold the parameter at its given value.',
  sigma: 'sigma EXPRESSION - absolute standard deviation of each point (weights 1/sigma^2, chi-square statistics).',
  weight: 'weight EXPRESSION - relative weight of each point.',
  method: 'method auto | linear | levenberg_marquardt | gradient_descent - the solver (default auto).',
  loss: 'loss squared | huber | soft_l1 | cauchy [scale C] - how residuals are penalised (default squared).',
  scale: 'scale C - residual size where a robust loss starts to down-weight (default 1).',
  level: 'level P - confidence level of intervals and bands, between 0 and 1 (default 0.95).',
  iterations: 'iterations N - iteration limit of iterative solvers.',
  tolerance: 'tolerance T - relative stopping tolerance of iterative solvers (default 1e-10).',
  rate: 'rate R - learning rate for gradient_descent.',
  explore: 'explore N - search N spread-out starting points (0: no search and no check); by default a search runs when a nonlinear parameter has no start, and a small one when a fit without it ends on a bound or beyond what the data resolve.',
  per: 'per COLUMN - fit separately for each distinct value of the column.',
  derive: 'derive NAME = EXPRESSION [UNIT] - a number computed from fit results (FIT.PARAM, FIT.STAT), with a delta-method standard error and interval.',
  predict: 'predict FIT at COLUMN = v1, v2, ... - model values (with intervals) at these predictor values.',
  invert: 'invert FIT at RESPONSE = v1, v2, ... - predictor values at which the model reaches these responses.',
  at: 'at COLUMN = values - the column the query values belong to.',
  compare: 'compare FIT, FIT, ... - side-by-side statistics (AIC, BIC, F-test when nested) of fits.',
  expect: 'expect FIT.TARGET | DERIVED within LOW .. HIGH | above X | below X - a check reported as pass or fail.',
  within: 'within LOW .. HIGH - the value must lie in the closed interval.',
  above: 'above X - the value must be greater than X.',
  below: 'below X - the value must be less than X.',
  and: 'a and b - both conditions hold.',
  or: 'a or b - at least one condition holds.',
  not: 'not a - the condition does not hold.',
  inf: 'inf - infinity, only in parameter bounds.',
};

export const STATISTIC_DOCS: Readonly<Record<StatisticName, string>> = {
  r2: 'Coefficient of determination R².',
  adj_r2: 'R² adjusted for the number of free parameters.',
  rmse: 'Root mean square of the (weighted) residuals.',
  ssr: 'Sum of squared (weighted) residuals.',
  chi2: 'Chi-square: sum of squared residuals over sigma² (needs sigma).',
  chi2_reduced: 'Chi-square divided by the degrees of freedom.',
  aic: 'Akaike information criterion.',
  aicc: 'AIC with the small-sample correction.',
  bic: 'Bayesian (Schwarz) information criterion.',
  n: 'Number of data points used.',
  dof: 'Degrees of freedom: points minus free parameters.',
  iterations: 'Iterations the solver took.',
};

/** Standard error of a parameter estimate or derived quantity: `expect FIT.PARAM.se below X`, `expect LOD.se below X`. */
export const STDERR_DOC = 'se - standard error of the parameter estimate (or of a derived quantity).';
