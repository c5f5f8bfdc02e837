/**
 * The result of running a plan: plain JSON-ready data read by every view
 * (CLI text, JSON, Markdown, SVG charts, editor diagnostics, results panel).
 * Bump RESULT_VERSION on any breaking change; `result.schema.json` follows it.
 */
import type { Range, Expectation, Method, LossKind, FitOptions } from '../parser/plan';

export const RESULT_VERSION = 1 as const;

/**
 * Why an iterative solver stopped, with the numbers behind it, e.g.
 * `{ code: 'small_reduction', message: 'relative reduction 3.1e-13 below its tolerance 1e-12 …' }`.
 */
export type StopCode =
  | 'exact'            // direct solve (linear least squares): no iterations
  | 'small_reduction'  // relative reduction of the cost below tolerance
  | 'small_step'       // relative step below tolerance
  | 'small_gradient'   // scaled gradient below tolerance
  | 'max_iterations'
  | 'max_evaluations'
  | 'stagnated'        // no progress in cost and parameters over a window of iterations (not converged)
  | 'non_finite'       // residuals or Jacobian not finite where no finite step was left
  | 'cancelled'
  | 'failed';          // could not start (e.g. n < p, no rows, an invalid option)

/** Every stop code, for checks over all of them (a code added to `StopCode` without its entry here does not compile). */
export const STOP_CODES: readonly StopCode[] = Object.freeze(Object.keys({
  exact: 1, small_reduction: 1, small_step: 1, small_gradient: 1, max_iterations: 1, max_evaluations: 1,
  stagnated: 1, non_finite: 1, cancelled: 1, failed: 1,
} satisfies Record<StopCode, 1>) as StopCode[]);

export interface StopReason {
  code: StopCode;
  message: string;
  /** True when the stop means a (local) optimum was found. */
  converged: boolean;
  /**
   * With code `non_finite`: where the model was not finite (additive, optional):
   * data-file lines (the first few), how many rows, the parameters whose
   * derivative was not finite (empty when the residuals were), and the
   * parameter values at that point.
   */
  nonFinite?: { what: 'residuals' | 'jacobian'; lines: number[]; rows: number; parameters: string[]; at: Record<string, number> };
}

/**
 * One trial step of an iterative solver, recorded when a trace was asked for
 * (`leastwise fit --trace`). Trust-region methods record every trial
 * (accepted or not); gradient descent every iteration.
 */
export interface IterationRecord {
  /** Accepted iterations before this trial. */
  iteration: number;
  /** ½‖r‖² at the point the step was taken from. */
  cost: number;
  /** ½‖r‖² at the trial point; null when not finite. */
  trialCost: number | null;
  /** Scaled gradient measure at the point the step was taken from (as in the stop test). */
  gradient: number;
  /** Scaled norm of the step. */
  step: number;
  /** Trust-region radius after this trial; null for gradient descent. */
  radius: number | null;
  /** Actual over predicted reduction; null for gradient descent or a non-finite trial. */
  ratio: number | null;
  accepted: boolean;
  /** Interior reflective method: the step chosen (full, truncated at a bound, reflected, scaled gradient). */
  kind?: 'full' | 'truncated' | 'reflected' | 'gradient';
  /** Interior reflective method: the step-back factor applied at a bound (null when the full step stayed inside). */
  stepBack?: number | null;
  /** Interior reflective method: parameters whose bound the step met. */
  bounds?: string[];
  /** Interior reflective method: parameters whose scaling is by their distance to a bound (the gradient points at it). */
  active?: string[];
}

export interface FitTrace {
  /** Which solver recorded it. */
  solver: 'levenberg_marquardt' | 'reflective_trust_region' | 'gradient_descent';
  records: IterationRecord[];
  /** Records left out in the middle of a long run (the first and the last are kept; see engine/solve/trace.ts). */
  omitted: number;
}

export type WarningCode =
  | 'at_bound'
  | 'high_correlation'
  | 'ill_conditioned'
  | 'few_dof'
  | 'no_convergence'
  | 'residual_pattern'
  | 'non_normal_residuals'
  | 'r2_nonlinear'
  | 'rows_dropped'
  | 'rank_deficient'
  | 'guessed_start'
  /** The multi-start search found a lower sum of squares than the fit from the starting values reached. */
  | 'lower_minimum'
  /** A group of a per-group fit failed from the shared start and was fitted again from its own start. */
  | 'retried_start'
  /** A parameter whose profile-likelihood interval differs materially from its symmetric (Wald) interval (engine/run/profile-fit.ts). */
  | 'profile_differs'
  /** The fit passes through a point (leverage 1): its residual carries no information (engine/stats/influence.ts). */
  | 'exact_point'
  /** Leverage above 2p/n (common practice). */
  | 'high_leverage'
  /** Cook distance above 1 (common practice). */
  | 'influential_point'
  /** Bonferroni-adjusted outlier test on the studentized deleted residuals. */
  | 'outlier'
  /** Lack-of-fit F test against pure error from replicated predictor values. */
  | 'lack_of_fit'
  /** The residuals bend systematically with the fitted value (engine/stats/curvature.ts). */
  | 'curvature'
  /** More bootstrap refits failed than one tail of the interval holds: the bootstrap intervals are withheld (engine/run/bootstrap-summary.ts). */
  | 'bootstrap_failures';

/** Every warning code (a code added to `WarningCode` without its entry here does not compile). */
export const WARNING_CODES: readonly WarningCode[] = Object.freeze(Object.keys({
  at_bound: 1, high_correlation: 1, ill_conditioned: 1, few_dof: 1, no_convergence: 1, residual_pattern: 1,
  non_normal_residuals: 1, r2_nonlinear: 1, rows_dropped: 1, rank_deficient: 1, guessed_start: 1, lower_minimum: 1,
  retried_start: 1, profile_differs: 1, exact_point: 1, high_leverage: 1, influential_point: 1, outlier: 1, lack_of_fit: 1, curvature: 1,
  bootstrap_failures: 1,
} satisfies Record<WarningCode, 1>) as WarningCode[]);

export interface FitWarning {
  code: WarningCode;
  message: string;
  /** Parameter(s) the warning is about, so editors can place it on a declaration. */
  parameters?: string[];
  /** Data rows the warning names, all of them (`PointTable.row` numbers; the message lists the first few; additive, optional). */
  rows?: number[];
  /** `high_correlation`: every strongly correlated pair, worst |ρ| first (the message names the worst few; additive, optional). */
  pairs?: CorrelatedPair[];
  /** A residual test of a per-group fit decided across the fit's groups (engine/groups/flags.ts `adjustGroupWarnings`; additive, optional). */
  adjusted?: WarningAdjustment;
}

/** How a group's residual warning was decided across the groups: the method, the family size m, the family-wise level and the group's own p. */
export interface WarningAdjustment {
  method: 'holm';
  family: number;
  level: number;
  pValue: number;
}

/** Two free parameters and their correlation ρ (engine/stats/warnings.ts). */
export interface CorrelatedPair {
  parameters: [string, string];
  rho: number;
}

export interface ParameterResult {
  name: string;
  estimate: number;
  /** Standard error; NaN → `null` in JSON when it cannot be computed. */
  stderr: number | null;
  /** Confidence interval at `options.level` (Student t with `dof` degrees of freedom). */
  lower: number | null;
  upper: number | null;
  /** Relative standard error |se/estimate|, null for fixed parameters or estimate 0. */
  relativeStderr: number | null;
  fixed: boolean;
  atBound: 'lower' | 'upper' | null;
  initial: number;
  /** How the starting value was chosen. */
  start: 'given' | 'guessed';
  unit?: string;
  /** Profile-likelihood interval at `level`, when it was computed (see `FitResult.profile`; additive, optional). */
  profile?: ProfileInterval;
  /** Bootstrap intervals at `level`, when the fit asked for them and they were not withheld (see `FitResult.bootstrap`; additive, optional). */
  bootstrap?: BootstrapInterval;
}

/**
 * Bootstrap intervals of one quantity (a parameter or a derived quantity) from
 * the refits that succeeded (engine/run/bootstrap-summary.ts).
 */
export interface BootstrapInterval {
  /** Percentile interval (Efron & Tibshirani 1993, §13.3): the (1 − level)/2 and (1 + level)/2 quantiles of the replicates. */
  lower: number;
  upper: number;
  /** BCa interval (Efron & Tibshirani 1993, §14.3), null when not computed (see `BootstrapSummary.bcaNote`). */
  bcaLower: number | null;
  bcaUpper: number | null;
  /** Standard deviation of the replicates (the bootstrap standard error, §6.2). */
  stderr: number;
  /** The bias-correction z₀ of BCa (eq. 14.14), null without BCa. */
  z0: number | null;
  /** The acceleration a of BCa (jackknife, eq. 14.15), null without BCa. */
  acceleration: number | null;
}

/**
 * What the bootstrap of a fit did: `computed` — every free parameter has
 * `bootstrap`; `withheld` — too many refits failed (`note` says how many and
 * why); `skipped` — not run (`note` says why: a per-group fit, a robust loss,
 * a fit that did not converge, cancelled).
 */
export interface BootstrapSummary {
  status: 'computed' | 'withheld' | 'skipped';
  note: string;
  resample: 'residuals' | 'adjusted' | 'cases';
  /** Replicates asked for. */
  replicates: number;
  /** The seed of the random streams (the default when the spec gives none), so the run reproduces. */
  seed: number;
  level: number;
  /** Refits that failed (of `replicates`), and why, most frequent first. */
  failed: number;
  failures: { reason: string; count: number }[];
  /** Whether BCa intervals were computed, and why not when not. */
  bca: boolean;
  bcaNote: string;
  /** Leave-one-out refits for the BCa acceleration (0 without BCa), and how many failed. */
  jackknife: number;
  jackknifeFailed: number;
}

/** Profile or bootstrap interval of a derived quantity, or why there is none (engine/run/derived-intervals.ts). */
export interface DerivedProfile {
  status: 'computed' | 'skipped';
  note: string;
  /** The interval, when computed. */
  interval: ProfileInterval | null;
}

export interface DerivedBootstrap {
  status: 'computed' | 'withheld' | 'skipped';
  note: string;
  interval: BootstrapInterval | null;
}

/**
 * One end of a profile-likelihood interval (engine/run/profile.ts):
 * `reached` — the profile t statistic reaches the t level at `value`;
 * `bound` — it stays below the t level up to the parameter's bound `value`: the interval is open there (the data do not close it before the bound);
 * `not_reached` — it stays below the t level as far as the search went (`value`, about 1000 Wald half-widths): open, unbounded on this side;
 * `failed` — a reduced fit failed (`value`: the last value profiled, or null), `reason` says why.
 */
export interface ProfileEnd {
  kind: 'reached' | 'bound' | 'not_reached' | 'failed';
  value: number | null;
  reason?: string;
}

/** Profile-likelihood interval of one free parameter (Bates & Watts 1988, §6.1). */
export interface ProfileInterval {
  lower: ProfileEnd;
  upper: ProfileEnd;
  /** Either end differs materially from the Wald end (more than 10 % of the Wald half-width, or open; engine/run/profile-limits.ts). */
  differs: boolean;
  /** Reduced fits solved for this parameter. */
  refits: number;
}

/**
 * Whether profile intervals were computed for a fit, and why not when not:
 * `computed` — every free parameter has `profile`;
 * `linear` — the model is linear in its parameters: the profile interval is the Wald interval, nothing computed;
 * `skipped` — not computed (`note` says why: switched off, a per-group fit not asked, over the work bound, a robust loss, no degrees of freedom).
 */
export interface ProfileSummary {
  status: 'computed' | 'linear' | 'skipped';
  note: string;
  /** The t level: the interval is where |τ| ≤ critical; null when not computed. */
  critical: number | null;
  /** Reduced fits solved over all parameters. */
  refits: number;
}

export interface GoodnessOfFit {
  n: number;
  /** Number of free (non-fixed) parameters. */
  p: number;
  dof: number;
  /** Sum of squared (weighted) residuals. */
  ssr: number;
  /** Residual standard deviation s = sqrt(SSR / dof). */
  rmse: number;
  r2: number;
  adjR2: number;
  /** χ² and reduced χ² when σ is absolute (`sigma` given), else null. */
  chi2: number | null;
  chi2Reduced: number | null;
  logLikelihood: number;
  aic: number;
  aicc: number;
  bic: number;
  /** 2-norm condition number of the scaled Jacobian at the solution. */
  condition: number;
}

export interface ResidualDiagnostics {
  /** Durbin–Watson statistic over residuals in predictor order. */
  durbinWatson: number | null;
  /** Wald–Wolfowitz runs test on residual signs: observed runs, expected, two-sided p. */
  runs: { observed: number; expected: number; pValue: number } | null;
  /** Shapiro–Wilk W and p (Royston 1995, AS R94), for 3 ≤ n ≤ 5000. */
  shapiroWilk: { w: number; pValue: number } | null;
  /**
   * Lack-of-fit F test against pure error (engine/stats/lack-of-fit.ts; additive, optional: absent for a fit that
   * did not converge). `f` and `pValue` are null when there is no test, and `note` says why (no replicates, …).
   */
  lackOfFit?: LackOfFitTest;
  /** Curvature test of the residuals against the squared fitted value (engine/stats/curvature.ts); null when it cannot be computed (additive, optional). */
  curvature?: CurvatureTest | null;
}

/** Lack-of-fit F test: SS_LOF/(m − p) over SS_PE/(n − m), m the number of distinct predictor settings. */
export interface LackOfFitTest {
  /** Distinct settings of the predictor columns (m). */
  levels: number;
  /** Rows whose setting occurs more than once. */
  replicatedRows: number;
  /** Lack-of-fit and pure-error sums of squares (weighted, in response units squared); null without a test. */
  ssLackOfFit: number | null;
  ssPureError: number | null;
  /** Degrees of freedom m − rank and n − m. */
  dfLackOfFit: number;
  dfPureError: number;
  f: number | null;
  pValue: number | null;
  /** Why there is no test (null when there is one). */
  note: string | null;
}

/** t test of the coefficient of the centred squared fitted value added to the (linearised) model. */
export interface CurvatureTest {
  t: number;
  dof: number;
  /** Two-sided p. */
  pValue: number;
}

/** Rows flagged by the influence and outlier rules (engine/stats/influence-flags.ts), with the thresholds applied. */
export interface InfluenceReport {
  /** Nonlinear model: the figures are those of the tangent-plane linearisation at the estimate. */
  linearised: boolean;
  /** Leverage above which a row is flagged: 2p/n (common practice). */
  leverageCutoff: number;
  /** Cook's distance above which a row is flagged as influential: 1 (common practice). */
  cooksCutoff: number;
  /** Cook's distance above which a row is listed as worth a look: 4/n (common practice; no warning). */
  cooksNotice: number;
  /** Family-wise level of the Bonferroni outlier test (each row tested at outlierLevel/n). */
  outlierLevel: number;
  /** |studentized deleted residual| above which a row is an outlier: t quantile 1 − level/(2n) with n − p − 1 dof; null when dof ≤ 0. */
  outlierCritical: number | null;
  /** Rows with leverage 1 (within the tolerance of engine/stats/influence.ts): the fit passes through them. */
  exact: number[];
  highLeverage: number[];
  influential: number[];
  notable: number[];
  /** Outliers: row, studentized deleted residual, Bonferroni-adjusted p = min(1, n·p). */
  outliers: { row: number; t: number; pValue: number }[];
}

/** Per-point arrays, all of length n, in data row order after filtering. */
export interface PointTable {
  /** 1-based data row number in the CSV (header is row 1, first data row is 2). */
  row: number[];
  /** The predictor value, when the fit has a single predictor. */
  x: number[] | null;
  y: number[];
  fitted: number[];
  residual: number[];
  /** Weighted residual / s, with s the residual standard deviation. */
  standardized: number[];
  /** Internally studentized residual r / (s·sqrt(1 − h)). */
  studentized: number[];
  /**
   * Studentized deleted (externally studentized) residual r / (s₍ᵢ₎·sqrt(1 − h)), s₍ᵢ₎ without the row
   * (engine/stats/influence.ts; additive, optional: absent in results written before it existed).
   */
  deletedStudentized?: number[];
  leverage: number[];
  cooksDistance: number[];
  weight: number[] | null;
}

/** Rows left out of a fit, with their values (same conventions as `PointTable`). */
export interface ExcludedPoints {
  reason: 'weight_zero';
  /** 1-based file line of each row. */
  row: number[];
  x: number[] | null;
  y: number[];
}

/**
 * Why a data row is not among a fit's points (engine/run/fit-data.ts). Each row is counted once, by the first
 * that applies in this order: a used cell empty or NA (`missing_cell`), the group label empty (`no_group`, per-group
 * fits), the data statement's `where` condition false (`where`), a weight of 0 (`weight_zero`).
 */
export type RowLeftOutReason = 'where' | 'missing_cell' | 'no_group' | 'weight_zero';

/** The reasons in the order every view states them. */
export const ROW_LEFT_OUT_REASONS: readonly RowLeftOutReason[] = ['where', 'missing_cell', 'no_group', 'weight_zero'];

/** Rows left out for one reason. */
export interface RowsLeftOut {
  reason: RowLeftOutReason;
  count: number;
}

/** How the data rows came to a fit's n: rows = fitted + the counts left out. */
export interface RowAccount {
  /** Data rows of the file; for one group of a per-group fit, the rows with its label. */
  rows: number;
  /** Rows fitted (the fit's n). */
  fitted: number;
  /** One entry per reason with rows left out (count > 0), in `ROW_LEFT_OUT_REASONS` order. */
  leftOut: RowsLeftOut[];
}

/** Bands over the predictor range (delta method), for single-predictor fits. */
export interface Bands {
  x: number[];
  fitted: number[];
  confidenceLower: number[];
  confidenceUpper: number[];
  predictionLower: number[];
  predictionUpper: number[];
}

export interface Prediction {
  x: number;
  /** On the model's scale: the response expression's (e.g. ln(rate)) for a transformed response. */
  fitted: number;
  confidence: [number, number];
  prediction: [number, number];
  /** Standard deviation of the new observation the prediction interval is for, on the model's scale (additive, optional). */
  observationSd?: number;
  /** x lies outside the range of the fitted predictor values (additive, optional; absent inside). */
  extrapolated?: boolean;
  /**
   * A transformed response (`model ln(rate) = …`): the same numbers on the response column's scale, each end
   * mapped through the inverse of the (monotone) response function, so the intervals are not symmetric
   * (additive, optional; absent for an untransformed response or when the inverse could not be formed).
   */
  original?: { fitted: number; confidence: [number, number]; prediction: [number, number] };
}

/** How an end of an inverse-prediction interval was found (engine/stats/inverse.ts). */
export type InverseEnd = 'data' | 'extrapolated' | 'open';

export interface InversePrediction {
  response: number;
  /** Predictor value solving model(x) = response; null when none in the data range. */
  x: number | null;
  /** Interval for x (inversion of the prediction band); null ends when unbounded. */
  interval: [number | null, number | null];
  message?: string;
  /**
   * Each end: inside the data range, beyond it (the curve extrapolated), or open (not reached: the interval is
   * one-sided there). Additive, optional (absent when x is null).
   */
  ends?: [InverseEnd, InverseEnd];
  /** x lies just beyond the data range (engine/thresholds.ts INVERSE_REACH; additive, optional). */
  extrapolated?: boolean;
}

/** Where a query's new-observation spread came from: the residual s, the fit's sigma/weight expression at the point, or the query's `sigma`/`weight`. */
export type ObservationSource = 'residual' | 'expression' | 'stated';

/** One standard read back through the curve (`backcalc`). */
export interface BackCalculation {
  /** 1-based file line of the standard's row. */
  row: number;
  /** The predictor value in the data (the nominal value). */
  nominal: number;
  /** The standard's response, on the model's scale. */
  response: number;
  /** The back-calculated predictor, its inverse-prediction interval and how each end was found (as `invert`). */
  x: number | null;
  interval: [number | null, number | null];
  ends?: [InverseEnd, InverseEnd];
  extrapolated?: boolean;
  /** 100·(x − nominal)/nominal; null when the nominal value is 0 or x is missing. */
  deviationPercent: number | null;
  /** The interval's ends as percent deviations from the nominal value (null where the end is open or the nominal 0). */
  deviationInterval: [number | null, number | null];
  message?: string;
}


/** One distinct minimum found by the multi-start search. */
export interface SearchMinimum {
  /** Sum of squared (weighted) residuals there. */
  ssr: number;
  /** Free-parameter values, in `SearchResult.parameters` order. */
  estimates: number[];
  /** The solver converged there (a local minimum); false: where a refinement stopped without converging. */
  converged: boolean;
  /** Refined candidates (the fit from the start included) that ended here. */
  hits: number;
  /** The fit from the starting values ended here. */
  fromStart: boolean;
  /** This is the fit reported. */
  reported: boolean;
}

/** The multi-start search of a fit (engine/solve/start/explore.ts), when it ran. */
export interface SearchResult {
  /**
   * Why it ran: a nonlinear parameter had no start value, the spec asked for it (`explore N`), or the check of a
   * fit that gets no search (every start given, or a group of a per-group fit; engine/solve/start/check.ts) found a
   * mark of a wrong basin on the minimum it reached (`mark`).
   */
  reason: 'no_start' | 'asked' | 'check';
  /** Free parameters, in the order of `minima[].estimates`. */
  parameters: string[];
  /** Box of the nonlinear parameters the design covered (linear ones are solved exactly for each point). */
  box: { parameter: string; lower: number; upper: number; scale: 'linear' | 'log' }[];
  /** Starting points tried (design and start), partial solves that gave a finite sum of squares, full refinements. */
  points: number;
  partial: number;
  refined: number;
  /** Distinct minima, lowest sum of squares first (equal SSR within 1e-8 relative counts as one). */
  minima: SearchMinimum[];
  /** Sum of squares reached from the starting values. */
  startSsr: number;
  /** A lower minimum than the one reached from the starting values was found (and is the one reported). */
  lowerElsewhere: boolean;
  /** Reason `check`: the mark of the fit from the given starts that made the search run, e.g. `ec ended on its lower bound`. */
  mark?: string;
  /** Why no design was run, when none was (e.g. a model linear in its parameters). */
  skipped?: string;
  /** Solver iterations and residual evaluations of the whole search (included in the fit's counts). */
  iterations: number;
  evaluations: number;
}

/** A group fitted a second time after its first attempt failed (per-group fits). */
export interface RetryRecord {
  /** How the first attempt stopped. */
  first: StopReason;
  /** Where the second attempt started: the group's own data-driven start, or the multi-start search on the group. */
  from: 'own_start' | 'search';
}

export interface FitResult {
  name: string;
  /** Group value when the fit ran per group. */
  group?: string;
  method: Exclude<Method, 'auto'>;
  /** The options as checked from the spec, for provenance (method may be `auto`). */
  options?: FitOptions;
  loss: LossKind;
  level: number;
  stop: StopReason;
  iterations: number;
  evaluations: number;
  /**
   * Levenberg–Marquardt with bounds: how they were handled (additive, optional):
   * `reflective` — the interior reflective trust region (engine/solve/reflective.ts),
   * `projection` — projection with an active set. Absent without bounds.
   */
  boundsMethod?: 'reflective' | 'projection';
  /** Per-iteration solver trace, when asked for (additive, optional). */
  trace?: FitTrace;
  parameters: ParameterResult[];
  /** Covariance of the free parameters, in `parameters` order (fixed ones are zero rows). */
  covariance: number[][];
  correlation: number[][];
  goodness: GoodnessOfFit;
  residuals: ResidualDiagnostics;
  points: PointTable;
  bands: Bands | null;
  predictor: string | null;
  response: string;
  sigmaAbsolute: boolean;
  rowsDropped: number;
  /**
   * Rows left out of the fit on purpose (additive, optional; absent when none):
   * not in `points`, n, dof or any statistic, but still drawn. `reason`
   * `weight_zero`: the weight expression is 0 there.
   */
  excluded?: ExcludedPoints;
  /** How the file's rows came to n, with a count per reason left out (additive, optional: absent in results written before it existed). */
  rowAccount?: RowAccount;
  /** Per-group fits: the same account over the whole fit, every group together (additive, optional; absent for a single fit). */
  fitRowAccount?: RowAccount;
  warnings: FitWarning[];
  /**
   * Per-group fits: residual warnings the test across the fit's groups did not uphold (Holm 1979;
   * engine/groups/flags.ts `adjustGroupWarnings`), kept here with their adjustment (additive, optional; absent when none).
   */
  setAside?: FitWarning[];
  /** Rows flagged by leverage, Cook's distance and the outlier test, with the thresholds (additive, optional: absent for a fit that did not converge). */
  influence?: InfluenceReport;
  /** The multi-start search, when it ran (additive, optional). */
  search?: SearchResult;
  /** A robust loss: the scale used and each point's final weight (additive, optional; absent for squared loss or a fit that did not converge). */
  robust?: RobustSummary;
  /** Per-group fits: the group failed from the shared start and was fitted again (additive, optional). */
  retry?: RetryRecord;
  /** Profile-likelihood intervals: computed, equal to Wald (linear model), or why skipped; absent for a fit that did not converge (additive, optional). */
  profile?: ProfileSummary;
  /** The bootstrap, when the fit asked for it (`bootstrap N`; additive, optional). */
  bootstrap?: BootstrapSummary;
  /** The model equation and the weighting as the spec states them (additive, optional; set by the runner, engine/runner/run-plan.ts `finishRun`). */
  model?: FitModelText;
  /** Declared units of the response and the predictor (`units` of the data; additive, optional: absent when neither has one; set by the runner with `model`). */
  units?: FitUnits;
  /**
   * A group of a joint fit: its share of the joint fit's parameters (the trace of the joint hat matrix over its
   * rows), the residual degrees of freedom and standard deviation of its own rows with that share, and the pooled
   * s and dof of the joint fit that its goodness.rmse and goodness.dof report (engine/run/joint-group-stats.ts;
   * additive, optional).
   */
  jointShare?: { parameters: number; dof: number; rmse: number; pooledRmse: number; pooledDof: number };
  /** Milliseconds spent fitting (not deterministic; views may omit it). */
  elapsedMs: number;
}

/** Units declared for a fit's columns (`data … units COLUMN [UNIT]`), without brackets: labels only, never converted. */
export interface FitUnits {
  /** The response's unit, when the response is a plain column with a declared unit. */
  response?: string;
  /** The single predictor's unit, when declared. */
  predictor?: string;
}

/** The model equation and how the points are weighted, as every view states them. */
export interface FitModelText {
  /** `response = model`, as the spec wrote it (fixed parameters by name). */
  equation: string;
  weighting: Weighting;
}

/**
 * How the points of a fit are weighted: `none` (ordinary least squares), `weight` (relative weights wᵢ, the
 * residual variance still estimated: weighted SSR, R² and RMSE), `sigma` (absolute σᵢ, weights 1/σᵢ²: SSR is χ²,
 * RMSE is in σ units). `expression` is the spec's weight or sigma expression.
 */
export interface Weighting {
  kind: 'none' | 'weight' | 'sigma';
  expression: string | null;
}

/** What a robust loss did (engine/solve/loss.ts). */
export interface RobustSummary {
  /** The loss scale c, in units of the (weighted) residual. */
  scale: number;
  /** `given`: the spec's `scale`; `spread`: `tuning` × 1.4826·MAD of the residuals. */
  scaleFrom: 'given' | 'spread';
  /** The loss's tuning constant k (parser/registry/losses.ts). */
  tuning: number;
  /** Each point's final weight ρ′((r/c)²), in `points` order: 1 inside the scale, less beyond it. */
  weights: number[];
  /** Points with a weight below 1 (residual beyond the scale). */
  downweighted: number;
}

export type QueryResult =
  /** `group`: the group of a per-group fit (additive, optional). */
  /**
   * `withheld`: the fit (or group) did not converge, so no numbers are given - `predictions` and `inversions` list
   * the values asked for with fitted values, x and intervals null, `rows` of a comparison is empty - and this says why.
   */
  /**
   * `observation`: where the new observation's spread came from (additive, optional); `transform`: the response
   * expression when it is a function of the response column, whose scale `original` reports (additive, optional);
   * `range`: the predictor range of the fitted points, which `extrapolated` refers to (additive, optional).
   */
  | {
      kind: 'predict'; fit: string; group?: string; variable: string; predictions: Prediction[]; withheld?: string;
      observation?: ObservationSource; transform?: { column: string; expression: string }; range?: [number, number];
    }
  /** `readings`: responses are means of this many readings (additive, optional; absent for 1). */
  | { kind: 'invert'; fit: string; group?: string; response: string; inversions: InversePrediction[]; withheld?: string; readings?: number; observation?: ObservationSource }
  /** Every fitted point read back through the curve (`backcalc`); `response` is the response as the model has it. */
  | { kind: 'backcalc'; fit: string; group?: string; predictor: string; response: string; standards: BackCalculation[]; withheld?: string }
  | {
      kind: 'compare';
      withheld?: string;
      fits: string[];
      rows: { fit: string; n: number; p: number; ssr: number; aic: number; aicc: number; bic: number; deltaAicc: number; akaikeWeight: number }[];
      /** Extra-sum-of-squares F test, only for two fits whose nesting is established or declared (`nesting`). */
      fTest?: { f: number; df1: number; df2: number; pValue: number; simpler: string; richer: string };
      /**
       * Fits left out of the ranking (additive, optional; absent when none): failed or not
       * converged, with their stop code and why. `rows` holds only the ranked fits.
       */
      excluded?: CompareExclusion[];
      /** How nesting was decided, for two ranked fits with different parameter counts (additive, optional). */
      nesting?: CompareNesting;
      /** Why no F test is shown, when there is none (additive, optional). */
      noFTest?: string;
      /** Fits with groups (`per COLUMN` or several tables) compared (additive, optional; engine/run/compare-groups.ts). */
      grouped?: CompareGrouped;
    };

/**
 * A `compare` of fits with groups (engine/run/compare-groups.ts). The ranking (`rows`, `fTest`) takes each fit
 * as a whole: n, SSR and the free parameters summed over its groups (a joint fit's shared parameters counted
 * once), with one residual variance for all groups. `perGroup` compares the fits group by group, when none of
 * them is a joint fit.
 */
export interface CompareGrouped {
  /** The grouping column; empty for fits over several tables. */
  by: string;
  over: 'column' | 'tables';
  /** Group labels, in group order. */
  groups: string[];
  /** The compared fits that are joint fits (shared parameters). */
  joint: string[];
  /** One row per group (no fit is joint). */
  perGroup?: CompareGroupRow[];
  /** Why there is no group-by-group table. */
  noPerGroup?: string;
}

export interface CompareGroupRow {
  group: string;
  /** AICc of each compared fit for this group, in the order of `fits`; NaN (null in JSON) when that fit's group did not converge. */
  aicc: number[];
  /** The fit with the lowest AICc; null when fewer than two fits converged for the group. */
  best: string | null;
  /** AICc of the next-best fit above the best one (NaN without two). */
  deltaAicc: number;
  fTest?: { f: number; df1: number; df2: number; pValue: number; simpler: string; richer: string };
  /** Why this group has no F test (two fits only). */
  noFTest?: string;
}

/** A fit of a `compare` left out of the ranking (engine/run/compare-query.ts). */
export interface CompareExclusion {
  fit: string;
  code: StopCode;
  reason: string;
}

/**
 * Nesting of the two fits of a `compare` (engine/run/nesting.ts): `established` by the
 * numerical reproduction test, `declared` by the spec (`compare a within b`), `not_nested`
 * (the richer model does not reproduce the simpler one), `not_checked` (the test cannot run).
 */
export interface CompareNesting {
  simpler: string;
  richer: string;
  status: 'established' | 'declared' | 'not_nested' | 'not_checked';
  /** Largest relative distance of the reproductions (null when the test did not run). */
  distance: number | null;
  /** The tolerance the distance is held to (engine/run/nesting.ts NESTING_TOLERANCE). */
  tolerance: number;
  /** The method and its outcome in words. */
  detail: string;
}

export interface ExpectationResult {
  expectation: Expectation;
  /** The group checked, for per-group fits (one result per group; additive, optional). */
  group?: string;
  actual: number | null;
  passed: boolean;
  message: string;
}

/**
 * The value of a `derive` statement (engine/run/derived.ts), one per group
 * when it reads a per-group fit. Its standard error is by the first-order
 * delta method over the covariance of the parameters it reads; `note` says
 * how the uncertainty was obtained, under which assumptions, or why a number
 * is missing.
 */
export interface DerivedResult {
  name: string;
  /** Group, when the quantity reads a per-group fit. */
  group?: string;
  /** The expression as written in the spec. */
  expression: string;
  /** Null when it cannot be computed (see `note`). */
  value: number | null;
  /** Null when the value depends on no free parameter or the covariance is unusable. */
  stderr: number | null;
  /** Interval value ± q·stderr at `level` (q Student t with `dof` degrees of freedom, or normal when `dof` is null). */
  lower: number | null;
  upper: number | null;
  /** Confidence level of [lower, upper]; null when there is no interval. */
  level: number | null;
  /** Degrees of freedom of the Student-t interval; null for a normal interval or none. */
  dof: number | null;
  unit?: string;
  /** Fits the value reads, directly or through earlier derived quantities. */
  fits: string[];
  note: string;
  /** The derive statement in the spec. */
  range?: Range;
  /** Profile-likelihood interval at `level` for a quantity of one single fit (additive, optional; engine/run/derived-intervals.ts). */
  profile?: DerivedProfile;
  /** Bootstrap intervals, when the fit it reads ran a bootstrap (additive, optional). */
  bootstrap?: DerivedBootstrap;
  /** Warnings about this quantity (`profile_differs`; additive, optional). */
  warnings?: FitWarning[];
}

/** A data or run-time problem with a location (spec range or data file cell). */
export interface RunError {
  code: string;
  message: string;
  /** Where in the spec (e.g. the data statement). */
  range?: Range;
  /** Where in a data file. */
  file?: string;
  row?: number;
  /** 1-based field number of the place in its file line (the column of `file:line:column`; additive, optional). */
  field?: number;
  column?: string;
  /** The offending cell text, when a data cell is at fault (additive, optional). */
  value?: string;
  /** The fit the error belongs to, when it is specific to one (additive, optional). */
  fit?: string;
}

export interface Provenance {
  tool: string;
  toolVersion: string;
  specPath?: string;
  /** SHA-256 of the spec text. */
  specSha256: string;
  data: { name: string; path: string; sha256: string; rows: number }[];
  startedAt: string;
  /**
   * The run fitted one shard of the work (`fit --shard I/N`; additive,
   * optional; engine/groups/shards.ts): of each per-group fit the groups in
   * `fits`, and fits without groups only when `index` is 1.
   */
  shard?: ShardInfo;
}

/** What a shard of a run fitted (`Provenance.shard`). */
export interface ShardInfo {
  /** 1…count. */
  index: number;
  count: number;
  /** The fits the run was limited to (`--fit`), when it was. */
  only?: string[];
  /** Per per-group fit: its groups in the whole data and the range [from, to) of them (group order) this shard fitted. */
  fits: ShardFit[];
  /** How many of `errors` came from loading and fitting (the rest from queries, derived quantities and expectations, which gathering computes anew). */
  fitErrors: number;
}

export interface ShardFit {
  fit: string;
  groups: number;
  from: number;
  to: number;
}

export interface RunResult {
  version: typeof RESULT_VERSION;
  provenance: Provenance;
  fits: FitResult[];
  queries: QueryResult[];
  /**
   * Derived quantities in declaration order (additive: absent in results
   * written before derived quantities existed; views treat absent as none).
   */
  derived?: DerivedResult[];
  expectations: ExpectationResult[];
  errors: RunError[];
  /**
   * Joint fits over the groups of a `per` fit with `shared` parameters
   * (engine/run/joint.ts), one entry per such fit: the joint solve, its shared
   * estimates and the comparisons between groups. The groups' own results are
   * in `fits` as for any per-group fit (additive, optional: absent without joint fits).
   */
  joint?: JointFitResult[];
}

/** One parameter of a joint fit: its estimate with the joint covariance's standard error and interval (Student t, the joint dof). */
export interface JointEstimate {
  name: string;
  estimate: number;
  stderr: number | null;
  lower: number | null;
  upper: number | null;
  unit?: string;
  /** Profile-likelihood interval of the shared parameter, when computed (engine/run/joint-intervals.ts; additive, optional). */
  profile?: ProfileInterval;
  /** Bootstrap intervals of the shared parameter, when the fit ran one (engine/run/joint-bootstrap.ts; additive, optional). */
  bootstrap?: BootstrapInterval;
}

/** Extra-sum-of-squares F test of a model nested in a larger one (Seber & Wild 1989, §5.3): F = ((SSR₀ − SSR₁)/(dof₀ − dof₁)) / (SSR₁/dof₁). */
export interface NestedFTest {
  /** The restricted (fewer parameters) and the general model. */
  restricted: { ssr: number; dof: number; p: number };
  general: { ssr: number; dof: number; p: number };
  f: number;
  df1: number;
  df2: number;
  pValue: number;
  /** Set when the test cannot be read as computed, e.g. the general model's SSR above the restricted one's (a fit that missed its minimum) or a fit that did not converge. */
  note?: string;
}

/** A difference and a ratio of one per-group parameter between two groups (b − a, b / a), with intervals from the joint covariance. */
export interface GroupPair {
  parameter: string;
  a: string;
  b: string;
  difference: number;
  differenceSe: number | null;
  differenceLower: number | null;
  differenceUpper: number | null;
  ratio: number;
  /** Fieller (1954) interval of b / a; null ends: the interval is not bounded at this level (the denominator's interval includes 0). */
  ratioLower: number | null;
  ratioUpper: number | null;
}

export interface JointFitResult {
  fit: string;
  groupBy: string;
  /** `tables`: a fit over several tables (`fit NAME on A, B, …`), each group one table, named by it; `groupBy` is then empty. Absent: the groups of the column `groupBy`. Additive. */
  over?: 'tables';
  /** Free parameters shared by every group, and those fitted per group, in plan order. */
  shared: string[];
  perGroup: string[];
  /** Groups in the joint fit, in group order, and those left out with why. */
  groups: string[];
  leftOut: { group: string; reason: string }[];
  stop: StopReason;
  iterations: number;
  evaluations: number;
  n: number;
  /** Free parameters of the joint problem: shared + groups × per-group. */
  p: number;
  dof: number;
  ssr: number;
  /** s = √(SSR/dof) (1 with absolute sigma: the covariance is not scaled). */
  rmse: number;
  level: number;
  sigmaAbsolute: boolean;
  /** The shared parameters' estimates. */
  estimates: JointEstimate[];
  /** Shared versus separate: every shared parameter released at once (the joint fit against the groups' separate fits); null when a separate fit is missing. */
  sharedVsSeparate: NestedFTest | null;
  /** Per shared parameter: the joint fit against the joint fit with that one parameter fitted per group. */
  perParameter: ({ parameter: string } & NestedFTest)[];
  /** Pairwise comparisons of each per-group parameter (all pairs up to PAIR_GROUPS groups, else each group against the first). */
  pairs: GroupPair[];
  /**
   * For covariances between groups (engine/solve/block-covariance.ts): the unscaled X_g of each group in `groups`
   * order (p_l × pₛ, row-major) and `scale` = s², so that Cov(θ_g, θ_h) = s²·X_g·X_hᵀ for g ≠ h.
   */
  cross: { scale: number; x: number[][] };
  /** Lack-of-fit test pooled over the groups (settings distinct within each group, P parameters; engine/run/joint-group-stats.ts; additive, optional). */
  lackOfFit?: LackOfFitTest;
  elapsedMs: number;
}
