/**
 * The numbers that bound and judge profile-likelihood intervals
 * (engine/run/profile.ts), each with the reason for its value. Kept in this
 * module of their own until the project's thresholds module takes them.
 */

/**
 * Work bound of the default (declared with the option, parser/registry/options.ts):
 * a single nonlinear fit gets its profile intervals without being asked when
 * n·p ≤ PROFILE_WORK_BOUND (n rows, p free parameters). A profile costs a few
 * reduced refits per end (4–6 with the warm start), each like a fit from a good
 * start, O(n·p²) per iteration. Measured with the CLI on this machine (2 shared
 * cores, noisy): a 4-parameter logistic with n = 10,000 (n·p = 40,000) takes
 * 36 reduced fits and about 2 s more than without profiles (3.3 s against
 * 1.2–1.7 s); n = 2,500 (n·p = 10,000) about 0.3–0.7 s more. 10,000 keeps the
 * default cost under about half a second; beyond it `profile always` asks.
 */
export { PROFILE_WORK_BOUND } from '../../parser/registry/options';

/**
 * The search for an end stops as open ("not reached") when the profile stays
 * below the t level out to PROFILE_REACH Wald half-widths from the estimate:
 * the sum of squares then levels off (an asymptote the data do not close), and
 * steps further out only meet overflow of the model.
 */
export const PROFILE_REACH = 1000;

/** At most this many stepping refits per end before the bracket is found (steps grow up to 4× each: 40 covers PROFILE_REACH many times). */
export const PROFILE_MAX_STEPS = 40;

/**
 * Brent's bracket tolerance on an end, relative to the parameter's standard
 * error: |end − true end| ≲ PROFILE_XTOL·se. 1e-9: the reduced fits give S to
 * about 1e-12 relative, which moves τ by ~1e-11 and the end by ~1e-11·se, so
 * 1e-9 is well above the noise and far below any reported digit.
 */
export const PROFILE_XTOL = 1e-9;

/**
 * A reduced fit whose sum of squares is below S(θ̂) by more than
 * PROFILE_LOWER_SSR·S(θ̂) means the reported fit is not the minimum there;
 * the end is then "failed" and says so. Smaller shortfalls (1e-9 relative:
 * the stopping tolerances of the two solves) are rounding and count as τ = 0.
 */
export const PROFILE_LOWER_SSR = 1e-9;

/**
 * Residuals at rounding level: no profile when √(SSR/n) ≤ PROFILE_ROUNDING·max|√wᵢ·yᵢ|, the same relative level
 * at which the fit's residual tests are withheld (engine/run/fit-stats.ts ROUNDING_LEVEL, 1e-12): S is then noise
 * of the arithmetic and the profile t statistic measures nothing.
 */
export const PROFILE_ROUNDING = 1e-12;
