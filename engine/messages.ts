/**
 * User-facing texts of fit warnings and run errors, in one place so that the
 * CLI, reports and the editor say the same thing. Each function returns one
 * sentence (or two) without trailing newline; numbers are shown with
 * `num()` (engine/format.ts, 6 significant digits), p-values with `pClause`.
 * The thresholds the warnings name are engine/thresholds.ts.
 */
import type { WarningCode } from './result';
import { MSG } from '../parser/messages';
import { quoted } from '../parser/printable';
import { DIGITS, formatNumber, formatWritten, pClause } from './format';
import { CORRELATION_SYMBOL, THRESHOLDS } from './thresholds';

/** At most 10 line numbers, then how many more. */
export function listLines(lines: ArrayLike<number>): string {
  const shown = Array.from({ length: Math.min(lines.length, 10) }, (_, i) => lines[i]).join(', ');
  return lines.length > 10 ? `${shown} and ${lines.length - 10} more` : shown;
}

/** A number inside a message: the one policy of engine/format.ts, `DIGITS.value` significant digits (infinities as `inf`). */
export function num(x: number): string {
  return formatWritten(x);
}

export const warningText = {
  at_bound: (param: string, side: 'lower' | 'upper', bound: number) =>
    `${param} ended at its ${side} bound ${num(bound)}; the optimum may lie outside the bounds, and its standard error and interval ignore the bound`,
  high_correlation: (a: string, b: string, rho: number) =>
    `${a} and ${b} are strongly correlated (${CORRELATION_SYMBOL} = ${formatNumber(rho, DIGITS.statistic)}); the data hardly separate them - consider fixing one or reparametrising`,
  ill_conditioned: (condition: number) =>
    `the fit is ill-conditioned (condition number ${num(condition)} > ${num(THRESHOLDS.condition)}); standard errors may be unreliable - consider rescaling the predictor or the parameters`,
  few_dof: (n: number, p: number) =>
    n <= p
      ? `${n} data points for ${p} free parameters: the fit cannot be judged (needs more points than parameters)`
      : `only ${n - p} degrees of freedom (${n} points, ${p} free parameters); intervals are wide and tests weak`,
  no_convergence: (reason: string) => `the solver did not converge: ${reason}; the estimates are not an optimum`,
  residual_pattern: (detail: string) => `the residuals show a pattern (${detail}); the model may miss a trend in the data`,
  non_normal_residuals: (w: number, p: number) =>
    `the residuals do not look normally distributed (Shapiro–Wilk W = ${formatNumber(w, DIGITS.statistic)}, ${pClause(p)}); intervals assume normal errors`,
  r2_nonlinear: () => `the model is nonlinear in its parameters: R² is descriptive only, not a test of fit`,
  rows_dropped: (dropped: number, file: string) =>
    `${dropped} row${dropped === 1 ? '' : 's'} of ${file} dropped for empty or NA cells in the columns this fit uses`,
  /** Also code 'rows_dropped': rows of a per-group fit without a group value. */
  rows_without_group: (rows: number, file: string, column: string) =>
    `${rows} row${rows === 1 ? '' : 's'} of ${file} ha${rows === 1 ? 's' : 've'} no value in the group column ${column} and belong${rows === 1 ? 's' : ''} to no group`,
  /** Also code 'rows_dropped': rows a weight of 0 leaves out of the fit (listed in the result's `excluded`). */
  rows_excluded: (rows: number, file: string, lines: ArrayLike<number>) =>
    `${rows} row${rows === 1 ? '' : 's'} of ${file} ha${rows === 1 ? 's' : 've'} weight 0 and ${rows === 1 ? 'is' : 'are'} left out of the fit (line${rows === 1 ? '' : 's'} ${listLines(lines)}); ${rows === 1 ? 'it is' : 'they are'} still drawn`,
  rank_deficient: (rank: number, p: number, params: string[]) =>
    `the parameters are not all determined by the data (rank ${rank} of ${p})${params.length ? `; check ${params.join(', ')}` : ''}`,
  guessed_start: (params: string[], how: string) =>
    `starting value${params.length === 1 ? '' : 's'} for ${params.join(', ')} guessed (${how}); give "= value" to choose your own`,
  lower_minimum: (startSsr: number, ssr: number, points: number, given: boolean, mark?: string) =>
    `from the ${given ? 'given' : 'guessed'} starting values the fit stops at a local minimum (SSR ${num(startSsr)}${mark ? `, where ${mark}` : ''}); the search over ${points} starting points found a lower one (SSR ${num(ssr)}), which is reported here - check that it makes sense for your data`,
  retried_start: (first: string, from: 'own_start' | 'search', recovered: boolean) =>
    recovered
      ? `the fit from the shared starting values did not converge (${first}); this group was fitted again from ${from === 'own_start' ? 'starting values computed from its own data' : 'a multi-start search on its own data'}, which converged`
      : `the fit from the shared starting values did not converge (${first}), nor did fits from starting values computed from its own data and a multi-start search on it; the first attempt is reported`,
} satisfies Record<WarningCode, (...args: never[]) => string> & Record<string, (...args: never[]) => string>;

/** Notes added to a fit's stop message by the multi-start search (engine/run/fit.ts). */
export const searchText = {
  sameMinimum: 'solved from a point the multi-start search refined (the starting values lead to the same minimum)',
  lowerElsewhere: (startSsr: number) => `the multi-start search found this minimum below the one reached from the starting values (SSR ${num(startSsr)})`,
  /** The check of a fit without a search (engine/solve/start/check.ts) ran the search because of `mark`. */
  checkLower: (mark: string, startSsr: number) =>
    `the starting values lead to SSR ${num(startSsr)}, where ${mark}; the search this ran found this lower minimum`,
  lowerUnconverged: (ssr: number) => `the multi-start search also reached SSR ${num(ssr)}, lower than this minimum, where the solver did not converge: this may not be the lowest minimum`,
  unconvergedLower: (ssr: number, reported: number) =>
    `the search reached a lower sum of squares (${num(ssr)}) than the reported minimum (${num(reported)}) at a point where the solver did not converge; the reported fit may not be the lowest minimum`,
} as const;

/** Why a query or an expectation that reads a fit which did not converge gives no numbers (engine/run/queries.ts, expectations.ts). */
export const withheldText = {
  query: (fit: string, what: string, stop: string) => `Withheld: fit ${fit} did not converge (${stop}), so its ${what} would come from values that are not estimates.`,
  expectation: (target: string, fit: string, stop: string) => `${target}: not checked, fit ${fit} did not converge (${stop}); its values are not estimates`,
} as const;

/** Notes of derived quantities (engine/run/derived.ts): how the uncertainty was obtained, or why a number is missing. */
export const derivedText = {
  noResult: (fit: string) => `fit ${fit} has no result`,
  noGroup: (fit: string, group: string) => `fit ${fit} has no group ${group}`,
  fitFailed: (fit: string, reason: string) => `fit ${fit} failed (${reason})`,
  notConverged: (fit: string) => `withheld: fit ${fit} did not converge, so its values are not estimates`,
  noParameter: (fit: string, name: string) => `fit ${fit} has no parameter ${name}`,
  unknownDerived: (name: string) => `no derived quantity ${name} above this one`,
  dependsOnBroken: (name: string) => `it reads ${name}, which could not be evaluated`,
  notComputable: (what: string) => `${what} could not be computed`,
  notFinite: 'the value is not a finite number (e.g. a division by zero or the logarithm of a non-positive number)',
  compileFailed: (detail: string) => `the expression could not be evaluated (${detail})`,
  noFreeParameter: 'it reads no free parameter, so it has no standard error',
  noCovariance: (fits: string[]) => `no standard error: the parameter covariance of ${fits.join(', ')} is not available (see the fit warnings)`,
  badGradient: 'no standard error: a derivative of the expression is not finite at the estimates',
  deltaOne: (fit: string) => `standard error by the delta method (first order) from the parameter covariance of ${fit}`,
  deltaMany: (fits: string[]) =>
    `standard error by the delta method (first order) from the parameter covariances of ${fits.join(', ')}, parameters of different fits treated as independent`,
  fixedStatistics: (names: string[]) => `${names.join(', ')} taken as fixed (${names.length === 1 ? 'its' : 'their'} own uncertainty is not included)`,
  tInterval: (level: string, dof: number) => `${level} Student-t interval with ${dof} degrees of freedom`,
  normalInterval: (level: string) => `${level} normal interval`,
  levelsDiffer: 'the fits have different confidence levels, so the interval uses 95%',
  noInterval: 'no interval: the fit has no degrees of freedom',
} as const;

/** Why an input file cannot be read (engine/io/input.ts): only regular files are read. */
export const inputText = {
  notRegular: (kind: 'directory' | 'fifo' | 'device' | 'socket' | 'other') =>
    `it is ${({ directory: 'a folder', fifo: 'a named pipe', device: 'a device', socket: 'a socket', other: 'a special file' } as const)[kind]}, not a regular file (only regular files are read)`,
  missing: 'no such file',
  unreadable: (code: string) => `it cannot be opened (${code})`,
  tooLarge: (maxBytes: number) => `it is larger than ${Math.round(maxBytes / 1024 / 1024)} MB, the most read here`,
} as const;

/** Refusals of the output guard (engine/io/guard.ts), shared by the CLI and the editor's export. */
export const outputText = {
  /** `what` names the output (`--json`, `a chart of --report`, `the export`); `input` comes from `inputName`. */
  isInput: (output: string, what: string, input: string, alias: boolean) =>
    `refusing to write ${output} (${what}): it is ${input}${alias ? ' under another name (a link)' : ''}; inputs are never written, so nothing was written`,
  inputName: (input: { role: 'spec' | 'file'; path: string } | { role: 'data'; name: string; path: string }) =>
    input.role === 'data' ? `the data file "${input.path}" (data ${input.name})` : input.role === 'spec' ? 'the spec of this run' : `the file ${input.path} that this command reads`,
  sameTarget: (output: string, first: string, second: string) =>
    `${first === second ? `two outputs (${first})` : `${first} and ${second}`} would both write ${output}; nothing was written`,
  /** Where only uris can be compared (file systems other than the local one). */
  isInputUri: 'refusing to write over the spec or one of its data files; inputs are never written, so nothing was written',
} as const;

/**
 * Texts of run errors that are not data-file errors. The spec-level ones
 * (a query or option the spec itself rules out) are the checker's messages
 * (parser/messages.ts): `check` reports them before a run, the engine keeps
 * them as a guard.
 */
export const errorText = {
  unknownData: (fit: string, data: string) => `fit ${fit} uses data "${data}", which is not declared`,
  noRows: (fit: string, file: string) => `fit ${fit} has no usable rows in ${file} after dropping empty cells and applying the filter`,
  notEnoughRows: (fit: string, n: number, p: number) => `fit ${fit} has ${n} usable row${n === 1 ? '' : 's'} for ${p} free parameter${p === 1 ? '' : 's'}: at least ${p} are needed, more to estimate the scatter`,
  nonFinite: (fit: string, what: string, row: number) => `fit ${fit}: ${what} is not a finite number at data line ${row}`,
  badSigma: (fit: string, row: number, value: number) => `fit ${fit}: sigma must be positive and finite, got ${num(value)} at data line ${row}`,
  sigmaOutOfRange: (fit: string, row: number, value: number) =>
    `fit ${fit}: sigma ${num(value)} at data line ${row} is out of range: its weight 1/σ² is not a finite positive double (|σ| must lie between about 1e-154 and 1e154); give the response and sigma in other units`,
  badWeight: (fit: string, row: number, value: number) => `fit ${fit}: weight must be non-negative and finite (0 leaves a row out), got ${num(value)} at data line ${row}`,
  unknownFit: (name: string) => `no fit named ${name}`,
  fixedWithoutValue: (fit: string, names: string[]) => `fit ${fit}: fixed parameter${names.length > 1 ? 's' : ''} ${names.join(', ')} need${names.length > 1 ? '' : 's'} a value`,
  noPredictor: (fit: string, what: 'predict' | 'invert', columns: readonly string[]) => MSG.needsOnePredictor(what, fit, columns),
  noPoints: (fit: string, what: 'predict' | 'invert') => `${what} on fit ${fit}, which has no fitted points (see its error)`,
  wrongVariable: (fit: string, given: string, predictor: string) => MSG.predictorOther(fit, predictor, given),
  wrongResponse: (fit: string, given: string, columns: readonly string[]) => MSG.responseMismatch(fit, given, columns),
  comparePerGroup: (fit: string) => MSG.comparePerGroup(fit),
  compareMismatch: (fits: readonly string[]) => MSG.compareMismatch(fits),
  methodNotLinear: (fit: string) => MSG.methodNotLinear(fit),
  internal: (fit: string, message: string) => `fit ${fit} could not be completed: ${message}`,
} as const;

/** `file:line:column` (column = 1-based field number), or `file:line` without a column. */
export function dataPlace(file: string, line: number, field?: number): string {
  return field === undefined ? `${file}:${line}` : `${file}:${line}:${field}`;
}

/** Texts of data-file errors (engine/data): each starts with its place in the file. */
export const dataText = {
  emptyFile: (file: string) => `${file} is empty: expected a header line naming the columns`,
  noHeader: (file: string) => `${file} has no header line: it holds only blank lines and delimiters`,
  delimiterConflict: 'the comma cannot be both the delimiter and the decimal mark; use delimiter ";" with decimal ","',
  tooManyFields: (place: string, fields: number, width: number, delimiter: string) =>
    `${place}: ${fields} fields where the header has ${width} (${delimiter}-separated); field ${width + 1} has no column`,
  tooFewFields: (place: string, fields: number, width: number, delimiter: string, missing: string) =>
    `${place}: ${fields} field${fields === 1 ? '' : 's'} where the header has ${width} (${delimiter}-separated); column ${missing} is missing`,
  unclosedQuote: (place: string, column: string) =>
    `${place}: the quoted cell of ${column} that opens here is never closed (a closing " is missing)`,
  textAfterQuote: (place: string, column: string) =>
    `${place}: text after the closing quote of a quoted cell in ${column}; a quote inside a quoted cell must be doubled ("")`,
  /** A column in messages: `"name" (field k)`, or `field k` past the header. */
  column: (name: string | undefined, field: number) => (name === undefined ? `field ${field}` : `${quoted(name)} (field ${field})`),
  headerTooLong: (file: string, cap: number) =>
    `the header of ${file} does not end within its first ${cap / 1048576} MiB; its columns are not checked (a header longer than that is taken as a broken file)`,
  headTooLong: (file: string, cap: number) => `the header of ${file} does not end within its first ${cap / 1048576} MiB, so no spec can be started from it`,
  noDataRows: (fit: string, file: string) => `fit ${fit}: ${file} has a header but no data rows`,
  allRowsMissing: (fit: string, file: string, rows: number, columns: string[]) =>
    `fit ${fit}: every one of the ${rows} data row${rows === 1 ? '' : 's'} of ${file} has an empty or NA cell in a column the fit uses (${columns.join(', ')}), so no row is left (the first such cell is here)`,
  allRowsFiltered: (fit: string, file: string, rows: number) =>
    `fit ${fit}: the where condition of the data statement leaves none of the ${rows} usable row${rows === 1 ? '' : 's'} of ${file}`,
  tooFewRows: (fit: string, file: string, n: number, p: number, left: { dropped: number; filtered: number; excluded: number }) => {
    const why = [
      left.dropped > 0 ? `${left.dropped} dropped for an empty or NA cell` : '',
      left.filtered > 0 ? `${left.filtered} left out by the where condition` : '',
      left.excluded > 0 ? `${left.excluded} left out by a weight of 0` : '',
    ].filter(Boolean).join(', ');
    return `fit ${fit}: ${file} leaves ${n} usable row${n === 1 ? '' : 's'}${why ? ` (${why})` : ''} for ${p} free parameter${p === 1 ? '' : 's'}: at least ${p} are needed, more to estimate the scatter`;
  },
  allRowsExcluded: (fit: string, file: string, rows: number, what: string) =>
    `fit ${fit}: every one of the ${rows} usable row${rows === 1 ? '' : 's'} of ${file} has ${what}, which leaves it out of the fit, so no row is left`,
} as const;
