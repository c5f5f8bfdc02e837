/**
 * Every user-facing diagnostic: its stable code, default severity and text.
 *
 * Codes are stable (tests, quick fixes and docs key on them); wording may
 * improve. LANGUAGE.md lists the same codes. `CODES` is the single list.
 */
import type { Severity } from './plan';
import { inlineText } from './printable';
import { LOSSES } from './registry/losses';

export const CODES = {
  syntax: 'error',
  internal: 'error',
  'nested-too-deeply': 'error',
  'undefined-name': 'error',
  'unknown-column': 'error',
  'unknown-data': 'error',
  'unknown-fit': 'error',
  'declared-later': 'error',
  'duplicate-name': 'error',
  'duplicate-option': 'error',
  'reserved-name': 'error',
  'param-column-clash': 'error',
  'const-column-clash': 'error',
  'unknown-function': 'error',
  arity: 'error',
  'condition-expected': 'error',
  'number-expected': 'error',
  'param-not-allowed': 'error',
  'response-no-column': 'error',
  'missing-model': 'error',
  'no-parameter': 'error',
  'bounds-order': 'error',
  'initial-outside-bounds': 'error',
  'fixed-without-value': 'error',
  'unknown-option': 'error',
  'level-range': 'error',
  'explore-range': 'error',
  'not-positive': 'error',
  'not-integer': 'error',
  'inf-not-allowed': 'error',
  'number-range': 'error',
  'empty-path': 'error',
  'delimiter-clash': 'error',
  'unknown-target': 'error',
  'predictor-mismatch': 'error',
  'response-mismatch': 'error',
  'compare-too-few': 'error',
  'compare-per-group': 'error',
  'compare-mismatch': 'error',
  'method-not-linear': 'error',
  'reference-not-allowed': 'error',
  'column-in-derive': 'error',
  'unused-parameter': 'warning',
  'unused-data': 'warning',
  'repeated-fit': 'warning',
  'option-ignored': 'warning',
} as const satisfies Record<string, Severity>;

export type DiagnosticCode = keyof typeof CODES;

/** A name in quotes; names from data headers may hold any character, so controls and line breaks are written escaped (`\u000a`). */
const q = (s: string): string => `'${inlineText(s)}'`;
const list = (xs: readonly string[]): string => xs.map(q).join(', ');

export const MSG = {
  unterminatedString: 'this text has no closing " on its line',
  unexpectedCharacter: (ch: string) => `unexpected character ${q(ch)}`,
  internal: (detail: string) => `internal parser problem (please report it with the spec): ${detail}`,
  nestedTooDeeply: (limit: number) =>
    `expression nested too deeply (limit ${limit} levels of parentheses, function calls and operators)`,

  undefinedName: (name: string) => `${q(name)} is not a parameter, constant or column`,
  notAConstant: (name: string) => `${q(name)} is not a constant`,
  unknownColumn: (name: string, data: string) => `data ${q(data)} has no column ${q(name)}`,
  unknownData: (name: string) => `no data named ${q(name)}; declare it with: data ${name} = "file.csv"`,
  unknownFit: (name: string) => `no fit named ${q(name)}`,
  declaredLater: (what: string, name: string, line: number) =>
    `${what} ${q(name)} is declared further down (line ${line}); declare it before this statement`,
  duplicate: (what: string, name: string, line: number) => `${what} ${q(name)} is already declared on line ${line}`,
  paramIsConst: (name: string, line: number) => `${q(name)} is already a constant (line ${line}); a parameter needs its own name`,
  duplicateOption: (what: string) => `${what} is given more than once`,
  reservedName: (name: string) => `${q(name)} is a built-in constant and cannot be redeclared`,
  paramColumnClash: (name: string, data: string) =>
    `${q(name)} is both a parameter and a column of ${q(data)}; rename the parameter`,
  constColumnClash: (name: string, data: string) =>
    `${q(name)} is both a constant and a column of ${q(data)}; rename the constant`,
  unknownFunction: (name: string) => `unknown function ${q(name)}`,
  arity: (name: string, expected: number, got: number) =>
    `${name}() takes ${expected} argument${expected === 1 ? '' : 's'}, not ${got}`,
  conditionExpected: 'expected a condition such as x > 0 (comparison with < <= > >= == !=, joined by and/or/not)',
  numberExpected: 'a condition gives true/false, not a number; use when(condition, a, b) to choose a value',
  paramNotAllowed: (name: string, where: string) => `parameter ${q(name)} cannot appear in the ${where}`,
  responseNoColumn: 'the response (left of =) must read at least one column',
  missingModel: (fit: string) => `fit ${q(fit)} has no model line (model RESPONSE = EXPRESSION)`,
  noParameter: 'this model uses no parameter, so there is nothing to fit',
  boundsOrder: (low: string, high: string) => `lower bound ${low} must be below upper bound ${high}`,
  initialOutside: (v: number, low: string, high: string) => `starting value ${v} lies outside the bounds [${low}, ${high}]`,
  fixedWithoutValue: (name: string) => `fixed parameter ${q(name)} needs a value: param ${name} = VALUE fixed`,
  unknownOption: (what: string, value: string, allowed: readonly string[]) =>
    `unknown ${what} ${q(value)}; choose one of ${list(allowed)}`,
  renamedOption: (what: string, value: string, now: string) => `${what} ${q(value)} is now called ${q(now)}`,
  levelRange: (v: number) => `confidence level ${v} must lie strictly between 0 and 1 (e.g. 0.95)`,
  notPositive: (what: string, v: number) => `${what} must be greater than 0, not ${v}`,
  notInteger: (what: string, v: number) => `${what} must be a whole number, not ${v}`,
  infNotAllowed: 'inf is only allowed in parameter bounds',
  numberRange: (text: string) => `${text} is too large to be a finite number`,
  emptyPath: 'the data file path is empty',
  delimiterClash: 'decimal "," cannot be used with delimiter ","; use delimiter ";"',
  unknownTarget: (name: string, fit: string) => `${q(name)} is neither a parameter of ${q(fit)} nor a statistic`,
  unknownStderrPath: (name: string) => `after a parameter only .se (standard error) may follow, not ${q(name)}`,
  stderrOfNonParam: (name: string, fit: string) => `${q(name)} is not a parameter of ${q(fit)}, so it has no .se`,
  pathTooLong: 'expected FIT.NAME or FIT.PARAM.se',
  predictorOther: (fit: string, predictor: string, col: string) =>
    `fit ${q(fit)} varies with ${q(predictor)}, not ${q(col)}`,
  /** Also the engine's message when a query meets such a fit (engine/messages.ts `errorText.noPredictor`). */
  needsOnePredictor: (what: 'predict' | 'invert', fit: string, cols: readonly string[]) =>
    `${what} needs a model with exactly one predictor column; ${q(fit)} ${cols.length ? `varies with ${list(cols)}` : 'has none'}`,
  /** Also the engine's message (engine/messages.ts `errorText.wrongResponse`). */
  responseMismatch: (fit: string, col: string, cols: readonly string[]) =>
    cols.length === 1
      ? `${q(col)} is not the response of ${q(fit)} (it reads ${q(cols[0])})`
      : `invert needs a response (left of =) that reads exactly one column; ${q(fit)} reads ${cols.length ? list(cols) : 'no column'}`,
  compareTooFew: 'compare needs at least two different fits',
  /** Also the engine's message (engine/run/queries.ts). */
  comparePerGroup: (fit: string) => `compare needs fits without "per"; ${q(fit)} runs per group`,
  /** Also the engine's message (engine/run/queries.ts), which also applies when the fits end up with different rows. */
  compareMismatch: (fits: readonly string[]) =>
    `compare: ${list(fits)} do not fit the same rows of the same response; information criteria are not comparable`,
  /** Also the engine's message (engine/run/fit.ts). */
  methodNotLinear: (fit: string) => `method linear needs a model linear in its parameters; ${q(fit)} is not (use levenberg_marquardt or auto)`,
  referenceNotAllowed: (text: string) =>
    `${q(text)} reads a fit result after fitting; FIT.NAME is allowed only in derive (use a parameter, constant or column here)`,
  columnInDerive: (name: string) =>
    `${q(name)} is a column; a derived quantity is computed from fit results (FIT.PARAM, FIT.STAT), constants and earlier derived quantities, not from data`,
  notDeriveName: (name: string) => `${q(name)} is not a constant or a derived quantity declared above`,
  selfReference: (name: string) => `derived quantity ${q(name)} cannot use itself`,
  fitNeedsMember: (fit: string) => `${q(fit)} is a fit; name one of its results: ${fit}.PARAM or ${fit}.STAT`,
  derivedNotFit: (name: string) => `${q(name)} is a derived quantity, not a fit; write ${name} without a member`,
  seInDerive: 'a standard error cannot enter a derived quantity (its own standard error comes from the fit covariance); use FIT.PARAM or FIT.STAT',
  derivePathTooLong: 'expected FIT.PARAM or FIT.STAT',
  unknownDerived: (name: string) => `no derived quantity named ${q(name)}`,
  unknownDerivedPath: (name: string) => `after a derived quantity only .se (standard error) may follow, not ${q(name)}`,
  deriveClash: (name: string, what: string, line: number) =>
    `${q(name)} is already a ${what} (line ${line}); a derived quantity needs its own name`,
  compareRepeated: (name: string) => `fit ${q(name)} is listed twice`,
  unusedParameter: (name: string) => `parameter ${q(name)} is declared but the model does not use it`,
  unusedData: (name: string) => `data ${q(name)} is not used by any fit`,
  scaleIgnored: `scale only matters for a robust loss (${LOSSES.filter((l) => l !== 'squared').join(', ')}); it is ignored with squared`,
  rateIgnored: 'rate only matters for method gradient_descent; it is ignored here',
  exploreRange: (v: number, max: number) => `explore must be a whole number from 0 (no search) to ${max}, not ${v}`,
  exploreIgnored: 'explore only matters for the Levenberg–Marquardt solver (method auto or levenberg_marquardt); it is ignored here',
  didYouMean: (names: readonly string[]) => (names.length ? ` - did you mean ${names.map(q).join(' or ')}?` : ''),
} as const;
