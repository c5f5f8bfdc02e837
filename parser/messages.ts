/**
 * Every user-facing diagnostic: its stable code, default severity and text.
 *
 * Codes are stable (tests, quick fixes and docs key on them); wording may
 * improve. `CODES` is the single list: each code with its severity and when
 * it is reported (the diagnostics table of LANGUAGE.md is generated from it,
 * test/registry/generated.test.ts). Codes are snake_case, as every code the
 * engine writes into JSON (warnings, stops, errors, group flags);
 * test/registry/codes.test.ts holds every registry of codes to that style.
 */
import type { Severity } from './plan';
import { inlineText } from './printable';
import { LOSSES } from './registry/losses';
import { MAX_BOOTSTRAP, MAX_BOOTSTRAP_SEED, MAX_EXPLORE, MIN_BOOTSTRAP } from './registry/options';
import { MAX_NESTING } from './limits';

export const CODES = {
  syntax: { severity: 'error', when: 'the text does not follow the grammar (unexpected or missing token, unknown character, unclosed `"`)' },
  internal: { severity: 'error', when: 'the parser itself failed; please report the spec' },
  nested_too_deeply: { severity: 'error', when: `an expression nests more than ${MAX_NESTING} levels of parentheses, calls and operators (see Expressions)` },
  undefined_name: { severity: 'error', when: 'a name is not a parameter, constant or column (columns known), or a value is not a constant; in `derive`, a name that is no constant or derived quantity above; in `expect`, a single name that is no derived quantity; with "did you mean"' },
  unknown_column: { severity: 'error', when: 'a quoted column or a `per` column is not in the data (columns known)' },
  unknown_data: { severity: 'error', when: '`fit ... on DATA` names no declared data' },
  unknown_fit: { severity: 'error', when: 'predict / invert / compare / expect / a `FIT.NAME` in derive names no declared fit' },
  declared_later: { severity: 'error', when: 'a data, constant, fit or derived quantity is used above its declaration' },
  duplicate_name: { severity: 'error', when: 'data, constant, fit, derived quantity, or parameter within a fit declared twice; a parameter named like a constant; a derived quantity named like a constant, data or fit' },
  duplicate_option: { severity: 'error', when: 'a fit item, data option or parameter part given twice' },
  reserved_name: { severity: 'error', when: 'a constant, parameter or derived quantity named `pi` or `e`' },
  param_column_clash: { severity: 'error', when: 'a parameter has the name of a column of the fit\'s data (columns known)' },
  const_column_clash: { severity: 'error', when: 'a constant has the name of a column of some data (columns known)' },
  unknown_function: { severity: 'error', when: 'a call to a function not in the list; with "did you mean"' },
  arity: { severity: 'error', when: 'a function called with the wrong number of arguments' },
  condition_expected: { severity: 'error', when: '`where` or the first argument of `when` is not a condition' },
  number_expected: { severity: 'error', when: 'a condition where a number is needed' },
  param_not_allowed: { severity: 'error', when: 'a parameter in the response, `sigma` or `weight`' },
  response_no_column: { severity: 'error', when: 'the response reads no column' },
  missing_model: { severity: 'error', when: 'a fit has no `model` line' },
  no_parameter: { severity: 'error', when: 'the model uses no parameter' },
  bounds_order: { severity: 'error', when: 'lower bound not below upper bound (also `within LOW .. HIGH` with LOW > HIGH)' },
  initial_outside_bounds: { severity: 'error', when: 'start value outside the bounds' },
  fixed_without_value: { severity: 'error', when: '`fixed` parameter without `= VALUE`' },
  unknown_option: { severity: 'error', when: 'unknown method, loss, profile mode, bootstrap resampling, delimiter or decimal mark, with "did you mean"; a former name (loss `soft_l1`), with its new name' },
  level_range: { severity: 'error', when: '`level` not strictly between 0 and 1' },
  explore_range: { severity: 'error', when: `\`explore\` not a whole number from 0 to ${MAX_EXPLORE}` },
  bootstrap_range: { severity: 'error', when: `\`bootstrap\` refits not a whole number from ${MIN_BOOTSTRAP} to ${MAX_BOOTSTRAP}` },
  seed_range: { severity: 'error', when: `\`seed\` not a whole number from 0 to ${MAX_BOOTSTRAP_SEED}` },
  not_positive: { severity: 'error', when: '`iterations`, `tolerance`, `rate` or `scale` not greater than 0' },
  not_integer: { severity: 'error', when: '`iterations` not a whole number' },
  inf_not_allowed: { severity: 'error', when: '`inf` anywhere but parameter bounds' },
  number_range: { severity: 'error', when: 'a number too large to be finite (e.g. `1e400`)' },
  empty_path: { severity: 'error', when: '`data NAME = ""`' },
  delimiter_clash: { severity: 'error', when: '`decimal ","` together with `delimiter ","`' },
  unknown_target: { severity: 'error', when: 'an expectation or a `FIT.NAME` in derive names neither a parameter nor a statistic of the fit, `.X` other than `.se`, `.lower`, `.upper`, a fit without `.NAME`, or a derived quantity with a member; a quoted group label (`FIT."GROUP".NAME`) on a fit without `per`, after another member, or with nothing after it' },
  predictor_mismatch: { severity: 'error', when: 'predict/invert on a column the model does not vary with, or on a model without exactly one predictor column' },
  response_mismatch: { severity: 'error', when: 'invert at a column that is not the response, or on a response that reads several columns' },
  compare_too_few: { severity: 'error', when: 'compare lists fewer than two different fits' },
  compare_per_group: { severity: 'error', when: 'compare lists a fit with groups (`per` or several tables) together with a fit without groups' },
  compare_groups_differ: { severity: 'error', when: 'compare lists fits with groups of different columns, data or tables (at run time also: different group labels)' },
  compare_mismatch: { severity: 'error', when: 'compare lists fits on different data or with different responses' },
  compare_within_order: { severity: 'error', when: '`compare A within B` where A has at least as many free parameters as B (a special case has fewer)' },
  method_not_linear: { severity: 'error', when: '`method linear` on a model that is not linear in its free parameters' },
  reference_not_allowed: { severity: 'error', when: 'a `FIT.NAME` reference outside `derive` (in a model, sigma, weight or where)' },
  column_in_derive: { severity: 'error', when: 'a column in a derive expression' },
  shared_without_groups: { severity: 'error', when: 'a parameter marked `shared` in a fit of one table without `per COLUMN` (there are no groups to share it)' },
  joint_not_supported: { severity: 'error', when: 'a fit with `shared` parameters and a robust loss, `method linear` or `method gradient_descent` (a joint fit runs with the squared loss by Levenberg–Marquardt)' },
  repeated_data: { severity: 'error', when: 'a table listed twice in `fit NAME on A, B, …`' },
  table_column_missing: { severity: 'error', when: 'in `fit NAME on A, B, …`, a table after the first lacks a column the fit reads (columns known); at that table\'s name' },
  table_units_differ: { severity: 'error', when: 'in `fit NAME on A, B, …`, a table declares another unit for a column the fit reads than the first table; at that table\'s name' },
  tables_with_per: { severity: 'error', when: 'a fit over several tables with `per COLUMN` (each table is already one curve)' },
  text_or_column: { severity: 'error', when: 'in a `where` condition, a quoted item compared by `==`/`!=` with a column names a column too, so it could be either that column or a text value (columns known)' },
  text_not_allowed: { severity: 'error', when: 'a text value (`\"…\"` that names no column) compared anywhere but in a `where` condition, or with something that is not a column' },
  unused_parameter: { severity: 'warning', when: 'a declared parameter the model does not use' },
  unused_data: { severity: 'warning', when: 'a data table no fit reads' },
  repeated_fit: { severity: 'warning', when: 'a fit listed twice in one compare' },
  option_ignored: { severity: 'warning', when: '`scale` with `loss squared`, `rate` without `method gradient_descent`, or `explore` with `method linear` or `gradient_descent`' },
  new_sigma_needed: { severity: 'error', when: 'predict, invert or an `expect … at` on a fit whose sigma or weight reads a column other than the predictor, without `sigma`/`weight` for the new observation' },
  query_option: { severity: 'error', when: '`readings` on predict or not a whole number ≥ 1; `sigma`/`weight` on a fit without that weighting, twice, with a count other than 1 or one per value, or not > 0; `backcalc` on a fit without one predictor or one response column' },
  unknown_query_member: { severity: 'error', when: 'an `expect FIT.PATH at …` whose path is not a query number (`fitted`, `prediction.lower`, `inverse.upper`, …)' },
  unknown_group: { severity: 'error', when: 'a quoted group label (`FIT."GROUP".NAME` in derive or expect) that is no value of the fit\'s `per` column in its data (labels known), with "did you mean"' },
} as const satisfies Record<string, { severity: Severity; when: string }>;

export type DiagnosticCode = keyof typeof CODES;

/** A name in quotes; names from data headers may hold any character, so controls and line breaks are written escaped (`\u000a`). */
const q = (s: string): string => `'${inlineText(s)}'`;
const list = (xs: readonly string[]): string => xs.map(q).join(', ');

export const MSG = {
  unterminatedString: 'this text has no closing " on its line',
  unclosed: (opener: string, expected: string) => `${q(opener)} is not closed: ${expected}`,
  unexpectedCharacter: (ch: string) => `unexpected character ${q(ch)}`,
  internal: (detail: string) => `internal parser problem (please report it with the spec): ${detail}`,
  nestedTooDeeply: (limit: number) =>
    `expression nested too deeply (limit ${limit} levels of parentheses, function calls and operators)`,

  undefinedName: (name: string) => `${q(name)} is not a parameter, constant or column`,
  notAConstant: (name: string) => `${q(name)} is not a constant`,
  unknownColumn: (name: string, data: string) => `data ${q(data)} has no column ${q(name)}`,
  sharedWithoutGroups: (name: string) =>
    `parameter ${q(name)} is shared, but the fit has no groups to share it: add per COLUMN to fit one curve per value of a column with ${q(name)} common to all, list several tables (fit NAME on A, B, ...), or remove shared`,
  repeatedTable: (name: string) => `table ${q(name)} is listed twice; each table is one curve of the fit`,
  tableColumnMissing: (table: string, cols: readonly string[], first: string) =>
    `table ${q(table)} has no column ${list(cols)}, which the fit reads (as in ${q(first)}); every table of a fit over several tables needs the same columns`,
  tableUnitsDiffer: (column: string, table: string, unit: string, first: string, firstUnit: string) =>
    `column ${q(column)} is in [${inlineText(unit)}] in table ${q(table)} but in [${inlineText(firstUnit)}] in ${q(first)}; the tables of one fit must measure it in one unit (units are labels and are not converted)`,
  tablesWithPer: (fit: string) =>
    `fit ${q(fit)} reads several tables, and each table is one curve; per COLUMN cannot split them further (fit each table per COLUMN separately, or join the tables into one with a column that names the run)`,
  jointNotSupported: (fit: string, what: string) =>
    `fit ${q(fit)} has shared parameters, which are fitted jointly with the squared loss by Levenberg–Marquardt; ${what} is not available for a joint fit`,
  textOrColumn: (text: string, column: string, data: string) =>
    `"${inlineText(text)}" is a column of ${q(data)} and could also be the text ${q(text)} compared with ${q(column)}; ` +
    (/^[A-Za-z_][A-Za-z0-9_]*$/.test(text)
      ? `to compare the two columns write ${text} without quotes; to keep the rows whose ${inlineText(column)} reads ${q(text)}, rename the column ${q(text)} in the file`
      : `to keep the rows whose ${inlineText(column)} reads ${q(text)}, rename the column ${q(text)} in the file`),
  textNotAllowed: (text: string) =>
    `"${inlineText(text)}" names no column; a text value can only be compared with a column by == or != in a data where condition (where compound == "${inlineText(text)}")`,
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
  unknownStderrPath: (name: string) => `after a parameter only .se (standard error), .lower or .upper (its confidence interval) may follow, not ${q(name)}`,
  stderrOfNonParam: (name: string, fit: string) => `${q(name)} is not a parameter of ${q(fit)}, so it has no .se`,
  pathTooLong: 'expected FIT.NAME or FIT.PARAM.se (or .lower, .upper)',
  predictorOther: (fit: string, predictor: string, col: string) =>
    `fit ${q(fit)} varies with ${q(predictor)}, not ${q(col)}`,
  /** Also the engine's message when a query meets such a fit (engine/messages.ts `errorText.noPredictor`). */
  needsOnePredictor: (what: 'predict' | 'invert' | 'backcalc', fit: string, cols: readonly string[]) =>
    `${what} needs a model with exactly one predictor column; ${q(fit)} ${cols.length ? `varies with ${list(cols)}` : 'has none'}`,
  /** Also the engine's message (engine/messages.ts `errorText.wrongResponse`). */
  responseMismatch: (fit: string, col: string, cols: readonly string[]) =>
    cols.length === 1
      ? `${q(col)} is not the response of ${q(fit)} (it reads ${q(cols[0])})`
      : `invert needs a response (left of =) that reads exactly one column; ${q(fit)} reads ${cols.length ? list(cols) : 'no column'}`,
  compareTooFew: 'compare needs at least two different fits',
  compareWithinOrder: (simpler: string, richer: string, p1: number, p2: number) =>
    `compare ${q(simpler)} within ${q(richer)}: ${q(simpler)} has ${p1} free parameter${p1 === 1 ? '' : 's'} and ${q(richer)} ${p2}; the one declared within must have fewer`,
  /** Also the engine's message (engine/run/compare-groups.ts). */
  comparePerGroup: (grouped: string, single: string) =>
    `compare: ${q(grouped)} gives one result per group and ${q(single)} one for all rows; compare a fit with groups with another fit of the same groups (the same model per group, or with shared parameters)`,
  /** Also the engine's message (engine/run/compare-groups.ts). */
  compareGroupsDiffer: (a: string, b: string, ga: string, gb: string) =>
    `compare: ${q(a)} runs ${inlineText(ga)} and ${q(b)} ${inlineText(gb)}; fits with groups compare only over the same groups`,
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
  seNotParameter: (name: string) => `.se follows a parameter (FIT.PARAM.se); ${q(name)} is not a parameter of the fit`,
  derivePathTooLong: 'expected FIT.PARAM or FIT.STAT',
  /** FIT."GROUP".PARAM on a fit without `per COLUMN`. */
  groupOfUngroupedFit: (fit: string, group: string) => `fit ${q(fit)} has no groups (no per COLUMN), so ${JSON.stringify(group)} names none of them; write ${fit}.PARAM`,
  /** A quoted member anywhere but right after the fit name. */
  groupMisplaced: 'a quoted group label goes right after the fit name: FIT."GROUP".PARAM',
  /** FIT."GROUP" with nothing after it. */
  unknownGroup: (fit: string, group: string, column: string) => `fit ${fit} has no group ${JSON.stringify(group)}: no row of its data has that value in column ${q(column)}`,
  groupNeedsMember: (fit: string, group: string) => `expected ${fit}.${JSON.stringify(group)}.PARAM or ${fit}.${JSON.stringify(group)}.STAT`,
  unknownDerived: (name: string) => `no derived quantity named ${q(name)}`,
  unknownDerivedPath: (name: string) => `after a derived quantity only .se (standard error), .lower or .upper (its confidence interval) may follow, not ${q(name)}`,
  deriveClash: (name: string, what: string, line: number) =>
    `${q(name)} is already a ${what} (line ${line}); a derived quantity needs its own name`,
  compareRepeated: (name: string) => `fit ${q(name)} is listed twice`,
  unusedParameter: (name: string) => `parameter ${q(name)} is declared but the model does not use it`,
  unusedData: (name: string) => `data ${q(name)} is not used by any fit`,
  scaleIgnored: `scale only matters for a robust loss (${LOSSES.filter((l) => l !== 'squared').join(', ')}); it is ignored with squared`,
  rateIgnored: 'rate only matters for method gradient_descent; it is ignored here',
  bootstrapRange: (v: number, min: number, max: number) => `bootstrap takes a whole number of refits from ${min} to ${max}, not ${v}`,
  seedRange: (v: number, max: number) => `seed must be a whole number from 0 to ${max}, not ${v}`,
  exploreRange: (v: number, max: number) => `explore must be a whole number from 0 (no search) to ${max}, not ${v}`,
  exploreIgnored: 'explore only matters for the Levenberg–Marquardt solver (method auto or levenberg_marquardt); it is ignored here',
  didYouMean: (names: readonly string[]) => (names.length ? ` - did you mean ${names.map(q).join(' or ')}?` : ''),
  /** Also the engine's refusal (engine/messages.ts `errorText.newSigmaNeeded`). */
  newSigmaNeeded: (fit: string, kind: 'sigma' | 'weight', cols: readonly string[], predictor: string, example: string) =>
    `the ${kind} of ${q(fit)} reads ${list(cols)}, not only the predictor ${q(predictor)}, so the ${kind} of a new observation cannot be read off the curve; state it after the values, e.g. \`${example}\``,
  readingsOnPredict: '`readings` belongs to invert (the mean of several readings of the response); predict is about one new observation',
  readingsCount: (v: number) => `readings must be a whole number of at least 1, not ${v}`,
  spreadUnweighted: (fit: string, kind: 'sigma' | 'weight') =>
    `${q(fit)} has no ${kind} expression; a new observation's spread comes from the fit's residual standard deviation, so \`${kind}\` has no meaning here`,
  spreadOtherKind: (fit: string, has: 'sigma' | 'weight', wrote: 'sigma' | 'weight') =>
    `${q(fit)} is weighted by ${has}, so state the new observation's ${has} (\`${has} …\`), not its ${wrote}`,
  spreadCount: (kind: string, got: number, want: number) => `${kind} needs one value, or one per query value (${want}), not ${got}`,
  optionRepeated: (kind: string) => `${kind} is given twice`,
  backcalcNeeds: (fit: string, what: string) => `backcalc needs a fit with ${what}; ${q(fit)} does not have it`,
  unknownQueryMember: (path: string, members: readonly string[]) => `${q(path)} is not a number of a query; before \`at\` use ${members.join(', ')}`,
} as const;
