/**
 * Hover text (Markdown) for the word under the cursor: function docs; a
 * parameter's declaration and, after a fit, its estimate ± standard error and
 * confidence interval (a table for per-group fits); constants, data sources,
 * columns, fits, `expect` statistics, `FIT.NAME` in `derive`, and derived
 * quantities with their value after a fit.
 */
import type { FitResult, RunResult } from '../../engine/result';
import { isFunctionName, isStatisticName } from '../../parser/registry';
import { STATISTIC_GETTERS } from '../../engine/run/statistics';
import { METHOD_LABEL } from '../../engine/front/views/summary';
import { columnsOf, type EditorAnalysis } from './analysis';
import type { ParameterResult } from '../../engine/result';
import { formatBounds, formatEstimate, formatLevel, formatNumber, formatPercent, MISSING } from '../../engine/format';
import { constantDoc, functionDoc, keywordDoc, statisticDoc } from './function-docs';
import { dataOfFit, enclosingFit } from './declarations';
import { linePrefix, wordAt, type Span } from './text';

export interface LsqHover {
  markdown: string;
  span: Span;
}

/** Rows shown in a per-group parameter table before "… and N more". */
const MAX_GROUP_ROWS = 12;

export function hoverAt(a: EditorAnalysis, offset: number, run?: RunResult): LsqHover | null {
  const w = wordAt(a.text, offset);
  if (!w) return null;
  const name = w.word;
  const after = a.text.slice(w.span.end).match(/^\s*\(/);
  const before = a.text.slice(Math.max(0, w.span.start - 200), w.span.start);
  const md = (text: string | null): LsqHover | null => (text ? { markdown: text, span: w.span } : null);

  if (!w.quoted && after && isFunctionName(name)) {
    const doc = functionDoc(name);
    return md(doc ? `\`${doc.signature}\`\n\n${doc.summary}` : `\`${name}(…)\``);
  }
  // expect FIT.PARAM / FIT.STAT / FIT.PARAM.se
  const dotted = /\bexpect\s+([A-Za-z_]\w*)\.(?:([A-Za-z_]\w*)\.)?$/.exec(before);
  if (dotted) {
    const fit = dotted[1];
    if (a.plan.fits.some((f) => f.name === fit && f.parameters.some((p) => p.name === (dotted[2] ?? name)))) {
      return md(parameterHover(a, fit, dotted[2] ?? name, run));
    }
    return md(statisticHover(fit, name, run));
  }
  // derive NAME = ... FIT.PARAM / FIT.STAT ...
  const member = /^\s*derive\b[^\n]*?\b([A-Za-z_]\w*)\.$/.exec(before.slice(before.lastIndexOf('\n') + 1));
  if (member && a.plan.fits.some((f) => f.name === member[1])) {
    const fitName = member[1];
    if (a.plan.fits.some((f) => f.name === fitName && f.parameters.some((p) => p.name === name))) return md(parameterHover(a, fitName, name, run));
    return md(statisticHover(fitName, name, run));
  }
  const derived = w.quoted ? undefined : a.plan.derived?.find((d) => d.name === name);
  if (derived) return md(derivedHover(derived.name, derived.text, derived.unit, run));
  const fit = enclosingFit(a, offset);
  if (fit && a.plan.fits.find((f) => f.name === fit)?.parameters.some((p) => p.name === name)) return md(parameterHover(a, fit, name, run));
  const c = a.plan.constants.find((k) => k.name === name);
  if (c) return md(`**${name}** — constant\n\n\`${name} = ${c.value}\`${c.unit ? ` [${c.unit}]` : ''}`);
  const d = a.plan.data.find((k) => k.name === name) ?? (a.data.find((k) => k.name === name) ? { name, path: a.data.find((k) => k.name === name)!.path } : undefined);
  if (d) return md(dataHover(a, name, d.path));
  if (a.plan.fits.some((f) => f.name === name)) return md(fitHover(name, run));
  // the columns of the enclosing fit's data, of the fit a query names (`predict FIT at COL`), or of a `data … where`
  const line = linePrefix(a.text, w.span.start);
  const queried = /^\s*(?:predict|invert)\s+([A-Za-z_]\w*)\s+at\s+"?$/.exec(line)?.[1];
  const user = fit ?? queried;
  const data = user ? dataOfFit(a, user) : /^\s*data\s+([A-Za-z_]\w*)\b.*\b(?:where|units)\b/.exec(line)?.[1];
  if (data) {
    const column = columnHover(a, data, name, w.span, a.plan.fits.find((f) => f.name === user)?.blocks.some((b) => b.columns.includes(name)) ?? false);
    if (column) return md(column);
  }
  if (!w.quoted && constantDoc(name) && !c) return md(`**${name}** — ${constantDoc(name)}`);
  const kw = w.quoted ? undefined : keywordDoc(name);
  if (kw) return md(`\`${kw.split(' - ')[0]}\`${kw.includes(' - ') ? `\n\n${kw.split(' - ').slice(1).join(' - ')}` : ''}`);
  return null;
}

/**
 * A name of a fit's expressions that is no parameter or constant: a column of the header when it was read; a
 * name the checker reported as unknown (the header does not have it) says so, with the diagnostic's "did you
 * mean", never "column of"; with the header unread, a name the fit uses is read as a column, unchecked.
 */
function columnHover(a: EditorAnalysis, data: string, name: string, at: Span, usedByFit: boolean): string | null {
  const file = a.data.find((x) => x.name === data)?.path;
  const source = `\`${data}\`${file ? ` (${file})` : ''}`;
  const header = columnsOf(a, data);
  const units = a.plan.data.find((x) => x.name === data)?.units;
  const unit = units && Object.prototype.hasOwnProperty.call(units, name) ? ` [${units[name]}]` : '';
  if (header?.includes(name)) return `**${name}** — column of ${source}${unit}`;
  const unknown = a.diagnostics.find((d) => (d.code === 'undefined_name' || d.code === 'unknown_column') && d.range.start.offset <= at.start && d.range.end.offset >= at.end);
  if (unknown) {
    const near = unknown.suggestions?.length ? `\n\ndid you mean ${unknown.suggestions.map((x) => `\`${x}\``).join(', ')}?` : '';
    return `**${name}** — unknown name: not a parameter or constant of this spec, and not in the header of ${source}${near}`;
  }
  if (header === undefined && (usedByFit || unit)) return `**${name}** — read as a column of ${source}${unit}; its header was not read, so the name is not checked`;
  return null;
}

/** Declaration and, after a fit, estimates of parameter `name` of fit `fit`. */
export function parameterHover(a: EditorAnalysis, fit: string, name: string, run?: RunResult): string {
  const p = a.plan.fits.find((f) => f.name === fit)?.parameters.find((x) => x.name === name);
  const lines = [`**${name}** — parameter of fit \`${fit}\`${p?.unit ? ` [${p.unit}]` : ''}`];
  if (p) {
    const parts = [p.initial !== undefined ? `start ${formatNumber(p.initial)}` : 'start guessed'];
    if (p.lower !== undefined || p.upper !== undefined) parts.push(`bounds ${formatBounds(p.lower ?? -Infinity, p.upper ?? Infinity)}`);
    if (p.fixed) parts.push('fixed');
    lines.push(parts.join(' · '));
  }
  const fits = run?.fits.filter((f) => f.name === fit) ?? [];
  if (!fits.length) return lines.join('\n\n');
  const unit = p?.unit ? ` ${p.unit}` : '';
  if (fits.length === 1 && fits[0].group === undefined) {
    const r = fits[0].parameters.find((x) => x.name === name);
    if (!r) return lines.join('\n\n');
    const f = parameterText(r);
    const rows = [`estimate **${f.estimate}**${unit}${r.fixed ? '' : ' (± standard error)'}`];
    if (!r.fixed) rows.push(`${formatLevel(fits[0].level)} interval ${f.interval}${unit}`);
    if (r.relativeStderr !== null) rows.push(`relative standard error ${formatPercent(r.relativeStderr)}`);
    if (r.atBound) rows.push(`⚠ at its ${r.atBound} bound: standard error and interval are not reliable`);
    if (r.fixed) rows.push('held fixed');
    return [...lines, rows.join('  \n'), fitStamp(fits[0])].join('\n\n');
  }
  const header = `| group | estimate ± SE | ${formatLevel(fits[0].level)} interval |\n|---|---|---|`;
  const body = fits.slice(0, MAX_GROUP_ROWS).map((f) => {
    const r = f.parameters.find((x) => x.name === name);
    const t = r ? parameterText(r) : null;
    return r && t ? `| ${f.group ?? ''} | ${t.estimate}${r.atBound ? ' ⚠' : ''} | ${t.interval} |` : `| ${f.group ?? ''} | — | — |`;
  });
  const more = fits.length > MAX_GROUP_ROWS ? `\n\n… and ${fits.length - MAX_GROUP_ROWS} more groups (see the results panel)` : '';
  return [...lines, `${header}\n${body.join('\n')}${more}`].join('\n\n');
}

/** `estimate ± SE` and `[low, high]` of a parameter by the one policy (engine/format.ts), as the CLI's parameter table prints them. */
function parameterText(r: Pick<ParameterResult, 'estimate' | 'stderr' | 'lower' | 'upper' | 'fixed'>): { estimate: string; interval: string } {
  const f = formatEstimate(r.estimate, r.fixed ? null : r.stderr, r.fixed ? null : r.lower, r.fixed ? null : r.upper);
  return { estimate: f.stderr === MISSING ? f.estimate : `${f.estimate} ± ${f.stderr}`, interval: `[${f.lower}, ${f.upper}]` };
}

function fitStamp(f: FitResult): string {
  return `_${METHOD_LABEL[f.method] ?? f.method}, n = ${f.goodness.n}, ${f.stop.converged ? 'converged' : 'not converged'}_`;
}

function statisticHover(fit: string, stat: string, run?: RunResult): string | null {
  const f = run?.fits.find((x) => x.name === fit);
  const value = f ? statisticValue(f, stat) : undefined;
  const doc = statisticDoc(stat);
  const about = doc ? `\n\n${doc}` : '';
  if (!f) return `**${stat}** — statistic of fit \`${fit}\`${about}`;
  return `**${stat}** of \`${fit}\` = ${value === undefined ? '—' : formatNumber(value)}${about}`;
}

/** The value an `expect FIT.STAT` names, from a fit result (the engine's getter); undefined for a name that is no statistic. */
export function statisticValue(f: FitResult, stat: string): number | null | undefined {
  return isStatisticName(stat) ? STATISTIC_GETTERS[stat](f) : undefined;
}

/** Definition of a derived quantity and, after a fit, its value ± standard error and interval (per group when grouped). */
function derivedHover(name: string, text: string, unit: string | undefined, run?: RunResult): string {
  const u = unit ? ` [${unit}]` : '';
  const lines = [`**${name}** — derived quantity${u}`, `\`${name} = ${text}\``];
  const rows = (run?.derived ?? []).filter((d) => d.name === name);
  for (const d of rows.slice(0, MAX_GROUP_ROWS)) {
    const f = formatEstimate(d.value, d.stderr, d.lower, d.upper);
    const group = d.group !== undefined ? `${d.group}: ` : '';
    const value = d.value === null ? 'n/a' : d.stderr === null ? f.estimate : `${f.estimate} ± ${f.stderr}`;
    const interval = d.lower !== null && d.upper !== null && d.level !== null ? `, ${formatLevel(d.level)} interval [${f.lower}, ${f.upper}]` : '';
    lines.push(`${group}**${value}**${unit ? ` ${unit}` : ''}${interval}`);
  }
  if (rows.length > MAX_GROUP_ROWS) lines.push(`… and ${rows.length - MAX_GROUP_ROWS} more groups (see the results panel)`);
  if (rows.length) lines.push(`_${rows[0].note}_`);
  return lines.join('\n\n');
}

function dataHover(a: EditorAnalysis, name: string, path: string): string {
  const st = a.data.find((d) => d.name === name);
  const cols = st?.headers;
  const state = st?.state === 'missing' ? '\n\n⚠ file not found' : st?.reason ? `\n\n⚠ ${st.reason}` : '';
  const list = cols?.length ? `\n\ncolumns: ${cols.slice(0, 20).map((c) => `\`${c}\``).join(', ')}${cols.length > 20 ? ', …' : ''}` : '';
  return `**${name}** — data \`${path}\`${state}${list}`;
}

function fitHover(name: string, run?: RunResult): string {
  const fits = run?.fits.filter((f) => f.name === name) ?? [];
  if (!fits.length) return `**${name}** — fit (not run yet: use **Leastwise: Fit This File**)`;
  if (fits.length > 1 || fits[0].group !== undefined) {
    const ok = fits.filter((f) => f.stop.converged).length;
    return `**${name}** — fit per group: ${fits.length} groups, ${ok} converged`;
  }
  const f = fits[0];
  return `**${name}** — R² ${formatNumber(f.goodness.r2)}, RMSE ${formatNumber(f.goodness.rmse)}, n = ${f.goodness.n}, ${f.stop.converged ? 'converged' : 'not converged'}`;
}
