/**
 * Number formatting shared by the text, Markdown and chart views.
 *
 * Rules (one place, so every view prints the same digits):
 * - A missing or non-finite value prints as `n/a`.
 * - Plain numbers use `sig` significant digits (default 6). Magnitudes below
 *   1e-4 or from 1e6 up switch to exponent notation, e.g. `3.2100e-7`.
 * - An estimate with a standard error is rounded at the 4th significant digit
 *   of its standard error (`decimalsFor`): the rounding error is then at most
 *   0.05 % of the standard error, so it never hides uncertainty, while digits
 *   far below the uncertainty are not printed. The standard error and the
 *   interval ends are printed to the same last digit, so a column reads
 *   consistently. Example: estimate 12.045678, SE 0.123456 → `12.0457 ± 0.1235`.
 *   Without a usable standard error the estimate gets 6 significant digits.
 */

export const MISSING = 'n/a';

/** Exponent notation below this magnitude (non-zero values). */
const SMALL = 1e-4;
/** Exponent notation at or above this magnitude. */
const LARGE = 1e6;
/** Never print more significant digits than this. */
const MAX_SIG = 12;

export function isUsable(v: number | null | undefined): v is number {
  return typeof v === 'number' && Number.isFinite(v);
}

function useExponent(v: number): boolean {
  const a = Math.abs(v);
  return a !== 0 && (a < SMALL || a >= LARGE);
}

/** `v` with `sig` significant digits (default 6), trailing zeros removed in fixed notation. */
export function formatNumber(v: number | null | undefined, sig = 6): string {
  if (!isUsable(v)) return MISSING;
  if (v === 0) return '0';
  const s = Math.min(Math.max(Math.round(sig), 1), MAX_SIG);
  if (useExponent(v)) return v.toExponential(s - 1).replace(/\.?0+e/, 'e');
  const fixed = v.toPrecision(s);
  if (fixed.includes('e')) return fixed;
  return fixed.includes('.') ? fixed.replace(/\.?0+$/, '') : fixed;
}

/** Integer with no separators, or `n/a`. */
export function formatInteger(v: number | null | undefined): string {
  return isUsable(v) ? String(Math.round(v)) : MISSING;
}

/** Power of ten of the last printed digit for values whose standard error is `se`: 10^(floor(log10 se) − 3). */
export function lastDigitExponent(se: number): number {
  return Math.floor(Math.log10(Math.abs(se))) - 3;
}

/**
 * Format `v` so that its last digit sits at 10^`exp10` (from `lastDigitExponent`).
 * Fixed notation prints `max(0, −exp10)` decimals; exponent notation keeps the
 * matching number of significant digits (at least 1, at most 12).
 */
export function formatAtDigit(v: number | null | undefined, exp10: number): string {
  if (!isUsable(v)) return MISSING;
  if (v === 0) return exp10 < 0 ? (0).toFixed(Math.min(-exp10, 20)) : '0';
  if (useExponent(v)) {
    const mag = Math.floor(Math.log10(Math.abs(v)));
    const sig = Math.min(Math.max(mag - exp10 + 1, 1), MAX_SIG);
    return v.toExponential(sig - 1);
  }
  const mag = Math.floor(Math.log10(Math.abs(v)));
  if (mag - exp10 + 1 > MAX_SIG) return formatNumber(v, MAX_SIG);
  if (exp10 >= 0) {
    const unit = 10 ** exp10;
    return String(Math.round(v / unit) * unit);
  }
  return v.toFixed(Math.min(-exp10, 20));
}

export interface FormattedEstimate {
  estimate: string;
  stderr: string;
  lower: string;
  upper: string;
}

/** Estimate, standard error and interval ends printed to one common last digit (see module comment). */
export function formatEstimate(
  estimate: number,
  stderr: number | null,
  lower: number | null,
  upper: number | null,
): FormattedEstimate {
  if (!isUsable(stderr) || stderr <= 0) {
    return { estimate: formatNumber(estimate), stderr: MISSING, lower: formatNumber(lower), upper: formatNumber(upper) };
  }
  const exp10 = lastDigitExponent(stderr);
  return {
    estimate: formatAtDigit(estimate, exp10),
    stderr: formatAtDigit(stderr, exp10),
    lower: formatAtDigit(lower, exp10),
    upper: formatAtDigit(upper, exp10),
  };
}

/** Confidence level as a percentage label: 0.95 → `95%`, 0.999 → `99.9%`. */
export function formatLevel(level: number): string {
  if (!isUsable(level)) return MISSING;
  return `${formatNumber(level * 100, 4)}%`;
}

/** p-value: `< 1e-4` below that, else 3 significant digits. */
export function formatP(p: number | null | undefined): string {
  if (!isUsable(p)) return MISSING;
  if (p < 1e-4) return '< 1e-4';
  return formatNumber(p, 3);
}
