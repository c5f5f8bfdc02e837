/**
 * Fit options (method, loss, level, iterations, tolerance, rate, explore, profile, per):
 * value checks and the defaults documented on `FitOptions` in plan.ts.
 */
import type { FitAst, FitItemAst, NumericOptionAst, NumericOptionKind } from './ast';
import type { FitOptions } from './plan';
import { LOSSES, MAX_EXPLORE, METHODS, PROFILE_MODES, RENAMED_LOSSES, isLoss, isMethod, isProfileMode, type KeywordName } from './registry';
import { BOOTSTRAP_RESAMPLES, DEFAULT_BOOTSTRAP_SEED, MAX_BOOTSTRAP, MAX_BOOTSTRAP_SEED, MIN_BOOTSTRAP, isBootstrapResample, type BootstrapResample } from './registry';
import type { Env } from './check-env';
import { resolveValue } from './check-expr';
import { MSG } from './messages';

type Item<K extends FitItemAst['kind']> = K extends NumericOptionKind ? NumericOptionAst : Extract<FitItemAst, { kind: K }>;

/** The keyword that sets each field of `FitOptions` (`lossScale` is the `scale` part of `loss`): a field without its keyword does not compile. */
export const OPTION_KEYWORD: Readonly<Record<keyof FitOptions, KeywordName>> = {
  method: 'method',
  loss: 'loss',
  lossScale: 'scale',
  level: 'level',
  maxIterations: 'iterations',
  tolerance: 'tolerance',
  learningRate: 'rate',
  explore: 'explore',
  profile: 'profile',
  bootstrap: 'bootstrap',
};

/** Default options (plan.ts FitOptions docs). */
export const DEFAULT_OPTIONS: Readonly<FitOptions> = { method: 'auto', loss: 'squared', level: 0.95 };

export function checkOptions(env: Env, fit: FitAst, dataName: string, columns: ReadonlySet<string> | undefined): { options: FitOptions; groupBy?: string } {
  const { r } = env;
  const options: FitOptions = { ...DEFAULT_OPTIONS };
  const once = <K extends FitItemAst['kind']>(kind: K, label: string): Item<K> | undefined => {
    const items = fit.items.filter((i) => i.kind === kind) as Item<K>[];
    for (const extra of items.slice(1)) r.report('duplicate_option', MSG.duplicateOption(label), extra.range);
    return items[0];
  };

  const method = once('method', 'method');
  if (method?.value) {
    const v = method.value.name;
    if (isMethod(v)) options.method = v;
    else r.report('unknown_option', MSG.unknownOption('method', v, METHODS), method.value.range, env.suggester.suggest(v, METHODS));
  }

  const loss = once('loss', 'loss');
  if (loss?.value) {
    const v = loss.value.name;
    const renamed = Object.prototype.hasOwnProperty.call(RENAMED_LOSSES, v) ? RENAMED_LOSSES[v] : undefined;
    if (isLoss(v)) options.loss = v;
    else if (renamed) r.report('unknown_option', MSG.renamedOption('loss', v, renamed), loss.value.range, [renamed]);
    else r.report('unknown_option', MSG.unknownOption('loss', v, LOSSES), loss.value.range, env.suggester.suggest(v, LOSSES));
  }
  if (loss?.scale) {
    const s = resolveValue(env, loss.scale, { allowInf: false });
    if (s !== undefined && !(s > 0)) r.report('not_positive', MSG.notPositive('scale', s), loss.scale.range);
    else if (s !== undefined) options.lossScale = s;
    if (loss.value?.name === 'squared') r.report('option_ignored', MSG.scaleIgnored, loss.scale.range);
  }

  const level = once('level', 'level');
  if (level) {
    const v = resolveValue(env, level.value, { allowInf: false });
    if (v !== undefined && !(v > 0 && v < 1)) r.report('level_range', MSG.levelRange(v), level.value.range);
    else if (v !== undefined) options.level = v;
  }

  const iterations = once('iterations', 'iterations');
  if (iterations) {
    const v = resolveValue(env, iterations.value, { allowInf: false });
    if (v !== undefined && !(v > 0)) r.report('not_positive', MSG.notPositive('iterations', v), iterations.value.range);
    else if (v !== undefined && !Number.isInteger(v)) r.report('not_integer', MSG.notInteger('iterations', v), iterations.value.range);
    else if (v !== undefined) options.maxIterations = v;
  }

  const tolerance = once('tolerance', 'tolerance');
  if (tolerance) {
    const v = resolveValue(env, tolerance.value, { allowInf: false });
    if (v !== undefined && !(v > 0)) r.report('not_positive', MSG.notPositive('tolerance', v), tolerance.value.range);
    else if (v !== undefined) options.tolerance = v;
  }

  const rate = once('rate', 'rate');
  if (rate) {
    const v = resolveValue(env, rate.value, { allowInf: false });
    if (v !== undefined && !(v > 0)) r.report('not_positive', MSG.notPositive('rate', v), rate.value.range);
    else if (v !== undefined) options.learningRate = v;
    const methodUnreadable = method?.value !== undefined && !isMethod(method.value.name);
    if (options.method !== 'gradient_descent' && !methodUnreadable) {
      r.report('option_ignored', MSG.rateIgnored, rate.range);
    }
  }

  const explore = once('explore', 'explore');
  if (explore) {
    const v = resolveValue(env, explore.value, { allowInf: false });
    if (v !== undefined && !(Number.isInteger(v) && v >= 0 && v <= MAX_EXPLORE)) r.report('explore_range', MSG.exploreRange(v, MAX_EXPLORE), explore.value.range);
    else if (v !== undefined) options.explore = v;
    if (v !== undefined && (options.method === 'linear' || options.method === 'gradient_descent')) r.report('option_ignored', MSG.exploreIgnored, explore.range);
  }

  const profile = once('profile', 'profile');
  if (profile?.value) {
    const v = profile.value.name;
    if (isProfileMode(v)) {
      if (v !== 'auto') options.profile = v;
    } else r.report('unknown_option', MSG.unknownOption('profile', v, PROFILE_MODES), profile.value.range, env.suggester.suggest(v, PROFILE_MODES));
  }

  const bootstrap = once('bootstrap', 'bootstrap');
  if (bootstrap) {
    const n = resolveValue(env, bootstrap.replicates, { allowInf: false });
    let ok = n !== undefined;
    if (n !== undefined && !(Number.isInteger(n) && n >= MIN_BOOTSTRAP && n <= MAX_BOOTSTRAP)) {
      r.report('bootstrap_range', MSG.bootstrapRange(n, MIN_BOOTSTRAP, MAX_BOOTSTRAP), bootstrap.replicates.range);
      ok = false;
    }
    let resample: BootstrapResample = 'residuals';
    if (bootstrap.resample) {
      const v = bootstrap.resample.name;
      if (isBootstrapResample(v)) resample = v;
      else {
        r.report('unknown_option', MSG.unknownOption('bootstrap', v, BOOTSTRAP_RESAMPLES), bootstrap.resample.range, env.suggester.suggest(v, BOOTSTRAP_RESAMPLES));
        ok = false;
      }
    }
    let seed = DEFAULT_BOOTSTRAP_SEED;
    if (bootstrap.seed) {
      const s = resolveValue(env, bootstrap.seed, { allowInf: false });
      if (s !== undefined && !(Number.isInteger(s) && s >= 0 && s <= MAX_BOOTSTRAP_SEED)) {
        r.report('seed_range', MSG.seedRange(s, MAX_BOOTSTRAP_SEED), bootstrap.seed.range);
        ok = false;
      } else if (s === undefined) ok = false;
      else seed = s;
    }
    if (ok && n !== undefined) options.bootstrap = { replicates: n, resample, seed };
  }

  let groupBy: string | undefined;
  const per = once('per', 'per');
  if (per?.column) {
    groupBy = per.column.name;
    if (columns && !columns.has(groupBy)) {
      r.report('unknown_column', MSG.unknownColumn(groupBy, dataName), per.column.range, env.suggester.suggest(groupBy, columns));
    }
  }
  return { options, groupBy };
}
