/**
 * User-facing texts of fit warnings and run errors, in one place so that the
 * CLI, reports and the editor say the same thing. Each function returns one
 * sentence (or two) without trailing newline; numbers are shown with
 * `num()` (6 significant digits).
 */
import type { WarningCode } from './result';
import { MSG } from '../parser/messages';

export function num(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  return Number(x.toPrecision(6)).toString();
}

/** Thresholds behind the warnings (documented here, used by engine/stats/warnings.ts). */
export const WARNING_THRESHOLDS = {
  /** |ρⱼₖ| above this flags a pair of parameters as nearly redundant. */
  correlation: 0.99,
  /** 2-norm condition number κ of the Jacobian above this flags ill-conditioning: a QR solve then carries relative errors up to about κ·ε ≈ 2e-6 (ε = 2⁻⁵²), i.e. only ~6 of 16 digits. */
  condition: 1e10,
  /** Degrees of freedom below this make intervals and tests weak. */
  minDof: 3,
  /** Runs-test or Shapiro–Wilk p below this flags a residual pattern / non-normality. */
  pValue: 0.01,
  /** Durbin–Watson d with |d − 2| above this flags serial correlation. */
  durbinWatsonDistance: 1,
  /** An estimate within max(1, |bound|)·this of a bound is at the bound. */
  boundRelative: 1e-8,
} as const;

export const warningText = {
  at_bound: (param: string, side: 'lower' | 'upper', bound: number) =>
    `${param} ended at its ${side} bound ${num(bound)}; the optimum may lie outside the bounds, and its standard error and interval ignore the bound`,
  high_correlation: (a: string, b: string, rho: number) =>
    `${a} and ${b} are strongly correlated (ρ = ${num(rho)}); the data hardly separate them - consider fixing one or reparametrising`,
  ill_conditioned: (condition: number) =>
    `the fit is ill-conditioned (condition number ${num(condition)} > ${num(WARNING_THRESHOLDS.condition)}); standard errors may be unreliable - consider rescaling the predictor or the parameters`,
  few_dof: (n: number, p: number) =>
    n <= p
      ? `${n} data points for ${p} free parameters: the fit cannot be judged (needs more points than parameters)`
      : `only ${n - p} degrees of freedom (${n} points, ${p} free parameters); intervals are wide and tests weak`,
  no_convergence: (reason: string) => `the solver did not converge: ${reason}; the estimates are not an optimum`,
  residual_pattern: (detail: string) => `the residuals show a pattern (${detail}); the model may miss a trend in the data`,
  non_normal_residuals: (w: number, p: number) =>
    `the residuals do not look normally distributed (Shapiro–Wilk W = ${num(w)}, p = ${num(p)}); intervals assume normal errors`,
  r2_nonlinear: () => `the model is nonlinear in its parameters: R² is descriptive only, not a test of fit`,
  rows_dropped: (dropped: number, file: string) =>
    `${dropped} row${dropped === 1 ? '' : 's'} of ${file} dropped for empty or NA cells in the columns this fit uses`,
  /** Also code 'rows_dropped': rows of a per-group fit without a group value. */
  rows_without_group: (rows: number, file: string, column: string) =>
    `${rows} row${rows === 1 ? '' : 's'} of ${file} ha${rows === 1 ? 's' : 've'} no value in the group column ${column} and belong${rows === 1 ? 's' : ''} to no group`,
  rank_deficient: (rank: number, p: number, params: string[]) =>
    `the parameters are not all determined by the data (rank ${rank} of ${p})${params.length ? `; check ${params.join(', ')}` : ''}`,
  guessed_start: (params: string[], how: string) =>
    `starting value${params.length === 1 ? '' : 's'} for ${params.join(', ')} guessed (${how}); give "= value" to choose your own`,
} satisfies Record<WarningCode, (...args: never[]) => string> & Record<string, (...args: never[]) => string>;

/** Notes of derived quantities (engine/run/derived.ts): how the uncertainty was obtained, or why a number is missing. */
export const derivedText = {
  noResult: (fit: string) => `fit ${fit} has no result`,
  noGroup: (fit: string, group: string) => `fit ${fit} has no group ${group}`,
  fitFailed: (fit: string, reason: string) => `fit ${fit} failed (${reason})`,
  notConverged: (fit: string) => `fit ${fit} did not converge: its estimates are not an optimum`,
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
  badWeight: (fit: string, row: number, value: number) => `fit ${fit}: weight must be non-negative and finite, got ${num(value)} at data line ${row}`,
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
