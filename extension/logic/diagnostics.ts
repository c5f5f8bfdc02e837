/**
 * Editor diagnostics as plain data: `specDiagnostics(analysis, run?)` turns
 * the parser's diagnostics, the data-file checks and (after a fit) the run's
 * warnings, failed expectations and errors into `LsqDiagnostic`s placed on
 * the spec line they concern. extension/language/diagnostics.ts maps them to
 * `vscode.Diagnostic`; nothing here imports vscode.
 *
 * Placement of fit findings (by name in the CURRENT analysis, so they follow
 * edits made after the fit):
 * - parameter warnings (`at_bound`, `high_correlation`, `guessed_start`) → the parameter's `param` line;
 * - convergence, conditioning, degrees of freedom, R² notes → the first line of the `fit` statement;
 * - residual warnings → the `model` line;
 * - failed expectations → the `expect` line; run errors → their range, or the data statement of their file.
 * Per-group fits (same name, `group` set) are merged: one diagnostic per
 * finding naming how many groups, and which, show it.
 */
import type { Diagnostic, Range, Severity } from '../../parser/plan';
import type { FitResult, FitWarning, RunResult, WarningCode } from '../../engine/result';
import type { EditorAnalysis } from './analysis';
import { findFit, findParam, findExpectation, findData, modelSpan } from './declarations';
import { firstLine, spanOf, type Span } from './text';
import { dataFileText } from './data-files';
import { fixesFor, type LsqFix } from './fixes';

export type LsqSeverity = Severity | 'hint';
/** Where a diagnostic comes from; the adapter shows it as the diagnostic's source. */
export type LsqSource = 'syntax' | 'data' | 'fit';

export interface LsqDiagnostic extends Span {
  severity: LsqSeverity;
  /** Stable code: the parser's, `data.<code>` for file checks, `fit.<code>` after a fit. */
  code: string;
  message: string;
  source: LsqSource;
  /** Names offered by the "did you mean" quick fix. */
  suggestions?: string[];
  /** Quick fixes (logic/fixes.ts): "did you mean" edits and others, such as moving a start inside its bounds. */
  fixes?: LsqFix[];
}

/** Severity of each fit warning in the editor. */
const WARNING_SEVERITY: Record<WarningCode, LsqSeverity> = {
  at_bound: 'warning',
  high_correlation: 'warning',
  ill_conditioned: 'warning',
  few_dof: 'warning',
  no_convergence: 'warning',
  residual_pattern: 'warning',
  non_normal_residuals: 'info',
  r2_nonlinear: 'hint',
  rows_dropped: 'info',
  rank_deficient: 'warning',
  guessed_start: 'hint',
  lower_minimum: 'warning',
  retried_start: 'info',
  profile_differs: 'warning',
  exact_point: 'warning',
  high_leverage: 'info',
  influential_point: 'warning',
  outlier: 'warning',
  lack_of_fit: 'warning',
  curvature: 'warning',
  bootstrap_failures: 'warning',
};

const PARAM_WARNINGS: readonly WarningCode[] = ['at_bound', 'high_correlation', 'guessed_start'];
const MODEL_WARNINGS: readonly WarningCode[] = ['residual_pattern', 'non_normal_residuals', 'lack_of_fit', 'curvature'];

/** All diagnostics of a spec, sorted by position. */
export function specDiagnostics(analysis: EditorAnalysis, run?: RunResult): LsqDiagnostic[] {
  const out: LsqDiagnostic[] = [
    ...analysis.diagnostics.map((d) => fromParser(analysis, d)),
    ...dataDiagnostics(analysis),
    ...(run ? fitDiagnostics(analysis, run) : []),
  ];
  return out.sort((a, b) => a.start - b.start || a.end - b.end);
}

function fromParser(analysis: EditorAnalysis, d: Diagnostic): LsqDiagnostic {
  const s = spanOf(d.range);
  const fixes = fixesFor(analysis, d);
  return {
    ...s, severity: d.severity, code: d.code, message: d.message, source: 'syntax',
    ...(d.suggestions?.length ? { suggestions: [...d.suggestions] } : {}),
    ...(fixes.length ? { fixes } : {}),
  };
}

/**
 * "File not found" / "cannot read" (errors) and "columns not checked"
 * (information: a file the editor does not read) on the quoted path of each
 * data statement.
 */
export function dataDiagnostics(analysis: EditorAnalysis): LsqDiagnostic[] {
  const out: LsqDiagnostic[] = [];
  for (const d of analysis.data) {
    const noted = d.state === 'unknown' && d.reason !== undefined;
    if (d.state !== 'missing' && d.state !== 'unreadable' && !noted) continue;
    const at = d.pathSpan ?? findData(analysis, d.name) ?? { start: 0, end: 0 };
    const message =
      d.state === 'missing'
        ? dataFileText.missing(d.path)
        : d.state === 'unreadable'
          ? dataFileText.unreadable(d.path, d.reason ?? dataFileText.noHeader)
          : dataFileText.notChecked(d.path, d.reason ?? '');
    const code = d.state === 'missing' ? 'data.file_not_found' : d.state === 'unreadable' ? 'data.file_unreadable' : 'data.not_checked';
    out.push({ ...at, severity: noted ? 'info' : 'error', code, message, source: 'data' });
  }
  return out;
}

/** Findings of a run placed on the current spec text. */
export function fitDiagnostics(analysis: EditorAnalysis, run: RunResult): LsqDiagnostic[] {
  const out: LsqDiagnostic[] = [];
  const byName = new Map<string, FitResult[]>();
  for (const f of run.fits) byName.set(f.name, [...(byName.get(f.name) ?? []), f]);
  for (const [name, fits] of byName) out.push(...fitFindings(analysis, name, fits));
  for (const e of run.expectations) {
    if (e.passed) continue;
    const at = findExpectation(analysis, e.expectation.text) ?? spanOf(e.expectation.range);
    out.push({ ...at, severity: 'error', code: 'fit.expectation_failed', message: `expectation failed: ${e.message}`, source: 'fit' });
  }
  for (const err of run.errors) {
    const fileData = err.file ? analysis.plan.data.find((d) => err.file === d.path || err.file?.endsWith(d.path)) : undefined;
    const at = err.range ? spanOf(err.range) : fileData ? findData(analysis, fileData.name) : undefined;
    const where = err.file ? ` (${err.file}${err.row ? `, line ${err.row}` : ''}${err.column ? `, column ${err.column}` : ''})` : '';
    out.push({ ...(at ?? { start: 0, end: 0 }), severity: 'error', code: `fit.${err.code}`, message: `${err.message}${where}`, source: 'fit' });
  }
  return out;
}

function fitFindings(analysis: EditorAnalysis, name: string, fits: FitResult[]): LsqDiagnostic[] {
  const fitSpan = findFit(analysis, name);
  if (!fitSpan) return [];
  const header = firstLine(analysis.text, fitSpan);
  const grouped = fits.some((f) => f.group !== undefined);
  const out: LsqDiagnostic[] = [];

  // Stop reason: failure or no convergence, once per fit (merged over groups).
  const notConverged = fits.filter((f) => !f.stop.converged && !f.warnings.some((w) => w.code === 'no_convergence'));
  if (notConverged.length) {
    const failed = notConverged.some((f) => f.stop.code === 'failed' || f.stop.code === 'non_finite');
    out.push({
      ...header,
      severity: failed ? 'error' : 'warning',
      code: `fit.stop.${notConverged[0].stop.code}`,
      message: withGroups(`fit ${name} did not converge: ${notConverged[0].stop.message}`, notConverged, fits.length, grouped),
      source: 'fit',
    });
  }

  // Warnings, merged by (code, parameters, message shape) across groups.
  const merged = new Map<string, { warning: FitWarning; fits: FitResult[] }>();
  for (const f of fits) {
    // `r2_nonlinear` is a standing note of every nonlinear fit (the panel shows it beside R²), not a finding
    for (const w of f.warnings.filter((x) => x.code !== 'r2_nonlinear')) {
      const key = `${w.code}|${(w.parameters ?? []).join(',')}|${grouped ? '' : w.message}`;
      const m = merged.get(key);
      if (m) m.fits.push(f);
      else merged.set(key, { warning: w, fits: [f] });
    }
  }
  // Parameters reported at a bound without an `at_bound` warning naming them.
  const warned = new Set([...merged.values()].filter((m) => m.warning.code === 'at_bound').flatMap((m) => m.warning.parameters ?? []));
  const paramNames = [...new Set(fits.flatMap((f) => f.parameters.filter((p) => p.atBound && !warned.has(p.name)).map((p) => p.name)))];
  for (const p of paramNames) {
    const having = fits.filter((f) => f.parameters.some((q) => q.name === p && q.atBound));
    const side = having[0].parameters.find((q) => q.name === p)?.atBound;
    merged.set(`at_bound|${p}|derived`, {
      warning: { code: 'at_bound', message: `parameter ${p} ended at its ${side} bound; its standard error and interval are not reliable`, parameters: [p] },
      fits: having,
    });
  }
  for (const { warning, fits: having } of merged.values()) {
    const message = withGroups(`${name}: ${warning.message}`, having, fits.length, grouped);
    const severity = WARNING_SEVERITY[warning.code] ?? 'warning';
    const code = `fit.${warning.code}`;
    const params = warning.parameters ?? [];
    if (PARAM_WARNINGS.includes(warning.code) && params.length) {
      // on the first parameter's line; a correlation also on the second one
      const targets = warning.code === 'high_correlation' ? params.slice(0, 2) : params;
      let placed = false;
      for (const p of targets) {
        const ps = findParam(analysis, name, p);
        if (ps) {
          out.push({ ...firstLine(analysis.text, ps), severity, code, message, source: 'fit' });
          placed = true;
        }
      }
      if (placed) continue;
    }
    if (MODEL_WARNINGS.includes(warning.code)) {
      const ms = modelSpan(analysis, name);
      if (ms) {
        out.push({ ...firstLine(analysis.text, ms), severity, code, message, source: 'fit' });
        continue;
      }
    }
    out.push({ ...header, severity, code, message, source: 'fit' });
  }
  return out;
}

/** Adds "(in 3 of 12 groups: a, b, c, …)" to a per-group finding. */
function withGroups(message: string, having: FitResult[], total: number, grouped: boolean): string {
  if (!grouped) return message;
  const names = having.map((f) => f.group ?? '?');
  const shown = names.slice(0, 5).join(', ') + (names.length > 5 ? ', …' : '');
  return `${message} (in ${having.length} of ${total} groups: ${shown})`;
}

/** Range → span helper re-exported for adapters that hold plan ranges. */
export function spanOfRange(range: Range): Span {
  return spanOf(range);
}
