/**
 * User-facing texts of fit warnings and run errors, in one place so that the
 * CLI, reports and the editor say the same thing. Each function returns one
 * sentence (or two) without trailing newline; numbers are shown with
 * `num()` (engine/format.ts, 6 significant digits), test statistics and per-row
 * measures with `stat()` (4, as in the tables), p-values with `pClause`/`formatP`.
 * The thresholds the warnings name are engine/thresholds.ts.
 */
import type { ProfileEnd } from './result';
import type { WarningCode } from './result';
import type { Bound } from '../parser/plan';
import { MSG } from '../parser/messages';
import { quoted } from '../parser/printable';
import { DIGITS, formatNumber, formatP, formatWritten, pClause } from './format';
import { CORRELATION_SYMBOL, THRESHOLDS } from './thresholds';

/** At most 10 line numbers, then how many more. */
export function listLines(lines: ArrayLike<number>): string {
  const shown = Array.from({ length: Math.min(lines.length, 10) }, (_, i) => lines[i]).join(', ');
  return lines.length > 10 ? `${shown} and ${lines.length - 10} more` : shown;
}

/** Correlated parameter pairs named in the `high_correlation` text (its `pairs` field has all of them). */
export const CORRELATED_PAIRS_IN_TEXT = 3;

/** Rows named in a warning's text (its `rows` field has all of them). */
const ROWS_IN_TEXT = 5;

/** The first ROWS_IN_TEXT row numbers, then how many more. */
export function rowList(rows: readonly number[]): string {
  const shown = rows.slice(0, ROWS_IN_TEXT).join(', ');
  return rows.length > ROWS_IN_TEXT ? `${shown} and ${rows.length - ROWS_IN_TEXT} more` : shown;
}

/** `7 (D = 1.39), 9 (D = 1.2)`: the first ROWS_IN_TEXT rows with a value each, then how many more. */
function rowValues(rows: readonly number[], values: readonly number[], label: string): string {
  const shown = rows.slice(0, ROWS_IN_TEXT).map((r, i) => `${r} (${label} = ${stat(values[i])})`).join(', ');
  return rows.length > ROWS_IN_TEXT ? `${shown} and ${rows.length - ROWS_IN_TEXT} more` : shown;
}

/** A number inside a message: the one policy of engine/format.ts, `DIGITS.value` significant digits (infinities as `inf`). */
export function num(x: number): string {
  return formatWritten(x);
}

/** A test statistic or a per-row measure (F, t, h, D, a cut-off) inside a message: `DIGITS.statistic` significant digits, as in the tables. */
function stat(x: number): string {
  return formatNumber(x, DIGITS.statistic);
}

/** A p-value inside a message without its `p`: `0.0143` or `< 0.0001` (rule 5). */
function pValue(p: number): string {
  const f = formatP(p);
  return f.startsWith('<') ? f : `= ${f}`;
}

export const warningText = {
  at_bound: (param: string, side: 'lower' | 'upper', bound: number) =>
    `${param} ended at its ${side} bound ${num(bound)}; the optimum may lie outside the bounds, and its standard error and interval ignore the bound`,
  /** Several pairs: how many, the worst CORRELATED_PAIRS_IN_TEXT with their ρ, all of them in the warning's `pairs`. */
  high_correlations: (pairs: readonly { parameters: readonly [string, string]; rho: number }[], involved: number, free: number) => {
    const shown = pairs.slice(0, CORRELATED_PAIRS_IN_TEXT).map((x) => `${x.parameters[0]}–${x.parameters[1]} (${CORRELATION_SYMBOL} = ${formatNumber(x.rho, DIGITS.statistic)})`).join(', ');
    const more = pairs.length > CORRELATED_PAIRS_IN_TEXT ? ` and ${pairs.length - CORRELATED_PAIRS_IN_TEXT} more` : '';
    return `${pairs.length} pairs of parameters are strongly correlated (|${CORRELATION_SYMBOL}| > ${num(THRESHOLDS.correlation)}; ${involved} of the ${free} free parameters take part), the strongest ${shown}${more}; the data hardly separate them - consider fewer parameters, fixing some, or a centred or orthogonal form of the model`;
  },
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
  rows_dropped: (dropped: number, file: string, rows?: readonly number[]) =>
    `${dropped} row${dropped === 1 ? '' : 's'} of ${file} dropped for empty or NA cells in the columns this fit uses${rows && rows.length ? ` (${rows.length === 1 ? 'row' : 'rows'} ${rowList(rows)})` : ''}`,
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
  profile_differs: (param: string, profile: string, wald: string) =>
    `the curvature of the model makes the symmetric interval misleading for ${param}: the profile interval is ${profile}, the symmetric one ${wald}; use the profile interval`,
  exact_point: (rows: readonly number[]) =>
    rows.length === 1
      ? `the fit passes through row ${rows[0]} (leverage 1): its residual carries no information, so the data cannot check the model there and it has no studentized residual or Cook's distance`
      : `the fit passes through rows ${rowList(rows)} (leverage 1): their residuals carry no information, so the data cannot check the model there and they have no studentized residuals or Cook's distances`,
  high_leverage: (rows: readonly number[], h: readonly number[], cutoff: number, cooks: number, linearised: boolean) =>
    `${rows.length === 1 ? 'row' : 'rows'} ${rowValues(rows, h, 'h')} ha${rows.length === 1 ? 's' : 've'} high leverage (above 2p/n = ${stat(cutoff)}) and move${rows.length === 1 ? 's' : ''} the fit (Cook's distance above 4/n = ${stat(cooks)}; both rules of thumb of common practice${linearised ? ', of the linearised model' : ''}): the fit leans on ${rows.length === 1 ? 'it' : 'them'}, so check ${rows.length === 1 ? 'its value' : 'their values'}`,
  influential_point: (rows: readonly number[], d: readonly number[], cutoff: number, linearised: boolean) =>
    `${rows.length === 1 ? 'row' : 'rows'} ${rowValues(rows, d, 'D')} ${rows.length === 1 ? 'is' : 'are'} influential (Cook's distance above ${num(cutoff)}, a rule of thumb of common practice${linearised ? '; from the linearised model' : ''}): leaving ${rows.length === 1 ? 'it' : 'one'} out moves the estimates markedly`,
  outlier: (outliers: readonly { row: number; t: number; pValue: number }[], level: number, n: number, dof: number, linearised: boolean) =>
    `${outliers.length === 1 ? 'row' : 'rows'} ${rowValues(outliers.map((o) => o.row), outliers.map((o) => o.t), 't')} ${outliers.length === 1 ? 'is an outlier' : 'are outliers'} (studentized deleted residual, Bonferroni-adjusted p ${outliers.length === 1 ? pValue(outliers[0].pValue) : `≤ ${formatP(Math.max(...outliers.slice(0, 100).map((o) => o.pValue))).replace('< ', '')}`} < ${num(level)}: each row tested at ${num(level)}/${n} with t on ${dof} degrees of freedom${linearised ? ', linearised model' : ''}); check ${outliers.length === 1 ? 'it' : 'them'} for a recording or measurement error`,
  lack_of_fit: (f: number, df1: number, df2: number, p: number, level: number) =>
    `the model misses the means of the replicates (lack-of-fit F(${df1}, ${df2}) = ${stat(f)}, ${pClause(p)} < ${num(level)}): the scatter between replicates is smaller than the model's misfit - the model may be the wrong shape`,
  curvature: (t: number, dof: number, p: number, level: number, linearised: boolean) =>
    `curvature: the residuals bend with the fitted value (t = ${stat(t)} on ${dof} degrees of freedom for an added squared fitted value, ${pClause(p)} < ${num(level)}${linearised ? ', linearised model' : ''}); the model may miss a bend in the data - consider another shape or a curved term`,
  bootstrap_failures: (failed: number, replicates: number, allowed: number) =>
    `${failed} of ${replicates} bootstrap refits failed, more than the ${allowed} the interval's tails may lose (a failed refit is most likely a sample from a tail): the bootstrap intervals are withheld - the model may be too flexible for these data`,
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
  /** A fit left out of a comparison of the others (engine/run/queries.ts `compare`). */
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
  /** FIT."GROUP".NAME naming no group of the fit, with the nearest labels. */
  unknownGroup: (fit: string, group: string, near: string[]) =>
    `fit ${fit} has no group ${JSON.stringify(group)}${near.length ? ` (did you mean ${near.map((g) => JSON.stringify(g)).join(', ')}?)` : ''}`,
  groupsIndependent: (fit: string) => `the groups of ${fit} are fitted separately, so different groups are treated as independent (no covariance between them)`,
  leftOutIndependent: (fit: string, groups: string[]) =>
    `${groups.map((g) => JSON.stringify(g)).join(', ')} ${groups.length === 1 ? 'was' : 'were'} left out of the joint fit of ${fit} and ${groups.length === 1 ? 'is' : 'are'} treated as independent of the other groups`,
  jointCross: (fit: string) => `the covariance between the groups of ${fit} is that of its joint fit (shared parameters and cross-group terms included)`,
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
/** Joint fits over groups (engine/run/joint.ts, joint-compare.ts). */
export const jointText = {
  tooFewRows: (n: number, pl: number) => `${n} usable row${n === 1 ? '' : 's'} for ${pl} per-group parameter${pl === 1 ? '' : 's'}: left out of the joint fit`,
  noGroups: 'no group has enough rows for its own parameters, so there is no joint fit',
  /** A table of a fit over several tables (engine/run/joint-tables.ts) with fewer usable rows than the parameters it fits on its own. */
  tableTooFewRows: (fit: string, table: string, file: string, n: number, pl: number) =>
    `fit ${fit}: table ${table} (${file}) leaves ${n} usable row${n === 1 ? '' : 's'} for its ${pl} own parameter${pl === 1 ? '' : 's'} (those not shared): at least ${pl} are needed; correct the table or leave it out of the on list`,
  noStart: 'no starting values for the joint fit: no group\'s separate fit gave finite estimates',
  groupStop: (message: string) => `joint fit over all groups: ${message}`,
  noTest: 'no test: the degrees of freedom or the sum of squares of the larger model leave nothing to compare',
  generalWorse: (restricted: number, general: number) =>
    `the model with more parameters ended with a larger sum of squares (${num(general)} against ${num(restricted)}), so one of the two fits missed its minimum; F is shown as 0`,
  releasedNotConverged: (stop: string) => `the fit with this parameter per group did not converge (${stop}); the test is not reliable`,
  sharded: (fit: string) => `fit ${fit} has shared parameters: a joint fit needs all its groups in one run, so it cannot be split into shards`,
} as const;

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
  noPredictor: (fit: string, what: 'predict' | 'invert' | 'backcalc', columns: readonly string[]) => MSG.needsOnePredictor(what, fit, columns),
  noPoints: (fit: string, what: 'predict' | 'invert' | 'backcalc') => `${what} on fit ${fit}, which has no fitted points (see its error)`,
  newSigmaNeeded: (fit: string, kind: 'sigma' | 'weight', cols: readonly string[], predictor: string, example: string) => MSG.newSigmaNeeded(fit, kind, cols, predictor, example),
  wrongVariable: (fit: string, given: string, predictor: string) => MSG.predictorOther(fit, predictor, given),
  wrongResponse: (fit: string, given: string, columns: readonly string[]) => MSG.responseMismatch(fit, given, columns),
  comparePerGroup: (grouped: string, single: string) => MSG.comparePerGroup(grouped, single),
  compareGroupsDiffer: (a: string, b: string, ga: string, gb: string) => MSG.compareGroupsDiffer(a, b, ga, gb),
  compareGroupLabels: (a: string, b: string, only: string, inFit: string) =>
    `compare: ${a} and ${b} do not have the same groups (${JSON.stringify(only)} is a group of ${inFit} only); fits with groups compare only over the same groups`,
  compareMismatch: (fits: readonly string[]) => MSG.compareMismatch(fits),
  tablesWithPer: (fit: string) => MSG.tablesWithPer(fit),
  methodNotLinear: (fit: string) => MSG.methodNotLinear(fit),
  internal: (fit: string, message: string) => `fit ${fit} could not be completed: ${message}`,
  textCompare: (text: string) => `the text "${text}" can only be compared with a column (by == or !=)`,
  textOnNumbers: (column: string, text: string, file: string) =>
    `column "${column}" of ${file} holds only numbers, so it never reads the text "${text}"; compare it with a number instead (${/^[A-Za-z_][A-Za-z0-9_]*$/.test(column) ? column : `"${column}"`} == ${Number.isFinite(Number(text)) && text.trim() !== '' ? Number(text) : 'NUMBER'})`,
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

/** Data-file errors of row selection and file opening (engine/data/select.ts, load.ts); each starts with its place. */
export const columnText = {
  missing: (file: string, name: string, headers: readonly string[]) =>
    `${file}: no column ${quoted(name)}; the header has ${headers.filter((h) => h !== '').map(quoted).join(', ')}`,
  duplicate: (file: string, name: string, times: number) => `${file}: the header names ${quoted(name)} ${times} times`,
  nonNumeric: (place: string, column: string, value: string, decimalComma: boolean) =>
    `${place}: column ${quoted(column)} holds ${quoted(value)}, not a number${decimalComma ? ' (decimal comma? add decimal "," to the data statement)' : ''}`,
  fileNotFound: (file: string) => `data file not found: ${file}`,
  fileUnreadable: (file: string, reason: string) => `cannot read data file ${file}: ${reason}`,
  isFolder: 'it is a folder',
} as const;

/**
 * Texts of the run layer (engine/run, engine/runner, engine/groups, the
 * worker): errors of fits and queries, and how a stop message takes a note.
 */
export const runText = {
  /** A note appended to a solver's stop message (e.g. one of `searchText`). */
  withNote: (message: string, note: string) => `${message}; ${note}`,
  /** A stop message with its located detail (solve/messages.ts `nonFiniteDetail`). */
  located: (message: string, detail: string) => `${message}: ${detail}`,
  /** `fit` or `fit [group]`. */
  fitLabel: (fit: string, group?: string) => (group !== undefined ? `${fit} [${group}]` : fit),
  gradientDescentMissing: 'the gradient descent solver is not available in this build',
  robustMissing: (loss: string) => `the robust solver (loss ${loss}) is not available in this build`,
  fitNotRun: (fit: string) => `fit ${fit} has no result (see the errors above)`,
  notDefinedAt: (expr: string, response: string, value: number) => `${expr} is not defined at ${response} = ${value}`,
  /** `label` from `fitLabel`. */
  cancelledBefore: (label: string) => `run cancelled before fit ${label}`,
  oneBlock: (fit: string, blocks: number) => `fit ${fit} has ${blocks} data blocks; this version fits one`,
  noGroupResult: (group: string) => `no result came back for group ${group}`,
  noDataSource: (fit: string) => `fit ${fit} has no data source`,
  groupCancelled: 'cancelled before this group was fitted',
  groupFailed: (group: string, fit: string, reason: string) => `group ${group} of ${fit} could not be fitted: ${reason}`,
  workerConfused: 'the engine worker received a message it does not understand',
  /** Why per-group fits run on this thread (the `reason` of an `in_process` mode: engine/groups/fit-groups.ts, engine/runner/run-plan.ts). */
  inProcess: {
    noWorkerFile: 'no worker file',
    noWorkerFileHere: 'no worker file (running from sources or asked for)',
    noWorkerFileAt: (file: string) => `no worker file at ${file}`,
    noWorkerBundle: 'no worker bundle beside this program',
    oneThread: 'one thread asked for',
    injectedSolvers: 'injected solvers',
    smallJob: (groups: number, rows: number, orOneCore: boolean) => `small job (${groups} groups, ${rows} rows)${orOneCore ? ' or one core' : ''}`,
  },
  /** The `how` of a start shared by a fit's groups (engine/groups/starts.ts). */
  pooledStart: (how: string, groups: number) => `${how}, on the rows of all ${groups} groups pooled`,
} as const;

/** Texts of inverse prediction (engine/stats/inverse.ts). */
export const inverseText = {
  noCrossing: (lo: number, hi: number, y0: number, fmin: number, fmax: number) =>
    `no predictor value in the data range [${lo}, ${hi}] gives ${y0}; the fitted curve there spans [${fmin}, ${fmax}]`,
  openAtEdge: 'the prediction band contains the response up to the edge of the data range, so the interval is open there',
  estimateBeyond: (side: 'below' | 'above', edge: number) =>
    `extrapolated: the curve reaches this response ${side} the ${side === 'below' ? 'lowest' : 'highest'} predictor value of the data (${formatNumber(edge)})`,
  openSide: (below: boolean, above: boolean) =>
    below && above
      ? 'open on both sides: the prediction band still contains the response as far as the curve was followed, so no limit is given'
      : `one-sided: open ${below ? 'below' : 'above'} (the prediction band still contains the response as far as the curve was followed ${below ? 'down' : 'up'}), so there is no ${below ? 'lower' : 'upper'} limit`,
  endsBeyond: (lower: boolean, upper: boolean) =>
    `${lower && upper ? 'both limits lie' : lower ? 'the lower limit lies' : 'the upper limit lies'} beyond the data range (the curve extrapolated)`,
} as const;

/** Texts of expectation checks (engine/run/expectations.ts); `target` is the expectation's target as written. */
export const expectationText = {
  noDerived: (target: string, name: string) => `${target}: no derived quantity ${name} was computed`,
  noResult: (target: string, fit: string) => `${target}: fit ${fit} has no result`,
  /** FIT."GROUP".NAME naming no group of the fit, with the nearest labels. */
  noGroup: (target: string, fit: string, group: string, near: string[]) =>
    `${target}: fit ${fit} has no group ${JSON.stringify(group)}${near.length ? ` (did you mean ${near.map((g) => JSON.stringify(g)).join(', ')}?)` : ''}`,
  notFitTarget: (target: string) => `${target} is not a fit target`,
  noParameter: (target: string, name: string) => `${target}: no parameter ${name}`,
  notComputed: (target: string, why: string) => `${target} could not be computed${why}`,
  verdict: (target: string, actual: number, passed: boolean, bound: string) => `${target} = ${num(actual)} is ${passed ? '' : 'not '}${bound}`,
  bound: (bound: Bound): string => {
    switch (bound.kind) {
      case 'within': return `within ${num(bound.low)} .. ${num(bound.high)}`;
      case 'above': return `above ${num(bound.value)}`;
      case 'below': return `below ${num(bound.value)}`;
    }
  },
} as const;

/** Details of the `residual_pattern` warning (engine/stats/warnings.ts). */
export const patternText = {
  runs: (observed: number, expected: number, p: number) => `runs test: ${observed} runs where ${stat(expected)} are expected, ${pClause(p)}`,
  durbinWatson: (d: number) => `Durbin–Watson d = ${formatNumber(d, DIGITS.magnitude)}, far from 2`,
} as const;

/** Refusals of `new` and the editor's "New Spec from CSV" (engine/templates/scaffold.ts); `title` is the template's. */
export const scaffoldText = {
  unwritableColumn: (name: string) => `column name ${JSON.stringify(name)} cannot be written in a spec (it contains a double quote, a line break or a control character)`,
  unwritablePath: (path: string) =>
    `the data path ${JSON.stringify(path)} cannot be written in a spec (it contains a double quote, a line break or a control character, and spec text has no escapes); rename the file`,
  tooFewRows: (title: string, parameters: number, need: number, x: string, y: string, found: number) =>
    `${title} has ${parameters} parameters and needs at least ${need} rows with numbers in both ${x} and ${y}; found ${found}`,
  positiveX: (title: string, x: string) => `${title} needs every ${x} value to be positive`,
  nonnegativeX: (title: string, x: string) => `${title} needs every ${x} value to be zero or positive`,
  twoPositiveX: (title: string, x: string) => `${title} needs at least two different positive ${x} values`,
  positiveY: (title: string, y: string) => `${title} needs every ${y} value to be positive`,
} as const;

/** Refusals and sources of a shard of a per-group run (engine/groups/shards.ts: `--shard I/N`, a Slurm array task, a Kubernetes indexed job). */
export const shardText = {
  notIOfN: (text: string) => `--shard takes I/N (shard I of N, 1 ≤ I ≤ N), not "${text}"`,
  countRange: (text: string, max: number) => `--shard ${text}: the number of shards must be 1 to ${max}`,
  indexRange: (text: string, count: number) => `--shard ${text}: the shard must be 1 to ${count}`,
  slurmVariables: (id: string, min: string | undefined, max: string | undefined, count: string | undefined) =>
    `SLURM_ARRAY_TASK_ID=${id}, SLURM_ARRAY_TASK_MIN=${min ?? ''}, SLURM_ARRAY_TASK_MAX=${max ?? ''}, SLURM_ARRAY_TASK_COUNT=${count ?? ''}`,
  slurmNoShard: (shown: string) => `this is a Slurm array task, but its variables do not give a shard (${shown}); pass --shard I/N`,
  slurmNotConsecutive: (shown: string, step: number | undefined, span: number) =>
    `the Slurm array is not one run of consecutive task ids (${shown}${step !== undefined ? `, SLURM_ARRAY_TASK_STEP=${step}` : ''}), so its tasks would not cover every group; submit --array=0-${span - 1} or pass --shard I/N`,
  slurmDisagrees: (shards: number, span: number, shown: string) => `--shards ${shards} disagrees with the Slurm array of ${span} tasks (${shown})`,
  slurmSource: (id: string, min: string | undefined, max: string | undefined) => `SLURM_ARRAY_TASK_ID=${id} of ${min}–${max}`,
  k8sNotWhole: (index: string) => `JOB_COMPLETION_INDEX=${index} is not a whole number; pass --shard I/N`,
  k8sNeedsShards: (index: string) => `this is a Kubernetes indexed job (JOB_COMPLETION_INDEX=${index}); pass --shards N with the job's completions, or --shard I/N`,
  k8sTooLarge: (index: string, shards: number) => `JOB_COMPLETION_INDEX=${index} is not below --shards ${shards}`,
  k8sSource: (index: string) => `JOB_COMPLETION_INDEX=${index}`,
} as const;

/** Profile-likelihood intervals (engine/run/profile-fit.ts), shared by the CLI, reports and the editor. */
export const profileText = {
  linear: 'the model is linear in its parameters: the profile interval is the symmetric (Wald) interval',
  computed: (level: number, critical: number) =>
    `${num(100 * level)} %, where the profile t statistic |τ| ≤ t = ${num(critical)}; Bates & Watts 1988, §6.1`,
  never: 'switched off (`profile never`)',
  group: 'not computed for the groups of a per-group fit unless asked (`profile always`): several refits per parameter and group',
  overBound: (np: number, bound: number) => `not computed: n·p = ${np} is over the work bound ${bound} (several refits per parameter); \`profile always\` asks for it`,
  robust: 'not computed for a robust loss: the profile t statistic is defined for the squared loss',
  noDof: 'not computed: no degrees of freedom left for the residual variance',
  exact: 'not computed: the residuals are at rounding level (the model passes through the data), so the sum of squares has no profile to measure',
  rankDeficient: 'not computed: some parameters have no standard error (the fit is rank-deficient)',
};

/** One end as words or a number, e.g. `0.0412`, `open at the bound 0`, `open (not reached by 1200)`. */
export function profileEndText(e: ProfileEnd, format: (x: number) => string = num): string {
  switch (e.kind) {
    case 'reached':
      return e.value === null ? 'n/a' : format(e.value);
    case 'bound':
      return `open at the bound ${e.value === null ? '' : format(e.value)}`.trimEnd();
    case 'not_reached':
      return `open (not reached by ${e.value === null ? '?' : format(e.value)})`;
    case 'failed':
      return 'not found';
  }
}

/** The interval as text, e.g. `[0.0412, 0.311]`, `[open at the bound 0, 0.311]`. */
export function profileIntervalText(lower: ProfileEnd, upper: ProfileEnd, format: (x: number) => string = num): string {
  return `[${profileEndText(lower, format)}, ${profileEndText(upper, format)}]`;
}

/** Texts of `compare` (engine/run/compare-query.ts, engine/run/nesting.ts): fits left out, how nesting was decided, why no F test. */
export const compareText = {
  excluded: (code: string, message: string) => `${code === 'failed' ? 'the fit failed' : 'the fit did not converge'} (${code}: ${message}); a fit that is not a result has no place in a ranking`,
  established: (simpler: string, richer: string, distance: number, tolerance: number, trials: number) =>
    `${simpler} is nested in ${richer}: checked numerically — for ${trials} parameter sets of ${simpler} (its estimate and points drawn around it), ${richer} reproduced ${simpler}'s curve at every data point to a relative distance of ${formatNumber(distance, 2)} ≤ ${formatNumber(tolerance, 2)}`,
  notNested: (simpler: string, richer: string, distance: number, tolerance: number) =>
    `${simpler} is not a special case of ${richer}: fitted to ${simpler}'s own curve, ${richer} stays at a relative distance of ${Number.isFinite(distance) ? formatNumber(distance, 2) : 'n/a'} > ${formatNumber(tolerance, 2)} from it at the data points (fixing or tying ${richer}'s parameters does not give ${simpler})`,
  notChecked: (simpler: string, richer: string, reason: 'several_columns' | 'different_rows' | 'not_finite') =>
    `whether ${simpler} is nested in ${richer} was not checked: ${reason === 'several_columns' ? 'the models read more than one column' : reason === 'different_rows' ? 'the fits used different rows' : `${simpler} is not finite at some data points for the parameter sets tried`}`,
  declared: (simpler: string, richer: string, check: string) => `${simpler} is nested in ${richer} as the spec declares (\`within\`); ${check}`,
  declaredReversed: (simpler: string, richer: string) =>
    `the spec declares ${simpler} within ${richer}, but ${simpler} has at least as many free parameters as ${richer}`,
  noF: {
    notNested: 'No nested test: the two models are not nested (see above), so the extra-sum-of-squares F statistic has no F distribution; AICc alone compares them.',
    notChecked: 'No nested test: nesting could not be checked (see above) and the spec does not declare it (`compare SIMPLE within RICH`); AICc alone compares them.',
    sameCount: 'No nested test: both fits have the same number of free parameters; AICc alone compares them.',
    manyFits: 'No nested test: it compares two fits, and this comparison has more; AICc compares them all.',
    tooFew: 'No nested test: fewer than two fits could be ranked.',
    weighting: 'No nested test: the fits weigh their points differently, so their sums of squares are not on one scale; AICc compares them, with the same caveat.',
    robust: 'No nested test: a fit uses a robust loss, and the F test is that of the squared loss; AICc compares them.',
    differentData: 'No nested test: the fits do not use the same rows.',
    noDof: 'No nested test: the richer fit has no degrees of freedom left.',
    exact: 'No nested test: the richer fit passes through every point (residual sum of squares 0).',
    richerWorse: (simpler: string, richer: string) =>
      `No nested test: ${richer} ends with a larger residual sum of squares than ${simpler}, which a model containing ${simpler} cannot have at its minimum; ${richer} stopped elsewhere (a local minimum or a bound). Try other starting values or \`explore\`; AICc compares them meanwhile.`,
  },
  onlyOne: (fit: string) => `Only ${fit} is a converged result: there is nothing to compare it with.`,
  /** `compare` of fits with groups (engine/run/compare-groups.ts). */
  groupExcluded: (group: string, code: string, message: string) => `its group ${JSON.stringify(group)} ${code === 'failed' ? 'failed' : 'did not converge'} (${code}: ${message}); a fit is ranked as a whole only when every group is a result`,
  jointExcluded: (code: string, message: string) => `its joint fit ${code === 'failed' ? 'failed' : 'did not converge'} (${code}: ${message})`,
  jointLeftOut: (groups: readonly string[]) => `its joint fit left out ${groups.map((g) => JSON.stringify(g)).join(', ')} (too few rows), so it does not fit the same rows as a fit of every group`,
  sharedNested: (simpler: string, richer: string, released: readonly string[], groups: 'groups' | 'tables') =>
    `${simpler} is nested in ${richer} by construction: the same model on the same rows, with ${released.join(', ')} one value for all ${groups} in ${simpler} and one per ${groups === 'tables' ? 'table' : 'group'} in ${richer}`,
  sharedNotNested: (a: string, b: string) =>
    `${a} and ${b} are not nested: neither fit's shared parameters are a subset of the other's with the same model, so one is not the other with parameters tied across groups`,
  nestedEveryGroup: (simpler: string, richer: string) =>
    `${simpler} is nested in ${richer} in every group: checked numerically on each group's rows (see the group-by-group table), so the two are nested as wholes`,
  modelsDiffer: (a: string, b: string) =>
    `whether ${a} is nested in ${b} was not checked: for fits with groups, nesting is decided only for the same model with other parameters shared across groups (declare it with \`compare ${a} within ${b}\`)`,
  noPerGroupJoint: (fits: readonly string[]) =>
    `No group-by-group table: ${fits.join(', ')} ${fits.length === 1 ? 'is a joint fit' : 'are joint fits'}, whose groups share parameters and are no fits of their own; the fits are compared as a whole.`,
  wholeNote: (groups: number, by: string) =>
    `Each fit is taken as a whole over its ${groups} ${by}: points, free parameters and residual sum of squares summed over them (shared parameters counted once), with one residual variance for all.`,
  /** The decision sentence's list of fits left out. */
  leftOut: (fits: readonly string[]) => `Left out of the ranking: ${fits.join(', ')} (${fits.length === 1 ? 'it is' : 'they are'} not a converged result; see below).`,
} as const;

/** What a per-group residual warning says of its decision across the groups (engine/groups/flags.ts `adjustGroupWarnings`). */
export const adjustedText = {
  keptMessage: (message: string, a: { family: number; level: number; pValue: number }) => `${message}${adjustedText.kept(a)}`,
  setAsideMessage: (message: string, a: { family: number; level: number; pValue: number }) => `${message}${adjustedText.setAside(a)}`,
  kept: (a: { family: number; level: number; pValue: number }) =>
    `; upheld across the fit's ${a.family} groups by Holm's step-down procedure at family-wise level ${num(a.level)} (Holm 1979)`,
  setAside: (a: { family: number; level: number; pValue: number }) =>
    `; not upheld across the fit's ${a.family} groups by Holm's step-down procedure at family-wise level ${num(a.level)} (Holm 1979): with this many groups, chance alone gives such a p (${formatP(a.pValue)}) now and then`,
} as const;

/** The bootstrap (engine/run/bootstrap.ts, bootstrap-summary.ts) and the intervals of derived quantities (engine/run/derived-intervals.ts). */
export const bootstrapText = {
  cancelled: 'cancelled',
  noResiduals: 'no residuals to resample (every row has leverage one)',
  tooFewRows: 'fewer rows than parameters',
  rankDeficient: 'the sample does not determine every parameter (rank below p)',
  notConverged: (code: string) => `the refit did not converge (${code})`,
  notFinite: 'an estimate is not finite',
  computed: (replicates: number, resample: string, seed: number, level: number, failed: number) =>
    `${replicates} refits (${resample === 'cases' ? 'cases resampled' : resample === 'adjusted' ? 'leverage-adjusted residuals resampled' : 'residuals resampled'}, seed ${seed}) started from the estimate; ${num(100 * level)} % percentile intervals (Efron & Tibshirani 1993, §13.3)${failed > 0 ? `; ${failed} refits failed and are left out` : ''}`,
  withheld: (failed: number, replicates: number, allowed: number) =>
    `withheld: ${failed} of ${replicates} refits failed, more than the ${allowed} that the interval's tails may lose`,
  fewInTail: (tail: number) => `only about ${num(tail)} replicates lie beyond each end: the ends are uncertain (Efron & Tibshirani 1993, §19.3, suggest at least 1000 refits for percentile intervals)`,
  group: 'not run for the groups of a per-group fit',
  robust: 'not run for a robust loss (the refits would need the robust weights of each sample)',
  notConverged2: 'not run: the fit did not converge',
  noDof: 'not run: no degrees of freedom (the residuals carry no information)',
  bca: 'BCa intervals (Efron & Tibshirani 1993, §14.3): bias correction from the replicates, acceleration from leave-one-out refits',
  bcaTooMany: (n: number, max: number) => `no BCa intervals: ${n} rows is over ${max} for the leave-one-out refits of the acceleration`,
  bcaJackFailed: (failed: number) => `no BCa intervals: ${failed} leave-one-out refits failed`,
  bcaDegenerate: 'no BCa interval: the replicates all lie on one side of the estimate, or the acceleration is not finite',
  derivedManyFits: 'no bootstrap interval: the quantity reads several fits',
  derivedNoBootstrap: (fit: string) => `no bootstrap interval: fit ${fit} ran no bootstrap`,
  derivedGroups: 'no bootstrap interval: the quantity reads a per-group fit',
  derivedNotFinite: (count: number) => `${count} replicates give no finite value and are left out`,
  statisticsFixed: 'statistics in the expression held at their fitted values',
};

/** Profile intervals of derived quantities (engine/run/derived-profile.ts). */
export const derivedProfileText = {
  computed: (level: number, critical: number, eliminated: string) =>
    `${num(100 * level)} %, where the profile t statistic |τ| ≤ t = ${num(critical)}: the sum of squares minimised with the quantity held at each value (${eliminated} solved from it; Bates & Watts 1988, §6.1; Venzon & Moolgavkar 1988)`,
  manyFits: 'not computed: the quantity reads several fits',
  groups: 'not computed for a quantity of a per-group fit',
  notRun: (fit: string) => `not computed: fit ${fit} has no profile (${'`profile never`'}, a robust loss, no degrees of freedom, or a fit that did not converge)`,
  noParameter: 'not computed: the quantity depends on no free parameter',
  noStderr: 'not computed: the quantity has no standard error to step by',
  overBound: (np: number, bound: number) => `not computed: n·p = ${np} is over the work bound ${bound}; \`profile always\` asks for it`,
  statistics: 'not computed: the quantity reads fit statistics, which change along the profile',
  notSolvable: (name: string) => `${name} could not be solved from the quantity`,
  outsideBounds: (name: string) => `${name} solved from the quantity leaves its bounds`,
  differs: (name: string, profile: string, wald: string) =>
    `the curvature of the model makes the symmetric interval misleading for ${name}: the profile interval is ${profile}, the symmetric one ${wald}; use the profile interval`,
};

/** How a fit's points are weighted, in words (views' model line, derived quantities' notes). */
export const weightingText = {
  describe: (w: { kind: 'none' | 'weight' | 'sigma'; expression: string | null }) =>
    w.kind === 'none' ? 'none (every point counts alike)'
      : w.kind === 'weight' ? `relative weights w = ${w.expression} (residual variance estimated; SSR, R² and RMSE are weighted)`
        : `absolute σ = ${w.expression} (weights 1/σ²; SSR is χ², RMSE in σ units)`,
  /** A derived quantity reads numbers of a weighted fit whose value changes with the weighting. */
  derivedNote: (reads: readonly string[], fit: string, w: { kind: 'none' | 'weight' | 'sigma'; expression: string | null }) =>
    `${reads.join(', ')} ${reads.length === 1 ? 'depends' : 'depend'} on the weighting of ${fit} (${w.kind === 'sigma' ? `σ = ${w.expression}: on the scale of σ` : `weight ${w.expression}: on the weighted scale`}), so this value changes when the weighting does`,
} as const;

/** Profile and bootstrap intervals of joint fits (engine/run/joint-profile.ts, joint-bootstrap.ts, joint-intervals.ts). */
export const jointIntervalText = {
  notSolvable: 'the eliminated parameter could not be solved from the constraint',
  outsideBounds: 'the eliminated parameter, solved from the constraint, leaves its bounds',
  profileComputed: (level: number, critical: number, dof: number) =>
    `${num(100 * level)} %, where the profile t statistic |τ| ≤ t = ${num(critical)} (${dof} degrees of freedom of the joint fit, pooled s); every refit is a joint fit of all groups, since holding one group's parameter moves the shared ones; Bates & Watts 1988, §6.1`,
  profileOverBound: (np: number, bound: number) =>
    `not computed: n·P = ${np} of the joint fit is over the work bound ${bound} (every profile refits all groups, P of them); \`profile always\` asks for it`,
  notConverged: 'not computed: the joint fit did not converge',
  derivedComputed: (level: number, critical: number, eliminated: string) =>
    `${num(100 * level)} %, where the profile t statistic |τ| ≤ t = ${num(critical)}: the joint sum of squares minimised with the quantity held at each value (${eliminated} solved from it; Bates & Watts 1988, §6.1; Venzon & Moolgavkar 1988)`,
  derivedNotRun: (fit: string) => `not computed: the joint fit ${fit} computed no profiles (see its note)`,
  bootstrapComputed: (replicates: number, resample: string, seed: number, level: number, failed: number) =>
    `${replicates} joint refits (${resample === 'cases' ? 'rows resampled within each group' : resample === 'adjusted' ? 'leverage-adjusted residuals (joint leverages) resampled within each group' : 'residuals resampled within each group'}, seed ${seed}) started from the joint estimate; ${num(100 * level)} % percentile intervals (Efron & Tibshirani 1993, §13.3)${failed > 0 ? `; ${failed} refits failed and are left out` : ''}`,
  bcaTooMany: (n: number, max: number) => `no BCa intervals: ${n} rows of the joint fit is over ${max} for the leave-one-out joint refits of the acceleration`,
  tooFewRows: 'a group has fewer rows than its own parameters',
  lackOfFitPooled: 'not run per group of a joint fit: the groups share parameters, so the test is pooled over all groups (the joint fit\'s lack-of-fit test)',
  lackOfFitPooledWarning: (warning: string) => `${warning} (pooled over the groups of the joint fit: settings within each group, all its parameters)`,
  shareNote: (p: number, dof: number) =>
    `this group's share of the joint fit's parameters is ${num(p)} (the trace of the joint hat matrix over its rows), leaving ${num(dof)} residual degrees of freedom of its own`,
};
