/**
 * The options of a fit body (every fit item but `model` and `param`): how
 * each is written, what it means, its default, and the plan field it sets.
 * LANGUAGE.md's options table is generated from this list
 * (test/registry/generated.test.ts). parser/check-options.ts `OPTION_KEYWORD`
 * maps every field of the plan's `FitOptions` to the keyword that sets it, so
 * a field added to `FitOptions` without its keyword does not compile (kept
 * there: the registries do not import the plan, which imports them).
 */
import type { KeywordName } from './keywords';
import { METHODS } from './methods';
import { LOSSES } from './losses';

/** Largest `explore N` (design points of the multi-start search). */
export const MAX_EXPLORE = 4096;

/** Work bound of the default `profile auto`: n·p at most this (engine/run/profile-limits.ts gives the measurement). */
export const PROFILE_WORK_BOUND = 10_000;

/** Values of `profile MODE` (profile-likelihood intervals, engine/run/profile-fit.ts). */
export const PROFILE_MODES = ['auto', 'always', 'never'] as const;
export type ProfileMode = (typeof PROFILE_MODES)[number];
export function isProfileMode(s: string): s is ProfileMode {
  return (PROFILE_MODES as readonly string[]).includes(s);
}

/** Ways of drawing a bootstrap sample (`bootstrap N MODE`, engine/run/bootstrap.ts). */
export const BOOTSTRAP_RESAMPLES = ['residuals', 'adjusted', 'cases'] as const;
export type BootstrapResample = (typeof BOOTSTRAP_RESAMPLES)[number];
export function isBootstrapResample(s: string): s is BootstrapResample {
  return (BOOTSTRAP_RESAMPLES as readonly string[]).includes(s);
}
/** Fewest and most bootstrap refits (`bootstrap N`). */
export const MIN_BOOTSTRAP = 100;
export const MAX_BOOTSTRAP = 1_000_000;
/** Seed of the bootstrap's random streams when the spec gives none (reported, so a run reproduces). */
export const DEFAULT_BOOTSTRAP_SEED = 1;
/** Largest seed (the streams take it as a 32-bit unsigned integer, engine/run/bootstrap-rng.ts). */
export const MAX_BOOTSTRAP_SEED = 2 ** 32 - 1;

export interface FitOptionSpec {
  /** The item as written (Markdown-free; `|` separates alternatives). */
  readonly syntax: string;
  readonly meaning: string;
  readonly default: string;
  /** Where the plan keeps it: a field of `FitOptions`, of a fit block (`sigma`, `weight`), or of the fit (`groupBy`); test/registry/registries.test.ts checks each. */
  readonly field: string;
}

export type FitOptionKeyword = Extract<KeywordName, 'sigma' | 'weight' | 'method' | 'loss' | 'level' | 'iterations' | 'tolerance' | 'rate' | 'explore' | 'profile' | 'bootstrap' | 'per'>;

export const FIT_OPTION_SPECS: Readonly<Record<FitOptionKeyword, FitOptionSpec>> = {
  sigma: { syntax: 'sigma EXPR', meaning: 'absolute standard deviation of each point; weights are 1/σ² and chi-square statistics are reported', default: 'unweighted', field: 'sigma' },
  weight: { syntax: 'weight EXPR', meaning: 'relative weight of each point (the residual variance is still estimated)', default: '1', field: 'weight' },
  method: {
    syntax: `method ${METHODS.join(' | ')}`,
    meaning: 'solver',
    default: '`auto`: linear least squares when the model is linear in its parameters, else Levenberg–Marquardt; `linear` only for such a model',
    field: 'method',
  },
  loss: {
    syntax: `loss ${LOSSES.join(' | ')} [scale C]`,
    meaning: 'how residuals are penalised (see Losses below); `scale` is where a robust loss starts to down-weight (C > 0)',
    default: '`squared`; a robust loss without `scale` takes its tuning constant k times the robust spread of the residuals (1.4826·MAD): k = 1.345 for `huber` and `pseudo_huber`, 2.385 for `cauchy`',
    field: 'loss',
  },
  level: { syntax: 'level P', meaning: 'confidence level of intervals and bands, 0 < P < 1', default: '0.95', field: 'level' },
  iterations: { syntax: 'iterations N', meaning: 'iteration limit of iterative solvers (whole number > 0)', default: '1000 (Levenberg–Marquardt), 100000 (gradient descent)', field: 'maxIterations' },
  tolerance: { syntax: 'tolerance T', meaning: 'relative stopping tolerance (> 0, and below 1: a larger value stops the fit with a message)', default: '1e-10', field: 'tolerance' },
  rate: { syntax: 'rate R', meaning: 'learning rate, gradient_descent only (> 0)', default: 'chosen by the solver', field: 'learningRate' },
  explore: {
    syntax: 'explore N',
    meaning: `multi-start search: N spread-out starting points (Sobol' design) over the nonlinear parameters, the best few refined; the lowest minimum is reported (whole number 0–${MAX_EXPLORE}, 0: no search)`,
    default: 'a search of 32 points per nonlinear parameter (32–256) when a nonlinear parameter has no start value; none when every start is given, and none per group of a `per` fit',
    field: 'explore',
  },
  profile: {
    syntax: `profile ${PROFILE_MODES.join(' | ')}`,
    meaning: 'profile-likelihood intervals of the parameters beside the symmetric ones (Bates & Watts 1988, §6.1): `always` also for the groups of a `per` fit, large fits and linear models, `never` not at all',
    default: `\`auto\`: for a single fit of a nonlinear model with the squared loss when n·p ≤ ${PROFILE_WORK_BOUND}; a linear model's profile interval is its symmetric one`,
    field: 'profile',
  },
  bootstrap: {
    syntax: `bootstrap N [${BOOTSTRAP_RESAMPLES.join(' | ')}] [seed S]`,
    meaning: `N refits of resampled data, started from the estimate, for percentile and BCa intervals of the parameters and derived quantities (Efron & Tibshirani 1993, ch. 13–14): \`residuals\` adds resampled (weighted) residuals to the fitted values, \`adjusted\` the same with leverage-adjusted residuals, \`cases\` resamples whole rows; N a whole number ${MIN_BOOTSTRAP}–${MAX_BOOTSTRAP}, S a whole number 0–${MAX_BOOTSTRAP_SEED}`,
    default: `no bootstrap; with \`bootstrap N\`: \`residuals\`, seed ${DEFAULT_BOOTSTRAP_SEED}`,
    field: 'bootstrap',
  },
  per: { syntax: 'per COLUMN', meaning: 'one separate fit per distinct value of the column', default: 'one fit', field: 'groupBy' },
};
