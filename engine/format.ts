/**
 * The one number-formatting policy of Leastwise: every printed number — CLI
 * text, Markdown report, chart labels and tooltips, SVG, the results panel,
 * hovers, and the numbers inside warning and stop messages — comes from here,
 * so the same number reads the same everywhere. JSON is not formatted: it
 * keeps full double precision (engine/run/json.ts).
 *
 * A shared leaf of the engine (imports nothing), so the numerical engine's
 * messages, the front ends and the editor can all use it.
 *
 * Policy:
 * 1. A value of a result that is not a finite number (null, undefined, NaN,
 *    ±Infinity) prints as `n/a`: JSON carries all of them as null, so a
 *    result read back from JSON prints the same text as the one in memory.
 *    Numbers the user wrote or that a message quotes (bounds, a bad cell)
 *    print infinities as the language spells them, `inf` and `-inf`
 *    (`formatWritten`).
 * 2. A plain number prints with a number of significant digits chosen by its
 *    context (`DIGITS`), trailing zeros dropped; magnitudes below 1e-4 or from
 *    1e6 up in exponent notation (`3.21e-7`, `2.5e+6`).
 * 3. A number never prints as 0 unless it is exactly 0: significant digits
 *    cannot round a non-zero value to 0, and where a value is rounded to a
 *    decimal place (rule 4) one that would print as 0 or -0 gets its own
 *    significant digits instead.
 * 4. An estimate with an uncertainty (standard error) is rounded as
 *    measurement reporting guides say (JCGM 100:2008, "Guide to the expression
 *    of uncertainty in measurement", §7.2.6): the uncertainty to two
 *    significant digits (`UNCERTAINTY_DIGITS`; one on request), and the
 *    estimate and the interval ends to the same decimal place. Rounding is to
 *    the nearest digit (the guide allows rounding uncertainties up; we do not,
 *    so the printed uncertainty is the nearest, not a bound). Without a usable
 *    uncertainty (missing, not finite, negative) the estimate gets
 *    `DIGITS.value` significant digits; an uncertainty of exactly 0 prints as
 *    `0` and leaves the estimate at `DIGITS.value` digits.
 * 5. p-values below `P_FLOOR` (1e-4) print as `< 0.0001` (`p < 0.0001` in a
 *    sentence, `pClause`), others with `DIGITS.p` significant digits. The
 *    floor: below it the tail of a test statistic depends on the model's
 *    assumptions far more than on the digits (common practice).
 * 6. A column of a table uses one notation (`columnNotation`): when any of its
 *    numbers is in exponent notation by rule 2, every number of the column is
 *    (`1.1280465e-3` beside `8.69597e-8`, not `0.0011280465`), each with the
 *    significant digits it had; else all stay fixed, and the text views align
 *    them on the decimal point (engine/front/views/table.ts, the panel's
 *    extension/logic/panel-align.ts). Zeros, `n/a`, `< 0.0001` and text are
 *    left as they are.
 */

export const MISSING = 'n/a';

/** Significant digits by context (rule 2). */
export const DIGITS = {
  /** Plain values: data, fitted values, predictions, SSR, RMSE, R², AIC, quantiles of group summaries. */
  value: 6,
  /** Test statistics and ratios: F, Shapiro–Wilk W, χ²/ν, ρ, an iteration's objective. */
  statistic: 4,
  /** Numbers read by their magnitude: condition number, Durbin–Watson d, step and gradient sizes, tolerances, Akaike weights. */
  magnitude: 3,
  /** p-values above the floor. */
  p: 3,
  /** Percentages (relative standard errors). */
  percent: 2,
} as const;

/** Significant digits of an uncertainty (rule 4; JCGM 100:2008 §7.2.6: "at most two significant digits"). */
export const UNCERTAINTY_DIGITS = 2;

/** p-values below this print as `< 0.0001` (rule 5). */
export const P_FLOOR = 1e-4;

/** Exponent notation below this magnitude (non-zero values). */
const SMALL = 1e-4;
/** Exponent notation at or above this magnitude. */
const LARGE = 1e6;
/** Never print more significant digits than this (a double carries 15–17). */
const MAX_SIG = 12;

export function isUsable(v: number | null | undefined): v is number {
  return typeof v === 'number' && Number.isFinite(v);
}


function useExponent(v: number): boolean {
  const a = Math.abs(v);
  return a !== 0 && (a < SMALL || a >= LARGE);
}

function clampSig(sig: number): number {
  return Math.min(Math.max(Math.round(sig), 1), MAX_SIG);
}

/** `v` with `sig` significant digits (default `DIGITS.value`), trailing zeros removed (rules 1–3). */
export function formatNumber(v: number | null | undefined, sig: number = DIGITS.value): string {
  if (!isUsable(v)) return MISSING;
  if (v === 0) return '0';
  const s = clampSig(sig);
  if (useExponent(v)) return v.toExponential(s - 1).replace(/\.?0+e/, 'e');
  const fixed = v.toPrecision(s);
  // below 1e6 toPrecision still writes an exponent when the digits end before the units (100 to 2 digits: `1.0e+2`): rule 2 says fixed
  if (fixed.includes('e')) return String(Number(fixed));
  return fixed.includes('.') ? fixed.replace(/\.?0+$/, '') : fixed;
}

/**
 * A number the user wrote or a message quotes (rule 1): `formatNumber`, but
 * infinities as `inf`/`-inf` (the language's spelling) and NaN as `NaN`.
 */
export function formatWritten(v: number, sig: number = DIGITS.value): string {
  if (Number.isNaN(v)) return 'NaN';
  if (v === Infinity) return 'inf';
  if (v === -Infinity) return '-inf';
  return formatNumber(v, sig);
}

/** Declared bounds `[lower, upper]` as written (`formatWritten`): `[0, inf]`. */
export function formatBounds(lower: number, upper: number): string {
  return `[${formatWritten(lower)}, ${formatWritten(upper)}]`;
}

/** Integer with no separators, or `n/a`. */
export function formatInteger(v: number | null | undefined): string {
  return isUsable(v) ? String(Math.round(v)) : MISSING;
}

/**
 * Power of ten of the last printed digit for an uncertainty `u` shown with
 * `digits` significant digits (rule 4): floor(log10 u) − (digits − 1), moved up
 * one place when rounding carries into a new digit (0.0996 → `0.10`, not `0.100`).
 */
export function uncertaintyExponent(u: number, digits: number = UNCERTAINTY_DIGITS): number {
  const d = clampSig(digits);
  let exp10 = Math.floor(Math.log10(Math.abs(u))) - (d - 1);
  if (Math.round(Math.abs(u) / 10 ** exp10) >= 10 ** d) exp10 += 1;
  return exp10;
}

/**
 * Format `v` so that its last digit sits at 10^`exp10`. Fixed notation prints
 * `max(0, −exp10)` decimals; exponent notation keeps the matching number of
 * significant digits (at least 1, at most 12). This alone may print a small
 * non-zero value as 0: `formatEstimate` guards against that (rule 3).
 */
export function formatAtDigit(v: number | null | undefined, exp10: number): string {
  if (!isUsable(v)) return MISSING;
  if (v === 0) return exp10 < 0 ? (0).toFixed(Math.min(-exp10, 20)) : '0';
  const mag = Math.floor(Math.log10(Math.abs(v)));
  if (useExponent(v)) return v.toExponential(clampSig(mag - exp10 + 1) - 1);
  if (mag - exp10 + 1 > MAX_SIG) return formatNumber(v, MAX_SIG);
  if (exp10 >= 0) {
    const unit = 10 ** exp10;
    return String(Math.round(v / unit) * unit);
  }
  return v.toFixed(Math.min(-exp10, 20));
}

/** True when `v` ≠ 0 would print as 0 (or -0) with its last digit at 10^`exp10`. */
function roundsToZero(v: number, exp10: number): boolean {
  return v !== 0 && Math.abs(v) < 0.5 * 10 ** exp10;
}

/** `formatAtDigit`, except that a non-zero value that would print as 0 gets `sig` significant digits (rule 3). */
function atDigitNonZero(v: number | null | undefined, exp10: number, sig: number): string {
  if (isUsable(v) && roundsToZero(v, exp10)) return formatNumber(v, sig);
  return formatAtDigit(v, exp10);
}

export interface FormattedEstimate {
  estimate: string;
  stderr: string;
  lower: string;
  upper: string;
}

/**
 * Estimate, uncertainty (standard error) and interval ends by rule 4: the
 * uncertainty to `digits` significant digits (default 2), the others to the
 * same decimal place, none of them printed as 0 unless it is 0 (rule 3).
 */
export function formatEstimate(
  estimate: number | null,
  stderr: number | null,
  lower: number | null,
  upper: number | null,
  digits: number = UNCERTAINTY_DIGITS,
): FormattedEstimate {
  if (!isUsable(stderr) || stderr <= 0) {
    return {
      estimate: formatNumber(estimate),
      stderr: stderr === 0 ? '0' : MISSING,
      lower: formatNumber(lower),
      upper: formatNumber(upper),
    };
  }
  const exp10 = uncertaintyExponent(stderr, digits);
  return {
    estimate: atDigitNonZero(estimate, exp10, digits),
    stderr: formatAtDigit(stderr, exp10),
    lower: atDigitNonZero(lower, exp10, digits),
    upper: atDigitNonZero(upper, exp10, digits),
  };
}

/** `estimate ± u` by rule 4 (just the estimate without a usable uncertainty). */
export function formatPlusMinus(estimate: number | null, stderr: number | null): string {
  const f = formatEstimate(estimate, stderr, null, null);
  return f.stderr === MISSING ? f.estimate : `${f.estimate} ± ${f.stderr}`;
}

/** `[a, b]` of result values (e.g. a prediction interval), `sig` significant digits each. */
export function formatInterval(lower: number | null | undefined, upper: number | null | undefined, sig: number = DIGITS.value): string {
  return `[${formatNumber(lower, sig)}, ${formatNumber(upper, sig)}]`;
}

/** Confidence level as a percentage label: 0.95 → `95%`, 0.999 → `99.9%`. */
export function formatLevel(level: number): string {
  if (!isUsable(level)) return MISSING;
  return `${formatNumber(level * 100, 4)}%`;
}

/** A proportion as a percentage with `DIGITS.percent` significant digits: 0.034 → `3.4%`. */
export function formatPercent(x: number | null | undefined): string {
  if (!isUsable(x)) return MISSING;
  return `${formatNumber(x * 100, DIGITS.percent)}%`;
}

/** p-value for a table cell (rule 5): `< 0.0001` below the floor, else `DIGITS.p` significant digits. */
export function formatP(p: number | null | undefined): string {
  if (!isUsable(p)) return MISSING;
  if (p < P_FLOOR) return `< ${formatNumber(P_FLOOR)}`;
  return formatNumber(p, DIGITS.p);
}

/** p-value in a sentence (rule 5): `p < 0.0001` or `p = 0.0421`. */
export function pClause(p: number | null | undefined): string {
  const f = formatP(p);
  return f.startsWith('<') ? `p ${f}` : `p = ${f}`;
}

/**
 * d3-format strings (used by Vega-Lite) for chart tooltips and axes, with the
 * digits of `DIGITS`: `~g` drops trailing zeros as `formatNumber` does.
 */
export const CHART_FORMAT = {
  value: `.${DIGITS.statistic}~g`,
  uncertainty: `.${DIGITS.magnitude}~g`,
  /** Standardized residuals and normal quantiles: three decimals (they are in units of one standard deviation). */
  standardized: '.3~f',
  /** Histogram bin edges (in standard deviations). */
  binEdge: '.2f',
} as const;

/** A cell in fixed notation (`-12.5`, `0.0011`, `1536`). */
const FIXED_CELL = /^[-−+]?\d+(\.\d+)?$/;
/** A cell in exponent notation (`8.69597e-8`, `-2.5e+6`). */
const EXPONENT_CELL = /^[-−+]?\d+(\.\d+)?e[-+]?\d+$/;

/** Significant digits printed in a fixed-notation cell: leading zeros do not count, trailing ones after a point do. */
function printedDigits(cell: string): number {
  const t = cell.replace(/^[-−+]/, '');
  const digits = t.includes('.') ? t.replace('.', '').replace(/^0+/, '') : t.replace(/^0+/, '').replace(/0+$/, '');
  return Math.max(1, digits.length);
}

/** A fixed-notation cell in exponent notation with the same significant digits (`0.0011280465` → `1.1280465e-3`). */
function toExponentCell(cell: string): string {
  const minus = /^[-−]/.test(cell);
  const v = Number(cell.replace(/^[−+]/, (c) => (c === '−' ? '-' : '')));
  if (!Number.isFinite(v) || v === 0) return cell;
  const e = Math.abs(v).toExponential(clampSig(printedDigits(cell)) - 1);
  return `${minus ? (cell[0] === '−' ? '−' : '-') : ''}${e}`;
}

/**
 * One notation for a table column (rule 6): the cells unchanged when none is in exponent notation, else every
 * non-zero fixed-notation number rewritten in exponent notation with its own significant digits. Cells that are
 * not numbers (`n/a`, `< 0.0001`, `fixed`, empty) are left as they are.
 */
export function columnNotation(cells: readonly string[]): string[] {
  const trimmed = cells.map((c) => c.trim());
  if (!trimmed.some((c) => EXPONENT_CELL.test(c))) return [...cells];
  return trimmed.map((c, i) => (FIXED_CELL.test(c) ? toExponentCell(c) : cells[i]));
}

/** Whether a cell is a number in fixed notation (rule 6: the cells the text views align on the decimal point). */
export function isFixedCell(cell: string): boolean {
  return FIXED_CELL.test(cell.trim());
}
