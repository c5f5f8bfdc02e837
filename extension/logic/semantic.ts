/**
 * Semantic tokens from the real lexer (`lexTokens`): each token's kind maps
 * to a standard token type, and identifiers are refined by what they name in
 * the plan (parameter of the enclosing fit, constant, data source, fit, a
 * column of a data file, otherwise a property such as a statistic or an
 * option value). The TextMate grammar paints first; these refine it.
 *
 * Columns get their own type `column` (declared in package.json
 * `semanticTokenTypes`, super type `property`), which `semanticTokenScopes`
 * maps to the TextMate scope `entity.name.type.column.lsq`: the default
 * themes (Light+, Dark+, High Contrast) colour it as a type name, apart from
 * parameters (`variable.parameter`, the variable colour). A name the checker
 * reported as unknown is neither: a plain `variable`.
 */
import type { LexToken } from '../../parser';
import type { EditorAnalysis } from './analysis';
import { spanOf, type Span } from './text';

/** Token types in legend order (standard VS Code semantic token types). */
export const TOKEN_TYPES = ['keyword', 'function', 'number', 'string', 'type', 'comment', 'variable', 'operator', 'parameter', 'property', 'namespace', 'class', 'enumMember', 'column'] as const;
export type TokenType = (typeof TOKEN_TYPES)[number];
export const TOKEN_MODIFIERS = ['declaration', 'readonly', 'defaultLibrary'] as const;
export type TokenModifier = (typeof TOKEN_MODIFIERS)[number];

export interface LsqSemanticToken extends Span {
  type: TokenType;
  modifiers: TokenModifier[];
}

const KIND_TYPE: Record<string, TokenType> = {
  keyword: 'keyword',
  function: 'function',
  number: 'number',
  string: 'string',
  unit: 'type',
  comment: 'comment',
  identifier: 'variable',
  operator: 'operator',
  constant: 'enumMember',
};

export function semanticTokens(a: EditorAnalysis, tokens: readonly LexToken[]): LsqSemanticToken[] {
  const fits = a.ast.statements.filter((s) => s.kind === 'fit').map((f) => ({
    span: spanOf(f.range),
    params: new Set(a.plan.fits.find((p) => p.name === (f.kind === 'fit' ? f.name?.name : ''))?.parameters.map((p) => p.name) ?? []),
  }));
  const consts = new Set(a.plan.constants.map((c) => c.name));
  const data = new Set(a.ast.statements.flatMap((s) => (s.kind === 'data' && s.name ? [s.name.name] : [])));
  const fitNames = new Set(a.ast.statements.flatMap((s) => (s.kind === 'fit' && s.name ? [s.name.name] : [])));
  // columns: of the headers read, else those the plan's fits read (headers unknown); minus the names reported unknown
  const unknown = a.diagnostics.filter((d) => d.code === 'undefined_name' || d.code === 'unknown_column').map((d) => spanOf(d.range));
  const columns = new Set<string>([...a.data.flatMap((d) => (d.state === 'found' ? d.headers ?? [] : [])), ...a.plan.fits.flatMap((f) => f.blocks.flatMap((b) => b.columns))]);
  const declared = new Set<number>();
  for (const s of a.ast.statements) {
    if ((s.kind === 'data' || s.kind === 'const' || s.kind === 'fit') && s.name) declared.add(s.name.range.start.offset);
    if (s.kind === 'fit') for (const i of s.items) if (i.kind === 'param' && i.name) declared.add(i.name.range.start.offset);
  }

  const out: LsqSemanticToken[] = [];
  for (const t of tokens) {
    const span = spanOf(t.range);
    if (span.end <= span.start) continue;
    let type = KIND_TYPE[t.kind] ?? 'variable';
    const modifiers: TokenModifier[] = [];
    if (t.kind === 'function' || t.kind === 'constant') modifiers.push('defaultLibrary');
    if (t.kind === 'identifier') {
      const name = a.text.slice(span.start, span.end);
      const fit = fits.find((f) => span.start >= f.span.start && span.end <= f.span.end);
      const owner = /([A-Za-z_]\w*)\.$/.exec(a.text.slice(Math.max(0, span.start - 64), span.start))?.[1];
      const ownerParams = owner ? a.plan.fits.find((f) => f.name === owner)?.parameters.map((p) => p.name) : undefined;
      if (fit?.params.has(name) || ownerParams?.includes(name)) type = 'parameter';
      else if (consts.has(name)) { type = 'variable'; modifiers.push('readonly'); }
      else if (data.has(name)) type = 'namespace';
      else if (fitNames.has(name)) type = 'class';
      else if (unknown.some((u) => u.start <= span.start && u.end >= span.end)) type = 'variable';
      else if (columns.has(name)) type = 'column';
      else type = 'property';
      if (declared.has(span.start)) modifiers.push('declaration');
    }
    out.push({ ...span, type, modifiers });
  }
  // the editor needs tokens in document order (the lexer lists comments apart)
  return out.sort((x, y) => x.start - y.start);
}
