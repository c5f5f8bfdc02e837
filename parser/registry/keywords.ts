/**
 * The keywords of the `.lsq` language: the one list of their spellings, with
 * each one's role and one-line documentation (hover, completion).
 *
 * Derived from here: the lexer's keyword tokens are created by name from this
 * list (parser/tokens.ts; a test checks both hold the same words), the
 * reserved words and the keywords that start a line, completion's statement
 * and fit-body lists, the keyword list of LANGUAGE.md. Checked against it:
 * the TextMate grammar's keyword lists, one per role (test/registry/).
 */
import { METHODS } from './methods';
import { LOSSES } from './losses';

/**
 * - `declaration`, `query`: statements (first on their line);
 * - `data_option`: options of a data statement (`where`, `delimiter`, `decimal`, `units`);
 * - `fit_item`: items of a fit body, one per line;
 * - `part`: words inside a statement or item (`on`, `in`, `fixed`, `scale`, `at`, bounds of `expect`);
 * - `operator`, `constant`: reserved words, never names.
 */
export type KeywordRole = 'declaration' | 'query' | 'data_option' | 'fit_item' | 'part' | 'operator' | 'constant';

export interface KeywordSpec {
  readonly role: KeywordRole;
  /** `SYNTAX - meaning.`: the part before ` - ` is the form, shown as the completion detail. */
  readonly doc: string;
}

export const KEYWORD_SPECS = {
  // statements
  data: { role: 'declaration', doc: 'data NAME = "file.csv" [where CONDITION] [delimiter ";"] [decimal ","] [units COLUMN [UNIT], ...] - a table of measurements.' },
  const: { role: 'declaration', doc: 'const NAME = NUMBER [UNIT] - a named number, usable in expressions and values.' },
  fit: { role: 'declaration', doc: 'fit NAME on DATA { ... } - one least-squares fit of a model to a data table.' },
  derive: { role: 'declaration', doc: 'derive NAME = EXPRESSION [UNIT] - a number computed from fit results (FIT.PARAM, FIT.STAT), with a delta-method standard error and interval.' },
  predict: { role: 'query', doc: 'predict FIT at COLUMN = v1, v2, ... - model values (with intervals) at these predictor values.' },
  invert: { role: 'query', doc: 'invert FIT at RESPONSE = v1, v2, ... - predictor values at which the model reaches these responses.' },
  backcalc: { role: 'query', doc: 'backcalc FIT - every standard of a calibration fit read back through the curve: its predictor from its response, with the inverse interval and the percent deviation from the nominal value.' },
  compare: { role: 'query', doc: 'compare FIT, FIT, ... | compare FIT within FIT - side-by-side statistics (AIC, BIC, F-test when nested) of fits.' },
  expect: { role: 'query', doc: 'expect FIT.TARGET | DERIVED within LOW .. HIGH | above X | below X - a check reported as pass or fail.' },
  // data options
  where: { role: 'data_option', doc: 'where CONDITION - keep only the rows where the condition holds.' },
  delimiter: { role: 'data_option', doc: 'delimiter "," | ";" | "tab" - field separator (detected from the header line when absent).' },
  decimal: { role: 'data_option', doc: 'decimal "." | "," - decimal mark of the numbers in the file (default ".").' },
  units: { role: 'data_option', doc: 'units COLUMN [UNIT], COLUMN [UNIT], ... - the unit of each listed column, shown in axis titles, query tables and the response-scale statistics.' },
  // fit body
  model: { role: 'fit_item', doc: 'model RESPONSE = EXPRESSION - what is fitted: the response (a column or an expression of columns) against the model.' },
  param: { role: 'fit_item', doc: 'param NAME [= START] [in [LOW, HIGH]] [fixed] [shared] [UNIT] - a fitted parameter.' },
  sigma: { role: 'fit_item', doc: 'sigma EXPRESSION - absolute standard deviation of each point (weights 1/sigma^2, chi-square statistics).' },
  weight: { role: 'fit_item', doc: 'weight EXPRESSION - relative weight of each point.' },
  method: { role: 'fit_item', doc: `method ${METHODS.join(' | ')} - the solver (default auto).` },
  loss: { role: 'fit_item', doc: `loss ${LOSSES.join(' | ')} [scale C] - how residuals are penalised (default squared).` },
  level: { role: 'fit_item', doc: 'level P - confidence level of intervals and bands, between 0 and 1 (default 0.95).' },
  iterations: { role: 'fit_item', doc: 'iterations N - iteration limit of iterative solvers.' },
  tolerance: { role: 'fit_item', doc: 'tolerance T - relative stopping tolerance of iterative solvers (default 1e-10).' },
  rate: { role: 'fit_item', doc: 'rate R - learning rate for gradient_descent.' },
  explore: { role: 'fit_item', doc: 'explore N - search N spread-out starting points (0: no search and no check); by default a search runs when a nonlinear parameter has no start, and a small one when a fit without it ends on a bound or beyond what the data resolve.' },
  profile: { role: 'fit_item', doc: 'profile auto | always | never - profile-likelihood intervals of the parameters beside the symmetric ones (default auto: single nonlinear fits of moderate size).' },
  bootstrap: { role: 'fit_item', doc: 'bootstrap N [cases | residuals | adjusted] [seed S] - N seeded bootstrap refits for percentile and BCa intervals of the parameters and derived quantities (residual resampling by default).' },
  per: { role: 'fit_item', doc: 'per COLUMN - fit separately for each distinct value of the column.' },
  // parts of statements and items
  on: { role: 'part', doc: 'fit NAME on DATA - the data table the fit reads.' },
  in: { role: 'part', doc: 'in [LOW, HIGH] - bounds of a parameter; use inf or -inf for an open side.' },
  fixed: { role: 'part', doc: 'fixed - hold the parameter at its given value.' },
  shared: { role: 'part', doc: 'shared - in a fit with per COLUMN: one value of the parameter for every group, fitted jointly with the others, which each group fits for itself.' },
  scale: { role: 'part', doc: 'scale C - residual size where a robust loss starts to down-weight (default 1).' },
  seed: { role: 'part', doc: 'seed S - start of the bootstrap\'s random streams (whole number; default 1), so a run reproduces.' },
  at: { role: 'part', doc: 'at COLUMN = values - the column the query values belong to.' },
  readings: { role: 'part', doc: 'readings M - invert from the mean of M replicate readings of the response (new-reading variance divided by M).' },
  within: { role: 'part', doc: 'within LOW .. HIGH - the value must lie in the closed interval; in compare A within B, A is declared a special case of B.' },
  above: { role: 'part', doc: 'above X - the value must be greater than X.' },
  below: { role: 'part', doc: 'below X - the value must be less than X.' },
  // reserved words
  and: { role: 'operator', doc: 'a and b - both conditions hold.' },
  or: { role: 'operator', doc: 'a or b - at least one condition holds.' },
  not: { role: 'operator', doc: 'not a - the condition does not hold.' },
  inf: { role: 'constant', doc: 'inf - infinity, only in parameter bounds.' },
} as const satisfies Record<string, KeywordSpec>;

export type KeywordName = keyof typeof KEYWORD_SPECS;

/** Every keyword, in registry order. */
export const KEYWORD_NAMES: readonly KeywordName[] = Object.freeze(Object.keys(KEYWORD_SPECS) as KeywordName[]);

export function isKeyword(word: string): word is KeywordName {
  return Object.prototype.hasOwnProperty.call(KEYWORD_SPECS, word);
}

/** The keywords of some roles, in registry order. */
export function keywordsWithRole(...roles: readonly KeywordRole[]): KeywordName[] {
  return KEYWORD_NAMES.filter((k) => roles.includes(KEYWORD_SPECS[k].role));
}

/** Reserved words: never names (operators and `inf`). */
export const RESERVED_ROLES: readonly KeywordRole[] = ['operator', 'constant'];
/** Roles whose keyword, first on its line, always starts a statement, fit item or data option (parser/tokens.ts). */
export const LINE_START_ROLES: readonly KeywordRole[] = ['declaration', 'query', 'data_option', 'fit_item'];
