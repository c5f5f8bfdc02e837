/**
 * Bootstrap intervals and the profile and bootstrap intervals of derived
 * quantities in the views (CLI text, Markdown, panel), in the manner of
 * profile.ts: a table when computed, else one line saying why there is none.
 * Reads `FitResult.bootstrap`, `ParameterResult.bootstrap` and
 * `DerivedResult.profile` / `.bootstrap` / `.warnings` only (engine/result.ts).
 * Ends are written with the digits of the quantity's symmetric interval
 * (formatEstimate), so the columns compare at a glance.
 */
import type { DerivedResult, FitResult, ProfileEnd, RunResult } from '../../result';
import { formatEstimate, formatLevel, formatNumber, isUsable, MISSING } from '../../format';
import { derivedLabel, type QueryBlock } from './summary';

/** Whether the fit has a bootstrap table to show. */
export function hasBootstrapTable(fit: FitResult): boolean {
  return fit.bootstrap?.status === 'computed' && fit.parameters.some((p) => p.bootstrap);
}

/** The heading line of the bootstrap section (with the failed refits by reason), or null when the fit asked for none. */
export function bootstrapLine(fit: FitResult): string | null {
  const s = fit.bootstrap;
  if (!s) return null;
  const failures = s.failures.length ? `; failed refits: ${s.failures.map((f) => `${f.count} × ${f.reason}`).join(', ')}` : '';
  if (s.status === 'computed') return `Bootstrap intervals (${s.note}${failures}; ${s.bcaNote})`;
  return `Bootstrap: ${s.note}${failures}`;
}

export const BOOTSTRAP_HEADERS = (level: number): string[] => {
  const l = formatLevel(level);
  return ['parameter', 'bootstrap s.e.', `percentile ${l} low`, `percentile ${l} high`, `BCa ${l} low`, `BCa ${l} high`];
};
export const BOOTSTRAP_ALIGN = ['left', 'right', 'right', 'right', 'right', 'right'] as const;

/** An end in the digits of the symmetric interval of a quantity with this estimate and standard error. */
function end(estimate: number | null, stderr: number | null, v: number | null, side: 'lower' | 'upper'): string {
  if (!isUsable(v)) return MISSING;
  return formatEstimate(estimate, stderr, v, v)[side] || formatNumber(v, 6);
}

/** Rows of the bootstrap table: free parameters with bootstrap intervals. */
export function bootstrapRows(fit: FitResult): string[][] {
  return fit.parameters.filter((p) => !p.fixed && p.bootstrap).map((p) => {
    const b = p.bootstrap!;
    const f = formatEstimate(p.estimate, p.stderr, b.lower, b.upper);
    return [p.name, formatEstimate(p.estimate, b.stderr, null, null).stderr, f.lower, f.upper, end(p.estimate, p.stderr, b.bcaLower, 'lower'), end(p.estimate, p.stderr, b.bcaUpper, 'upper')];
  });
}

function profileEnd(d: DerivedResult, e: ProfileEnd, side: 'lower' | 'upper'): string {
  switch (e.kind) {
    case 'reached':
      return end(d.value, d.stderr, e.value, side);
    case 'bound':
      return 'open at bound';
    case 'not_reached':
      return 'open (not reached)';
    case 'failed':
      return 'not found';
  }
}

/**
 * The derived quantities' profile and bootstrap intervals as one table, with
 * the notes (how each was computed or why not) and the `profile_differs`
 * warnings; null when no quantity has either.
 */
export function derivedIntervalBlock(result: RunResult): QueryBlock | null {
  const ds = (result.derived ?? []).filter((d) => d.profile || d.bootstrap);
  if (ds.length === 0) return null;
  const level = ds.find((d) => d.level !== null)?.level ?? 0.95;
  const l = formatLevel(level);
  const rows = ds.map((d) => {
    const pi = d.profile?.interval;
    const bi = d.bootstrap?.interval;
    const against = pi ? ([pi.lower, pi.upper].some((e) => e.kind === 'failed') ? 'an end was not found' : pi.differs ? 'differs: use the profile interval' : 'close') : '';
    return [
      derivedLabel(d),
      pi ? profileEnd(d, pi.lower, 'lower') : '',
      pi ? profileEnd(d, pi.upper, 'upper') : '',
      against,
      bi ? end(d.value, d.stderr, bi.lower, 'lower') : '',
      bi ? end(d.value, d.stderr, bi.upper, 'upper') : '',
      bi ? end(d.value, d.stderr, bi.bcaLower, 'lower') : '',
      bi ? end(d.value, d.stderr, bi.bcaUpper, 'upper') : '',
    ];
  });
  const notes: string[] = [];
  const byNote = new Map<string, string[]>();
  const add = (note: string, who: string) => {
    const list = byNote.get(note);
    if (list) {
      if (!list.includes(who)) list.push(who);
    } else byNote.set(note, [who]);
  };
  for (const d of ds) {
    if (d.profile) add(`profile: ${d.profile.note}`, derivedLabel(d));
    if (d.bootstrap) add(`bootstrap: ${d.bootstrap.note}`, derivedLabel(d));
  }
  for (const [note, who] of byNote) notes.push(`${who.join(', ')}: ${note}`);
  for (const d of ds) for (const w of d.warnings ?? []) notes.push(`! ${derivedLabel(d)}: ${w.message} [${w.code}]`);
  const headers = ['quantity', `profile ${l} low`, `profile ${l} high`, 'against the symmetric interval', `percentile ${l} low`, `percentile ${l} high`, `BCa ${l} low`, `BCa ${l} high`];
  const align: ('left' | 'right')[] = ['left', 'right', 'right', 'left', 'right', 'right', 'right', 'right'];
  // Only the kinds of interval that were computed: no empty bootstrap columns when no fit ran a bootstrap, and the like.
  const hasProfile = ds.some((d) => d.profile?.interval);
  const hasBootstrap = ds.some((d) => d.bootstrap?.interval);
  const keep = headers.map((_, i) => i === 0 || (i <= 3 ? hasProfile : hasBootstrap));
  const pick = <T,>(xs: readonly T[]): T[] => xs.filter((_, i) => keep[i]);
  const kinds = [hasProfile ? 'profile' : null, hasBootstrap ? 'bootstrap' : null].filter((k) => k !== null).join(' and ');
  return {
    heading: `Derived quantities: ${kinds || 'profile and bootstrap'} intervals`,
    headers: pick(headers),
    rows: rows.map((r) => pick(r)),
    align: pick(align),
    notes,
  };
}
