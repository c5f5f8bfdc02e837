/**
 * Number formatting for hovers: the CLI's rules (engine/front/views/format.ts), so
 * the editor, the panel and the reports print the same digits. An estimate,
 * its standard error and interval share one last digit (the standard error's
 * 4th significant digit).
 */
import type { ParameterResult } from '../../engine/result';
import { formatEstimate, formatLevel, formatNumber } from '../../engine/front/views/format';

/** `x` with `digits` significant digits (default 4); `n/a` when missing or not finite. */
export function fmt(x: number | null | undefined, digits = 4): string {
  return formatNumber(x, digits);
}

/** Estimate, standard error and interval ends of a parameter, to a common last digit. */
export function fmtParameter(p: Pick<ParameterResult, 'estimate' | 'stderr' | 'lower' | 'upper' | 'fixed'>): { estimate: string; stderr: string; interval: string } {
  const f = formatEstimate(p.estimate, p.fixed ? null : p.stderr, p.lower, p.upper);
  return { estimate: f.estimate, stderr: f.stderr, interval: `[${f.lower}, ${f.upper}]` };
}

/** `estimate ± se` (just the estimate when there is no usable standard error). */
export function fmtEstimate(p: Pick<ParameterResult, 'estimate' | 'stderr' | 'lower' | 'upper' | 'fixed'>): string {
  const f = fmtParameter(p);
  return f.stderr === 'n/a' ? f.estimate : `${f.estimate} ± ${f.stderr}`;
}

/** Interval `[a, b]` of plain numbers (bounds), 4 significant digits. */
export function fmtInterval(lower: number | null, upper: number | null): string {
  const end = (v: number | null, inf: string) => (v === null ? '—' : Number.isFinite(v) ? formatNumber(v, 4) : v > 0 ? inf : `-${inf}`);
  return `[${end(lower, 'inf')}, ${end(upper, 'inf')}]`;
}

/** A proportion as percent with one decimal: `3.4 %`. */
export function fmtPercent(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return 'n/a';
  return `${(x * 100).toFixed(1)} %`;
}

/** Confidence level as a percentage label, `0.95` → `95%`. */
export function fmtLevel(level: number): string {
  return formatLevel(level);
}
