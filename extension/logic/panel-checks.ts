/**
 * The "Queries and checks" view of a per-group fit, summarised: each
 * expectation once with how many groups passed and failed, the failures
 * listed (group, actual value, message), instead of one line per group
 * (288 "passed" lines above the numbers that matter); and the derived
 * quantities of a per-group fit as one table, a row per group and a column
 * pair (value, standard error) per quantity, with the digits of
 * engine/format.ts `formatEstimate` (as the CLI's derived table).
 *
 * Pure: no vscode, no DOM.
 */
import type { DerivedResult, ExpectationResult } from '../../engine/result';
import { formatEstimate, formatNumber, MISSING } from '../../engine/format';

export interface ExpectationSummary {
  /** The expectation as written. */
  text: string;
  passed: number;
  failed: number;
  /** Failed checks: the group (absent for a fit without groups), the actual value, the message. */
  failures: { group?: string; actual: string; message: string }[];
}

/** One entry per expectation statement (by its text), in spec order. */
export function summariseExpectations(exps: readonly ExpectationResult[]): ExpectationSummary[] {
  const by = new Map<string, ExpectationSummary>();
  for (const e of exps) {
    const key = e.expectation.text;
    let s = by.get(key);
    if (!s) by.set(key, (s = { text: key, passed: 0, failed: 0, failures: [] }));
    if (e.passed) s.passed++;
    else {
      s.failed++;
      s.failures.push({ ...(e.group !== undefined ? { group: e.group } : {}), actual: e.actual === null ? MISSING : formatNumber(e.actual), message: e.message });
    }
  }
  return [...by.values()];
}

/** Whether to show the summary rather than one line per check: some check belongs to a group. */
export function summariseChecks(exps: readonly ExpectationResult[]): boolean {
  return exps.some((e) => e.group !== undefined);
}

/** Derived quantities of a per-group fit as a group × quantity table; null when no derived quantity has groups. */
export function derivedGroupTable(derived: readonly DerivedResult[]): { headers: string[]; rows: string[][] } | null {
  const grouped = derived.filter((d) => d.group !== undefined);
  if (!grouped.length) return null;
  const names = [...new Set(grouped.map((d) => d.name))];
  const groups = [...new Set(grouped.map((d) => d.group as string))];
  const at = new Map(grouped.map((d) => [`${d.name}\u0000${d.group}`, d]));
  const unit = (n: string) => grouped.find((d) => d.name === n && d.unit)?.unit;
  const headers = ['group', ...names.flatMap((n) => [unit(n) ? `${n} [${unit(n)}]` : n, `${n} std. error`])];
  const rows = groups.map((g) => [g, ...names.flatMap((n) => {
    const d = at.get(`${n}\u0000${g}`);
    if (!d || d.value === null) return [MISSING, MISSING];
    const f = formatEstimate(d.value, d.stderr, d.lower, d.upper);
    return [f.estimate, d.stderr === null ? MISSING : f.stderr];
  })]);
  return { headers, rows };
}
