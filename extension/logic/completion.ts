/**
 * Completion items as plain data, chosen from what the line up to the cursor
 * says is expected: a statement keyword, a fit-body keyword, a method or loss
 * name, a data or fit name, a `fit.` member in `expect` or `derive`, a column,
 * a CSV path, or an expression (functions, the fit's parameters, its data's
 * columns, constants; in `derive`: fits, constants and derived quantities), a group label inside `FIT."` and
 * the fit's members after `FIT."GROUP".`. extension/language/completion.ts maps them to vscode items.
 */
import {
  CONSTANT_NAMES, MEMBERS, EXPRESSION_CONSTANTS, FUNCTION_NAMES, FUNCTION_SPECS, LOSSES, LOSS_SPECS, METHODS, METHOD_SPECS, PROFILE_MODES, BOOTSTRAP_RESAMPLES, RESERVED_ROLES, STATISTICS, keywordsWithRole,
} from '../../parser/registry';
import { columnsOf, groupLabelsOf, type EditorAnalysis } from './analysis';
import { columnsOf as exprColumns } from '../../parser/plan-expr';
import { constantDoc, keywordDoc, statisticDoc } from './function-docs';
import { dataOfFit, enclosingFit, scanEnclosingFit } from './declarations';
import { blankComments, linePrefix } from './text';
import { labelsKept } from '../../parser/check-groups';

export type CompletionKind = 'keyword' | 'function' | 'parameter' | 'column' | 'constant' | 'data' | 'fit' | 'statistic' | 'value' | 'file';

export interface LsqCompletion {
  label: string;
  kind: CompletionKind;
  detail?: string;
  /** Markdown. */
  documentation?: string;
  /** Text to insert when it differs from the label (quoted column names). */
  insertText?: string;
  /** Snippet to insert (`exp($1)`), takes precedence over insertText. */
  snippet?: string;
  /**
   * Order in the list (compared as text), set where some kinds come first: the editor sorts by label
   * otherwise, which would mix columns and functions alphabetically where a column is expected.
   */
  sortText?: string;
}

export interface CompletionEnv {
  /** CSV files (paths relative to the spec's folder) offered inside `data x = "`. */
  csvFiles?: string[];
}

/** Keywords offered at the start of a line outside and inside a fit body (registry roles). */
export const STATEMENT_KEYWORDS: readonly string[] = keywordsWithRole('declaration', 'query');
export const FIT_BODY_KEYWORDS: readonly string[] = keywordsWithRole('fit_item');
const STATEMENT_START = new RegExp(`^\\s*(${STATEMENT_KEYWORDS.join('|')})\\b`);
const IDENT = /^[A-Za-z_][A-Za-z0-9_]*$/;

/** Completions at `offset` of the analysed text. */
export function completionsAt(a: EditorAnalysis, offset: number, env: CompletionEnv = {}): LsqCompletion[] {
  const raw = linePrefix(a.text, offset);
  const prefix = blankComments(raw);
  if (prefix.length < raw.length || /#/.test(raw.replace(/"[^"]*"/g, ''))) return []; // in a comment
  const fitName = enclosingFit(a, offset) ?? scanEnclosingFit(a.text, offset)?.name;
  const inFit = fitName !== undefined && !STATEMENT_START.test(prefix);
  let m: RegExpExecArray | null;

  if ((m = /^\s*data\s+\w+\s*=\s*"([^"]*)$/.exec(prefix))) return (env.csvFiles ?? []).map((f) => ({ label: f, kind: 'file' as const }));
  // FIT."GROUP".NAME in derive and expect: the fit's group labels inside the quote, then its members
  const reference = /^\s*(derive\s+\w+\s*=|expect\s)/.test(prefix);
  if (reference && (m = /\b([A-Za-z_]\w*)\."([^"]*)$/.exec(prefix)) && !/"/.test(prefix.slice(0, m.index).replace(/"[^"]*"/g, ''))) return groupLabelItems(a, m[1]);
  if (reference && (m = /\b([A-Za-z_]\w*)\."[^"]*"\.(\w+)\.\w*$/.exec(prefix)) && /^\s*expect\s/.test(prefix)) return members(m[2]);
  if (reference && (m = /\b([A-Za-z_]\w*)\."[^"]*"\.\w*$/.exec(prefix))) return fitMembers(a, m[1]);
  if (/"[^"]*$/.test(prefix.replace(/"[^"]*"/g, ''))) return quotedColumns(a, fitName, prefix);
  if (/^\s*[A-Za-z_]*$/.test(prefix)) return inFit ? keywords(FIT_BODY_KEYWORDS) : keywords(STATEMENT_KEYWORDS);
  if (/\bmethod\s+\w*$/.test(prefix)) return METHODS.map((x) => ({ label: x, kind: 'value' as const, detail: 'method', documentation: METHOD_SPECS[x].doc }));
  if (/\bbootstrap\s+\S+\s+(residuals|adjusted|cases)\s+\w*$/.test(prefix)) return keywords(['seed']);
  if (/\bbootstrap\s+\S+\s+\w*$/.test(prefix)) return [...BOOTSTRAP_RESAMPLES.map((x) => ({ label: x, kind: 'value' as const, detail: 'bootstrap resampling' })), ...keywords(['seed'])];
  if (/\bprofile\s+\w*$/.test(prefix)) return PROFILE_MODES.map((x) => ({ label: x, kind: 'value' as const, detail: 'profile intervals' }));
  if (/\bloss\s+\w+\s+\w*$/.test(prefix)) return keywords(['scale']);
  if (/\bloss\s+\w*$/.test(prefix)) return LOSSES.map((x) => ({ label: x, kind: 'value' as const, detail: 'loss', documentation: `ρ(z) = ${LOSS_SPECS[x].rho}: ${LOSS_SPECS[x].doc}` }));
  if (/^\s*fit\s+\w+\s+\w*$/.test(prefix) && !/\bon\s+\w*$/.test(prefix)) return keywords(['on']);
  if (/^\s*fit\s+\w+\s+on\s+\w*$/.test(prefix)) return dataNames(a);
  if (/^\s*(predict|invert)\s+\w*$/.test(prefix) || /^\s*compare\s+[\w\s,]*$/.test(prefix)) return fitNames(a);
  if (/^\s*expect\s+\w*$/.test(prefix)) return [...fitNames(a), ...derivedNames(a)];
  if ((m = /^\s*derive\s+\w+\s*=.*?\b([A-Za-z_]\w*)\.\w*$/.exec(prefix))) return fitMembers(a, m[1]);
  if (/^\s*derive\s+\w+\s*=/.test(prefix)) return [...fitNames(a), ...derivedNames(a, /^\s*derive\s+(\w+)/.exec(prefix)?.[1]), ...constants(a), ...functions()];
  if (/^\s*(predict|invert)\s+\w+\s+\w*$/.test(prefix)) return keywords(['at']);
  if ((m = /^\s*(predict|invert)\s+(\w+)\s+at\s+\w*$/.exec(prefix))) return ranked([queryColumn(a, m[2], m[1] as 'predict' | 'invert')]);
  if ((m = /^\s*expect\s+(\w+)\.(\w+)\.\w*$/.exec(prefix))) return members(m[2]);
  if ((m = /^\s*expect\s+(\w+)\.\w*$/.exec(prefix))) {
    if (a.plan.derived?.some((d) => d.name === m![1])) return members(m[1]);
    return fitMembers(a, m[1]);
  }
  if (/^\s*expect\s+\S+\s+\w*$/.test(prefix)) return keywords(['within', 'above', 'below']);
  if (/^\s*per\s+\w*$/.test(prefix) && fitName) return ranked([columns(a, fitName)]);
  if (/^\s*param\s+\w*$/.test(prefix) && fitName) return undeclaredNames(a, fitName);
  if (/^\s*param\s+\w+.*\s\w*$/.test(prefix)) return keywords(['in', 'fixed']);
  if ((m = /^\s*data\s+\w+\s*=\s*"[^"]*"\s+.*\bwhere\b/.exec(prefix))) {
    const data = /^\s*data\s+(\w+)/.exec(prefix)?.[1] ?? '';
    return ranked([columnItems(columnsOf(a, data) ?? [], data), constants(a), functions()]);
  }
  if (inFit && fitName) {
    // where a column is expected (a response, sigma, weight: parameters are not allowed there) columns come
    // first; on the model side the fit's parameters, then its columns; then constants, then functions
    if (/^\s*(sigma|weight)\b/.test(prefix) || /^\s*model\b[^=]*$/.test(prefix)) return ranked([columns(a, fitName), constants(a), functions()]);
    if (/^\s*model\b/.test(prefix)) return ranked([params(a, fitName), columns(a, fitName), constants(a), functions()]);
  }
  return [];
}

/** Items in groups, each group before the next (alphabetical within a group), by `sortText`. */
export function ranked(groups: readonly LsqCompletion[][]): LsqCompletion[] {
  return groups.flatMap((g, i) => g.map((c) => ({ ...c, sortText: `${String(i).padStart(2, '0')} ${c.label}` })));
}

function keywords(words: readonly string[]): LsqCompletion[] {
  return words.map((w) => {
    const doc = keywordDoc(w);
    return { label: w, kind: 'keyword' as const, ...(doc ? { detail: doc.split(' - ')[0], documentation: doc } : {}) };
  });
}

export function functions(): LsqCompletion[] {
  return FUNCTION_NAMES.map((name) => {
    const f = FUNCTION_SPECS[name];
    const args = Array.from({ length: f.arity }, (_, i) => `\${${i + 1}}`).join(', ');
    return { label: name, kind: 'function' as const, detail: f.signature, documentation: f.doc, snippet: `${name}(${args})` };
  });
}

function dataNames(a: EditorAnalysis): LsqCompletion[] {
  return a.plan.data.map((d) => ({ label: d.name, kind: 'data' as const, detail: `data "${d.path}"` }));
}

function fitNames(a: EditorAnalysis): LsqCompletion[] {
  return a.plan.fits.map((f) => ({ label: f.name, kind: 'fit' as const, detail: `fit on ${f.blocks.map((b) => b.data).join(', ')}` }));
}

/** Derived quantities of the plan (all but `except`, the one being written). */
function derivedNames(a: EditorAnalysis, except?: string): LsqCompletion[] {
  return (a.plan.derived ?? []).filter((d) => d.name !== except).map((d) => ({ label: d.name, kind: 'value' as const, detail: `derived = ${d.text}${d.unit ? ` [${d.unit}]` : ''}` }));
}

function fitMembers(a: EditorAnalysis, fit: string): LsqCompletion[] {
  const f = a.plan.fits.find((x) => x.name === fit);
  const params = (f?.parameters ?? []).map((p) => ({ label: p.name, kind: 'parameter' as const, detail: `parameter of ${fit}` }));
  const stats = STATISTICS.map((s) => ({ label: s, kind: 'statistic' as const, detail: 'fit statistic', documentation: statisticDoc(s) }));
  return [...params, ...stats];
}

function queryColumn(a: EditorAnalysis, fit: string, kind: 'predict' | 'invert'): LsqCompletion[] {
  const f = a.plan.fits.find((x) => x.name === fit);
  const block = f?.blocks[0];
  if (!block) return [];
  if (kind === 'predict') {
    if (block.predictor) return columnItems([block.predictor], block.data);
    // no single predictor (several, or a name the header lacks): the model's real columns, else the header's
    const header = columnsOf(a, block.data);
    const response = exprColumns(block.response);
    const used = exprColumns(block.model).filter((c) => (header ? header.includes(c) : true) && !response.includes(c));
    return columnItems(used.length ? used : (header ?? []).filter((c) => !response.includes(c)), block.data);
  }
  return block.response.kind === 'column' ? columnItems([block.response.name], block.data) : [];
}

/** Columns of the fit's data: from the CSV header when read, else the columns the plan uses. */
function columns(a: EditorAnalysis, fit: string): LsqCompletion[] {
  const data = dataOfFit(a, fit) ?? scanEnclosingFit(a.text, a.text.length)?.data ?? '';
  const fromHeader = columnsOf(a, data);
  const used = a.plan.fits.find((f) => f.name === fit)?.blocks.flatMap((b) => b.columns) ?? [];
  return columnItems(fromHeader ?? [...new Set(used)], data);
}

function columnItems(names: readonly string[], data: string): LsqCompletion[] {
  return names.map((c) => ({
    label: c,
    kind: 'column' as const,
    detail: `column of ${data}`,
    ...(IDENT.test(c) ? {} : { insertText: `"${c}"` }),
  }));
}

/** Inside an open `"`: column names without the quotes. */
function quotedColumns(a: EditorAnalysis, fit: string | undefined, prefix: string): LsqCompletion[] {
  if (/^\s*data\b/.test(prefix) && !/\bwhere\b/.test(prefix)) return [];
  const data = fit ? dataOfFit(a, fit) : /^\s*data\s+(\w+)/.exec(prefix)?.[1];
  return (columnsOf(a, data ?? '') ?? []).map((c) => ({ label: c, kind: 'column' as const, detail: `column of ${data}` }));
}

/** The group labels of a `per` fit, from the data (`groupLabelsOf`, the checker's source): inside `FIT."`. */
function groupLabelItems(a: EditorAnalysis, fit: string): LsqCompletion[] {
  const f = a.plan.fits.find((x) => x.name === fit);
  const column = f?.groupBy;
  const data = dataOfFit(a, fit) ?? f?.blocks[0]?.data;
  if (column === undefined || data === undefined) return [];
  const kept = labelsKept(a.plan.data.find((d) => d.name === data)?.filter, column, groupLabelsOf(a, data, column) ?? []);
  return kept.map((label) => ({ label, kind: 'value' as const, detail: `group of ${fit} (${column})` }));
}

function params(a: EditorAnalysis, fit: string): LsqCompletion[] {
  const f = a.plan.fits.find((x) => x.name === fit);
  return (f?.parameters ?? []).map((p) => ({ label: p.name, kind: 'parameter' as const, detail: `parameter of ${fit}${p.unit ? ` [${p.unit}]` : ''}` }));
}

function constants(a: EditorAnalysis): LsqCompletion[] {
  const named = a.plan.constants.map((c) => ({ label: c.name, kind: 'constant' as const, detail: `const = ${c.value}${c.unit ? ` [${c.unit}]` : ''}` }));
  const builtin = EXPRESSION_CONSTANTS.map((c) => ({ label: c, kind: 'constant' as const, detail: constantDoc(c) }));
  return [...named, ...builtin];
}

/**
 * After `param `: names the fit's expressions use that are neither columns,
 * constants, functions nor declared parameters (likely parameters to declare).
 */
function undeclaredNames(a: EditorAnalysis, fit: string): LsqCompletion[] {
  const data = dataOfFit(a, fit) ?? '';
  const known = new Set<string>([
    ...(columnsOf(a, data) ?? []),
    ...a.plan.constants.map((c) => c.name),
    ...FUNCTION_NAMES,
    ...(a.plan.fits.find((f) => f.name === fit)?.parameters.map((p) => p.name) ?? []),
    ...CONSTANT_NAMES, ...keywordsWithRole(...RESERVED_ROLES), 'model', 'sigma', 'weight',
  ]);
  const f = a.ast.statements.find((s) => s.kind === 'fit' && s.name?.name === fit);
  const body = f ? a.text.slice(f.range.start.offset, f.range.end.offset) : '';
  const names = new Set<string>();
  for (const line of blankComments(body).split(/\r?\n/)) {
    const m = /^\s*(model|sigma|weight)\b(.*)$/.exec(line);
    if (!m) continue;
    const expr = m[2].replace(/"[^"]*"/g, ' ');
    const rhs = m[1] === 'model' ? expr.slice(expr.indexOf('=') + 1) : expr;
    for (const w of rhs.match(/[A-Za-z_][A-Za-z0-9_]*/g) ?? []) if (!known.has(w)) names.add(w);
  }
  return [...names].map((n) => ({ label: n, kind: 'parameter' as const, detail: 'used in the model, not declared' }));
}

/** The members after a parameter or derived quantity in `expect` (parser/registry/statistics.ts MEMBER_SPECS). */
function members(of: string) {
  const detail = { se: `standard error of ${of}`, lower: `lower end of the interval of ${of}`, upper: `upper end of the interval of ${of}` } as const;
  return MEMBERS.map((label) => ({ label, kind: 'statistic' as const, detail: detail[label], documentation: statisticDoc(label) }));
}
