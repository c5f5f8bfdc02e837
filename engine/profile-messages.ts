/**
 * User-facing texts of profile-likelihood intervals (engine/run/profile-fit.ts),
 * shared by the CLI, reports and the editor. Kept beside engine/messages.ts
 * (same conventions: one sentence, numbers through `num`) until they move in.
 */
import { num } from './messages';
import type { ProfileEnd } from './result';

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
