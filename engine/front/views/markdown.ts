/**
 * A Markdown report a colleague can review: summary, points to review, per-fit
 * tables and linked SVG charts, queries, derived quantities, expectations, errors and provenance,
 * and always a short "Use of results" caution. A per-group fit gets its group
 * table, the summary across groups and the worst groups; full per-fit sections
 * follow only for some of its groups (rule in groups.ts).
 *
 * Every text from the shared summary (summary.ts, groups.ts) is plain text
 * with user names in it: it goes through `mdText` (or `mdCode` for spec text
 * shown as code, `mdFence` for the spec's comment), and table cells are
 * escaped by `markdownTable` unless made with `md()`. So names such as
 * `<script>`, `a|b`, `[x](y)` or a backtick show as written and change
 * neither the document's structure nor its HTML.
 */
import { groupsNSentence } from './rows';
import { jointBlocks } from './joint';
import type { FitResult, RunResult } from '../../result';
import { DIGITS, formatLevel, formatNumber } from '../../format';
import {
  derivedBlock, derivedLabel, expectationRows, expectationTally, fitHeading, fitLabel, goodnessEntries, LOSS_LABEL, METHOD_LABEL, modelLine,
  notFittedNote, PARAMETER_HEADERS, parameterRows, queryBlocks, robustLine, searchLine, stopLine, warningLines,
} from './summary';
import { append, markdownTable } from './table';
import { hasProfileTable, PROFILE_HEADERS, profileLine, profileRows } from './profile';
import { BOOTSTRAP_ALIGN, BOOTSTRAP_HEADERS, bootstrapLine, bootstrapRows, derivedIntervalBlock, hasBootstrapTable } from './bootstrap';
import { flaggedPointRows, flaggedPointsNote } from './influence';
import { detectPlates, parseWell } from './wells';
import { sameDataFitSets } from './curves';
import { md, mdCode, mdFence, mdHref, mdLinkText, mdText, type Markdown } from './escape';
import {
  DETAIL_ALL_GROUPS, detailIndices, detailNote, fitSections, groupCountLine, groupHeading, groupSummaryBlock, groupTableBlock, sharedSummaryLine,
  shownFitIndices, worstGroupLines, type FitSection,
} from './groups';

export interface ChartLink {
  title: string;
  /** Path relative to the report file, with forward slashes. */
  href: string;
}

export interface MarkdownOptions {
  /** Report title. Default `Fit report: <spec path>`. */
  title?: string;
  /** Chart links per fit, in `result.fits` order. Default none. */
  charts?: ChartLink[][];
  /**
   * Charts across curves (engine/front/views/across.ts), by `AcrossCharts.key`:
   * a per-group fit's name, or `same-data:<fit names>`. Default none.
   */
  acrossCharts?: Record<string, ChartLink[]>;
  /**
   * What the spec says about itself: its leading comment block, shown under
   * "About this spec" (it carries the author's context and cautions). Default none.
   */
  about?: string;
}

/** The leading comment block of a spec (lines starting with `#`, markers removed); empty when none. */
export function leadingComment(specText: string): string {
  const out: string[] = [];
  for (const line of specText.replace(/^\uFEFF/, '').split(/\r?\n/)) {
    const m = /^\s*#\s?(.*)$/.exec(line);
    if (!m) break;
    out.push(m[1].replace(/\s+$/, ''));
  }
  return out.join('\n').trim();
}

export const USE_OF_RESULTS =
  'Use of results: these numbers describe how a model fits the data given. Where a fit feeds safety, medical or ' +
  'legal decisions (clinical calibration, structural or pressure ratings, compliance), the results must be ' +
  'validated under the applicable procedures and local regulations and reviewed by qualified people before use.';

/** Items a reviewer should look at first, as Markdown; empty when nothing stands out. A per-group fit with many groups contributes its counts and its groups shown in full. */
export function reviewPoints(result: RunResult): string[] {
  const out: string[] = [];
  const sections = fitSections(result);
  for (const s of sections) {
    if (s.kind === 'groups' && s.fits.length > DETAIL_ALL_GROUPS && s.table.summary.flagged > 0) {
      out.push(mdText(`Fit ${s.name}: ${groupCountLine(s.table)} See its group table.`));
    }
  }
  for (const i of shownFitIndices(sections)) {
    const fit = result.fits[i];
    if (!fit.stop.converged) out.push(mdText(`Fit ${fitLabel(fit)} did not converge (${fit.stop.code}: ${fit.stop.message}); its numbers are not a solution.`));
    for (const w of warningLines(fit)) out.push(mdText(`Fit ${fitLabel(fit)}: ${w}`));
  }
  for (const d of result.derived ?? []) if (d.value === null) out.push(mdText(`Derived quantity ${derivedLabel(d)} could not be computed: ${d.note}`));
  for (const e of result.expectations) if (!e.passed) out.push(`Expectation failed: ${mdCode(e.expectation.text)} (${mdText(e.message)}).`);
  for (const err of result.errors) out.push(mdText(`Error: ${err.message}`));
  return out;
}

/** A `### heading` and the linked charts, or nothing when there are none. */
function chartBlock(heading: string, charts: readonly ChartLink[] | undefined): string[] {
  if (!charts?.length) return [];
  const lines = [`### ${heading}`, ''];
  for (const c of charts) lines.push(`![${mdLinkText(c.title)}](${mdHref(c.href)})`, '');
  return lines;
}

/**
 * Why a section whose labels look mostly like wells (at least half of them
 * well names, wells.ts `parseWell`) gets no plate map; null when it gets one
 * or its labels are not well-like at all.
 */
export function plateNote(labels: readonly string[]): string | null {
  const d = detectPlates(labels);
  if (d.layout || labels.filter((l) => parseWell(l) !== null).length * 2 < labels.length) return null;
  return `No plate map: ${d.notPlates}.`;
}

function groupSection(section: Extract<FitSection, { kind: 'groups' }>, shown: number, charts?: readonly ChartLink[]): string[] {
  const t = section.table;
  const lines = [`## ${mdText(groupHeading(section))}`, '', mdText(groupCountLine(t)), '', mdText(groupsNSentence(section.fits)), ''];
  const table = groupTableBlock(t);
  append(lines, markdownTable(table.headers, table.rows, table.align), '');
  const summary = groupSummaryBlock(t, section.shared);
  append(lines, '### Across converged groups', '', markdownTable(summary.headers, summary.rows, summary.align, { mixed: true }), '');
  const sharedLine = sharedSummaryLine(t, section.shared);
  if (sharedLine) lines.push(mdText(sharedLine), '');
  const worst = worstGroupLines(t);
  if (worst.length) append(lines, '### Worst groups', '', worst.map((w) => `- ${mdText(w)}`), '');
  if (charts?.length) {
    append(lines, chartBlock('Charts across groups', charts));
    const plates = plateNote(section.table.rows.map((r) => r.group));
    if (plates) lines.push(mdText(plates), '');
  }
  const note = detailNote(section, shown);
  if (note) lines.push(mdText(note), '');
  return lines;
}

function fitSection(fit: FitResult, charts: ChartLink[]): string[] {
  const search = searchLine(fit);
  const robust = robustLine(fit);
  const model = modelLine(fit);
  const lines = [`## ${mdText(fitHeading(fit))}`, '', ...(model ? [mdText(model + '.'), ''] : []), mdText(stopLine(fit) + '.'), ...(search ? ['', mdText(search + '.')] : []), ...(robust ? ['', mdText(robust + '.')] : []), ''];
  const marked = notFittedNote(fit);
  if (marked) lines.push(`> **${mdText(marked)}**`, '');
  else lines.push(`Confidence level ${formatLevel(fit.level)}; intervals use Student's t with ${fit.goodness.dof} degrees of freedom.`, '');
  append(lines, markdownTable(PARAMETER_HEADERS(fit.level), parameterRows(fit), ['left', 'right', 'right', 'right', 'right', 'left', 'left']), '');
  const profile = profileLine(fit);
  if (profile) lines.push(mdText(profile + '.'), '');
  if (hasProfileTable(fit)) append(lines, markdownTable(PROFILE_HEADERS(fit.level), profileRows(fit), ['left', 'right', 'right', 'left']), '');
  const boot = bootstrapLine(fit);
  if (boot) lines.push(mdText(boot + '.'), '');
  if (hasBootstrapTable(fit)) append(lines, markdownTable(BOOTSTRAP_HEADERS(fit.level), bootstrapRows(fit), [...BOOTSTRAP_ALIGN]), '');
  lines.push('### Goodness of fit', '');
  append(lines, markdownTable(['quantity', 'value', 'note'], goodnessEntries(fit).map((e) => [e.label, e.value, e.note ?? '']), ['left', 'right', 'left'], { mixed: true }), '');
  const flagged = flaggedPointRows(fit);
  const flaggedNote = flaggedPointsNote(fit);
  if (flagged.rows.length || flaggedNote) {
    lines.push('### Rows to check', '');
    if (flagged.rows.length) append(lines, markdownTable(flagged.headers, flagged.rows, flagged.align), '');
    if (flaggedNote) lines.push(mdText(flaggedNote), '');
  }
  const warnings = warningLines(fit);
  if (warnings.length) {
    append(lines, '### Warnings', '', warnings.map((w) => `- ${mdText(w)}`), '');
  }
  if (charts.length) {
    lines.push('### Charts', '');
    for (const c of charts) lines.push(`![${mdLinkText(c.title)}](${mdHref(c.href)})`, '');
  }
  return lines;
}

function provenanceSection(result: RunResult, sections: readonly FitSection[]): string[] {
  const p = result.provenance;
  const lines = ['## Provenance', ''];
  const rows: (string | Markdown)[][] = [
    ['tool', `${p.tool} ${p.toolVersion}`],
    ['run started', p.startedAt],
  ];
  if (p.specPath) rows.push(['spec', md(mdCode(p.specPath, true))]);
  rows.push(['spec SHA-256', md(mdCode(p.specSha256, true))]);
  for (const d of p.data) rows.push([md(`data ${mdCode(d.name, true)}`), md(`${mdCode(d.path, true)}, ${d.rows} rows, SHA-256 ${mdCode(d.sha256, true)}`)]);
  // one row per fit; a per-group fit's groups share their options
  const heads = sections.map((s) => (s.kind === 'single' ? { fit: s.fit, label: fitLabel(s.fit) } : { fit: s.fits[0], label: `${s.name} (every group)` }));
  for (const { fit, label } of heads) {
    const o = fit.options;
    const limits = o ? [o.maxIterations !== undefined ? `iterations ${o.maxIterations}` : '', o.tolerance !== undefined ? `tolerance ${o.tolerance}` : '', o.loss !== 'squared' ? (o.lossScale !== undefined ? `loss scale ${o.lossScale}` : 'loss scale from the residuals\' spread') : ''].filter(Boolean) : [];
    const extra = limits.length ? `, ${limits.join(', ')}` : '';
    rows.push([`options of ${label}`, `${METHOD_LABEL[fit.method]}, ${LOSS_LABEL[fit.loss]}, level ${formatLevel(fit.level)}${extra}`]);
  }
  append(lines, markdownTable(['item', 'value'], rows, ['left', 'left']), '');
  lines.push('Re-running the same spec on files with the same SHA-256 reproduces these results.', '');
  return lines;
}

/** The full report as Markdown text ending with a newline. */
export function markdownReport(result: RunResult, opts: MarkdownOptions = {}): string {
  const spec = result.provenance.specPath ?? 'spec';
  const lines: string[] = [`# ${mdText(opts.title ?? `Fit report: ${spec}`)}`, ''];
  lines.push(mdText(`Produced by ${result.provenance.tool} ${result.provenance.toolVersion} on ${result.provenance.startedAt}.`), '');
  lines.push(`> ${USE_OF_RESULTS}`, '');
  if (opts.about) {
    append(lines, '## About this spec', '', 'From the comment at the top of the spec:', '', mdFence(opts.about, 'text'), '');
  }

  const sections = fitSections(result);
  if (result.fits.length) {
    lines.push('## Summary', '');
    const fitRow = (f: FitResult): (string | Markdown)[] => [fitLabel(f), f.stop.converged ? 'yes' : md('**no**'), String(f.goodness.n), formatNumber(f.goodness.rmse, DIGITS.statistic), formatNumber(f.goodness.r2, DIGITS.value), String(warningLines(f).length)];
    const rows = sections.flatMap((s): (string | Markdown)[][] => {
      if (s.kind === 'single') return [fitRow(s.fit)];
      if (s.fits.length <= DETAIL_ALL_GROUPS) return s.fits.map(fitRow);
      const sum = s.table.summary;
      const n = s.fits.reduce((k, f) => k + f.goodness.n, 0);
      return [[`${s.name} (${sum.groups} groups)`, sum.converged === sum.groups ? 'yes' : md(`**${sum.converged} of ${sum.groups}**`), String(n), 'per group', `median ${formatNumber(sum.r2.median, DIGITS.value)}`, `${sum.flagged} groups flagged`]];
    });
    append(lines, markdownTable(['fit', 'converged', 'n', 'RMSE', 'R²', 'warnings'], rows), '');
    lines.push(mdText(expectationTally(result)), '');
  }
  const review = reviewPoints(result);
  lines.push('## Points to review', '');
  append(lines, (review.length ? review.map((r) => `- ${r}`) : ['Nothing stands out: every fit converged with no warnings and every expectation passed. Still look at the residual charts.']), '');

  for (const s of sections) {
    if (s.kind === 'single') {
      append(lines, fitSection(s.fit, opts.charts?.[s.index] ?? []));
      continue;
    }
    const shown = detailIndices(s);
    append(lines, groupSection(s, shown.length, opts.acrossCharts?.[s.name]));
    for (const i of shown) append(lines, fitSection(result.fits[i], opts.charts?.[i] ?? []));
  }

  for (const set of sameDataFitSets(result.fits)) {
    const charts = opts.acrossCharts?.[`same-data:${set.name}`];
    if (!charts?.length) continue;
    append(lines, `## ${mdText(`Fits of the same data: ${set.name}`)}`, '', mdText(`${set.curves.length} fits of ${set.response} against ${set.predictor} on the same rows, drawn together.`), '');
    append(lines, chartBlock('Charts', charts));
  }

  for (const b of jointBlocks(result.joint ?? [])) {
    append(lines, `## ${mdText(b.heading)}`, '', b.lead.flatMap((l) => [mdText(l), '']));
    for (const t of b.tables) append(lines, `**${mdText(t.title)}**`, '', markdownTable(t.headers, t.rows, t.align), '');
    append(lines, b.notes.map((n) => `- ${mdText(n)}`), '');
  }
  const blocks = queryBlocks(result);
  if (blocks.length) {
    lines.push('## Queries', '');
    for (const b of blocks) {
      const lead = (b.lead ?? []).flatMap((l) => [mdText(l), '']);
      const table = b.rows.length ? [...markdownTable(b.headers, b.rows, b.align), ''] : [];
      append(lines, `### ${mdText(b.heading)}`, '', lead, table, b.notes.map(mdText), '');
    }
  }
  const derived = derivedBlock(result);
  if (derived) {
    const defs = new Map((result.derived ?? []).map((d) => [d.name, mdCode(`${d.name} = ${d.expression}`)]));
    append(lines, `## ${derived.heading}`, '', `As defined in the spec: ${[...defs.values()].join(', ')}.`, '');
    append(lines, markdownTable(derived.headers, derived.rows, derived.align), '');
    append(lines, derived.notes.map((n) => `- ${mdText(n)}`), '');
    const iv = derivedIntervalBlock(result);
    if (iv) {
      append(lines, `### ${iv.heading}`, '', markdownTable(iv.headers, iv.rows, iv.align), '');
      append(lines, iv.notes.map((n) => `- ${mdText(n)}`), '');
    }
    lines.push('First-order (delta-method) uncertainties; they assume the listed conditions and do not replace a validated uncertainty evaluation.', '');
  }
  if (result.expectations.length) {
    lines.push('## Expectations', '');
    const rows = expectationRows(result).map((e) => [e.verdict === 'PASS' ? 'PASS' : md('**FAIL**'), md(mdCode(e.text, true)), e.actual, e.message]);
    append(lines, markdownTable(['verdict', 'expectation', 'actual', 'detail'], rows, ['left', 'left', 'right', 'left']), '', mdText(expectationTally(result)), '');
  }
  if (result.errors.length) {
    lines.push('## Errors', '');
    for (const e of result.errors) {
      const where = e.file ? ` (${e.file}${e.row !== undefined ? `, row ${e.row}` : ''}${e.column ? `, column ${e.column}` : ''})` : e.range ? ` (line ${e.range.start.line})` : '';
      lines.push(`- ${mdText(e.message)}${mdText(where)} [${e.code}]`);
    }
    lines.push('');
  }
  append(lines, provenanceSection(result, sections));
  return lines.join('\n').replace(/\n{3,}/g, '\n\n');
}
