/**
 * The panel's list of warnings, counted the way the Problems panel counts
 * them (extension/logic/diagnostics.ts `fitDiagnostics`): one finding per
 * warning of a fit; for a per-group fit one finding per kind of warning
 * (code and parameters), naming the groups that show it; a parameter at a
 * bound without an `at_bound` warning, and a fit stopped without a
 * `no_convergence` warning, are findings too. `r2_nonlinear` is a standing
 * note beside R², not a finding. The warnings chip shows how many there are
 * and opens this list; test/extension/panel-warnings.test.ts holds the count
 * equal to the Problems entries of the same run.
 *
 * Pure: no vscode, no DOM.
 */
import type { FitResult, FitWarning } from '../../engine/result';
import type { GroupFlag } from '../../engine/groups/flags';

export interface WarningFinding {
  /** Fit name. */
  fit: string;
  code: string;
  /** The warning's message (parameters named in it, as the fit's own list prints them). */
  text: string;
  /** Fit keys (extension/logic/panel-model.ts `fitKey`) that show it: the fit, or its groups. */
  keys: string[];
  /** For a per-group fit: how many of its groups show it, of how many. */
  groups?: { having: number; total: number; names: string[] };
}

/** Groups named in a finding's text before "…". */
export const GROUPS_NAMED = 5;

const keyOf = (f: FitResult): string => (f.group === undefined ? f.name : `${f.name}/${f.group}`);

function message(w: FitWarning): string {
  return `${w.message}${w.parameters?.length ? ` (${w.parameters.join(', ')})` : ''}`;
}

/** Findings of one fit name (all its groups). */
export function fitFindingsOf(name: string, fits: readonly FitResult[]): WarningFinding[] {
  const grouped = fits.some((f) => f.group !== undefined);
  const merged = new Map<string, { code: string; text: string; fits: FitResult[] }>();
  const add = (key: string, code: string, text: string, f: FitResult) => {
    const m = merged.get(key);
    if (m) m.fits.push(f);
    else merged.set(key, { code, text, fits: [f] });
  };
  const stopped = fits.filter((f) => !f.stop.converged && !f.warnings.some((w) => w.code === 'no_convergence'));
  if (stopped.length) for (const f of stopped) add('stop', `stop.${stopped[0].stop.code}`, `did not converge: ${stopped[0].stop.message}`, f);
  for (const f of fits) {
    for (const w of f.warnings) {
      if (w.code === 'r2_nonlinear') continue;
      add(`${w.code}|${(w.parameters ?? []).join(',')}|${grouped ? '' : w.message}`, w.code, message(w), f);
    }
  }
  const warned = new Set(fits.flatMap((f) => f.warnings.filter((w) => w.code === 'at_bound').flatMap((w) => w.parameters ?? [])));
  for (const f of fits) {
    for (const p of f.parameters) {
      if (p.atBound && !warned.has(p.name)) add(`at_bound|${p.name}|derived`, 'at_bound', `parameter ${p.name} ended at its ${p.atBound} bound; its standard error and interval are not reliable (${p.name})`, f);
    }
  }
  return [...merged.values()].map((m) => {
    const names = m.fits.map((f) => f.group ?? '?');
    return {
      fit: name,
      code: m.code,
      text: m.text,
      keys: m.fits.map(keyOf),
      ...(grouped ? { groups: { having: m.fits.length, total: fits.length, names } } : {}),
    };
  });
}

/** Every finding of a run's fits, fit by fit in run order. */
export function warningFindings(fits: readonly FitResult[]): WarningFinding[] {
  const byName = new Map<string, FitResult[]>();
  for (const f of fits) byName.set(f.name, [...(byName.get(f.name) ?? []), f]);
  return [...byName].flatMap(([name, list]) => fitFindingsOf(name, list));
}

/** "in 3 of 12 groups: a, b, c" for a per-group finding. */
export function groupsPhrase(g: NonNullable<WarningFinding['groups']>): string {
  const shown = g.names.slice(0, GROUPS_NAMED).join(', ') + (g.names.length > GROUPS_NAMED ? ', …' : '');
  return `in ${g.having} of ${g.total} groups: ${shown}`;
}

/** The group table's flags in one sentence, so its highlighted rows and the warning count can be read together. */
export function flagSummary(rows: readonly { flags: readonly GroupFlag[] }[]): string {
  const flagged = rows.filter((r) => r.flags.length > 0).length;
  const per = new Map<GroupFlag, number>();
  for (const r of rows) for (const f of r.flags) per.set(f, (per.get(f) ?? 0) + 1);
  if (flagged === 0) return `No group of ${rows.length} is flagged in the group table.`;
  const list = [...per].map(([f, n]) => `${f.replace(/_/g, ' ')} ${n}`).join(', ');
  return `${flagged} of ${rows.length} groups flagged in the group table (${list}). Flags mark the groups to look at first; the warnings also include findings that raise no flag (e.g. a residual pattern).`;
}
