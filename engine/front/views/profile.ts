/**
 * Profile-likelihood intervals in the views (CLI text, Markdown, panel):
 * a table beside the parameter table when they were computed, else one line
 * that says why there is none (linear model: equal to the symmetric interval;
 * skipped: the reason). Reads `FitResult.profile` and
 * `ParameterResult.profile` only (engine/result.ts).
 */
import type { FitResult, ParameterResult, ProfileEnd } from '../../result';
import { formatEstimate, formatLevel, formatNumber, isUsable } from '../../format';

export const PROFILE_HEADERS = (level: number): string[] => ['parameter', `profile ${formatLevel(level)} low`, `profile ${formatLevel(level)} high`, 'against the symmetric interval'];

/** Whether the fit has a profile table to show. */
export function hasProfileTable(fit: FitResult): boolean {
  return fit.profile?.status === 'computed' && fit.parameters.some((p) => p.profile);
}

/** The heading line of the profile section, or null when the fit has no profile summary. */
export function profileLine(fit: FitResult): string | null {
  const s = fit.profile;
  if (!s) return null;
  if (s.status === 'computed') return `Profile intervals (${s.note}; ${s.refits} reduced fits)`;
  if (s.status === 'linear') return `Profile intervals: ${s.note}`;
  return `Profile intervals: ${s.note}`;
}

/** One end in the digits of the parameter's symmetric interval, or in words when open. */
function endCell(p: ParameterResult, e: ProfileEnd, side: 'lower' | 'upper'): string {
  // the digits of the symmetric interval's ends (same last digit, from the standard error)
  const digits = (v: number) => formatEstimate(p.estimate, p.stderr, v, v)[side] || formatNumber(v, 6);
  switch (e.kind) {
    case 'reached':
      return isUsable(e.value) ? digits(e.value) : 'n/a';
    case 'bound':
      return isUsable(e.value) ? `open at bound ${formatNumber(e.value, 6)}` : 'open at bound';
    case 'not_reached':
      return 'open (not reached)';
    case 'failed':
      return 'not found';
  }
}

function comparison(p: ParameterResult): string {
  const pr = p.profile;
  if (!pr) return '';
  const failed = [pr.lower, pr.upper].filter((e) => e.kind === 'failed');
  if (failed.length) return `an end was not found: ${failed.map((e) => e.reason ?? 'a reduced fit failed').join('; ')}`;
  if (pr.differs) return 'differs: use the profile interval';
  return 'close';
}

/** Rows of the profile table: free parameters with a profile. */
export function profileRows(fit: FitResult): string[][] {
  return fit.parameters.filter((p) => !p.fixed && p.profile).map((p) => {
    const pr = p.profile!;
    return [p.name, endCell(p, pr.lower, 'lower'), endCell(p, pr.upper, 'upper'), comparison(p)];
  });
}
